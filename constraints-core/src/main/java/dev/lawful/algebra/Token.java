package dev.lawful.algebra;

/**
 * One token with its place in the source.
 *
 * @param kind   what it is
 * @param text   the characters as written
 * @param offset index of the first character
 * @param length number of characters
 */
public record Token(TokenKind kind, String text, int offset, int length) {

    /** @return the characters this token covers */
    public Span span() {
        return new Span(offset, length);
    }

    /** @return advice for characters that people type for an operator the language spells differently */
    static String hint(Token t) {
        if (t.kind() != TokenKind.ERROR) {
            return "";
        }
        switch (t.text()) {
            case "\u00d7":
            case "\u00b7":
            case "\u22c5":
                return "; write '*' for multiplication";
            case "\u2212":
            case "\u2013":
                return "; write '-' for minus";
            case "\u00f7":
                return "; write '/' for division";
            case "\u00b2":
            case "\u00b3":
                return "; write '^2' or '^3' for powers";
            case ";":
                return "; write one statement per line";
            case "<":
            case ">":
                return "; a limit is written with '<=' or '>='";
            case "\u2264":
            case "\u2265":
                return "; write '<=' or '>='";
            default:
                return "";
        }
    }

    /** @return how the token is named in "found ..." phrases of diagnostics */
    public String describe() {
        return switch (kind) {
            case IDENT -> "name '" + text + "'";
            case NUMBER -> "number " + text;
            case NEWLINE, EOF -> kind.description();
            case ERROR -> "unexpected character " + quoteChar(text);
            default -> "'" + text + "'";
        };
    }

    static String quoteChar(String s) {
        int cp = s.codePointAt(0);
        if (cp < 0x20 || cp == 0x7f || !Character.isDefined(cp) || Character.isISOControl(cp)) {
            return String.format("U+%04X", cp);
        }
        return "'" + s + "' (U+" + String.format("%04X", cp) + ")";
    }

}
