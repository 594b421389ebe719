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
