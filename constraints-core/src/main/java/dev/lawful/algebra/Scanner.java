package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.List;

/**
 * Hand-written scanner for the law language.
 *
 * <p>Tokens: names ({@code [A-Za-z_][A-Za-z0-9_]*}), numbers ({@code 12}, {@code 1.5}, {@code .5}, {@code 6.02e23},
 * {@code 1E-5}), the punctuation {@code + - * / ^ ( ) [ ] , : = .}, the relations {@code <=} and {@code >=}, and
 * line ends. A {@code #} starts a comment that runs to the end of the line. A line end is a statement separator,
 * except inside parentheses or brackets and after a token that cannot end a statement
 * ({@code + - * / ^ = , : <= >=}), so long laws may be broken after an operator. Characters outside the language become {@link TokenKind#ERROR} tokens, which the parser reports where
 * it meets them (unit text may hold symbols such as the micro sign), so scanning never stops early.
 */
public final class Scanner {
    private final String text;
    private final Diagnostics diagnostics;
    private int pos;
    private int nesting;

    /** @param diagnostics receives errors about invalid characters and malformed numbers */
    public Scanner(Diagnostics diagnostics) {
        this.diagnostics = diagnostics;
        this.text = diagnostics.source().text();
    }

    /** @return every token of the source, ending with one {@link TokenKind#EOF} */
    public List<Token> scan() {
        List<Token> tokens = new ArrayList<>();
        while (true) {
            Token t = next();
            if (t.kind() == TokenKind.NEWLINE) {
                boolean previousIsBreak = tokens.isEmpty() || tokens.get(tokens.size() - 1).kind() == TokenKind.NEWLINE;
                if (previousIsBreak) {
                    continue;
                }
                if (startsStatement(pos)) {
                    // a line that opens with a keyword always starts a statement (keywords never occur inside
                    // an expression), so an unclosed bracket or a trailing operator cannot swallow the next line
                    nesting = 0;
                } else if (nesting > 0 || continuesLine(tokens.get(tokens.size() - 1).kind())) {
                    continue;
                }
            }
            switch (t.kind()) {
                case LPAREN, LBRACKET -> nesting++;
                case RPAREN, RBRACKET -> nesting = Math.max(0, nesting - 1);
                default -> { }
            }
            tokens.add(t);
            if (t.kind() == TokenKind.EOF) {
                return tokens;
            }
        }
    }

    /** @return whether the line starting at {@code from} opens with a statement keyword */
    private boolean startsStatement(int from) {
        int i = from;
        while (i < text.length() && (text.charAt(i) == ' ' || text.charAt(i) == '\t')) {
            i++;
        }
        int start = i;
        while (i < text.length() && isNamePart(text.charAt(i))) {
            i++;
        }
        return i > start && Parser.KEYWORDS.contains(text.substring(start, i));
    }

    private static boolean continuesLine(TokenKind kind) {
        return switch (kind) {
            case PLUS, MINUS, STAR, SLASH, CARET, EQUALS, COMMA, COLON, LESS_EQUAL, GREATER_EQUAL -> true;
            default -> false;
        };
    }

    private Token next() {
        while (pos < text.length()) {
            char c = text.charAt(pos);
            if (c == ' ' || c == '\t' || c == '\r' || c == '\f') {
                pos++;
            } else if (c == '#') {
                while (pos < text.length() && text.charAt(pos) != '\n') {
                    pos++;
                }
            } else {
                break;
            }
        }
        if (pos >= text.length()) {
            return new Token(TokenKind.EOF, "", text.length(), 0);
        }
        int start = pos;
        char c = text.charAt(pos);
        if (c == '\n') {
            pos++;
            return new Token(TokenKind.NEWLINE, "\n", start, 1);
        }
        if (isNameStart(c)) {
            while (pos < text.length() && isNamePart(text.charAt(pos))) {
                pos++;
            }
            return token(TokenKind.IDENT, start);
        }
        if (isDigit(c) || (c == '.' && pos + 1 < text.length() && isDigit(text.charAt(pos + 1)))) {
            return number(start);
        }
        if ((c == '<' || c == '>') && pos + 1 < text.length() && text.charAt(pos + 1) == '=') {
            pos += 2;
            return token(c == '<' ? TokenKind.LESS_EQUAL : TokenKind.GREATER_EQUAL, start);
        }
        pos++;
        TokenKind kind = switch (c) {
            case '+' -> TokenKind.PLUS;
            case '-' -> TokenKind.MINUS;
            case '*' -> TokenKind.STAR;
            case '/' -> TokenKind.SLASH;
            case '^' -> TokenKind.CARET;
            case '(' -> TokenKind.LPAREN;
            case ')' -> TokenKind.RPAREN;
            case '[' -> TokenKind.LBRACKET;
            case ']' -> TokenKind.RBRACKET;
            case ',' -> TokenKind.COMMA;
            case ':' -> TokenKind.COLON;
            case '=' -> TokenKind.EQUALS;
            case '.' -> TokenKind.DOT;
            default -> TokenKind.ERROR;
        };
        if (kind == TokenKind.ERROR) {
            if (Character.isHighSurrogate(c) && pos < text.length() && Character.isLowSurrogate(text.charAt(pos))) {
                pos++;
            }
            // reported by the parser where it matters: unit text may hold symbols such as the micro sign
            return token(kind, start);
        }
        return token(kind, start);
    }

    private Token number(int start) {
        while (pos < text.length() && isDigit(text.charAt(pos))) {
            pos++;
        }
        if (pos < text.length() && text.charAt(pos) == '.') {
            pos++;
            while (pos < text.length() && isDigit(text.charAt(pos))) {
                pos++;
            }
        }
        if (pos < text.length() && (text.charAt(pos) == 'e' || text.charAt(pos) == 'E')) {
            int mark = pos;
            pos++;
            if (pos < text.length() && (text.charAt(pos) == '+' || text.charAt(pos) == '-')) {
                pos++;
            }
            if (pos < text.length() && isDigit(text.charAt(pos))) {
                while (pos < text.length() && isDigit(text.charAt(pos))) {
                    pos++;
                }
            } else {
                diagnostics.error(new Span(mark, pos - mark), "expected digits after the exponent 'e' of a number");
                return token(TokenKind.BAD, start);
            }
        }
        if (pos < text.length() && isNameStart(text.charAt(pos))) {
            while (pos < text.length() && isNamePart(text.charAt(pos))) {
                pos++;
            }
            diagnostics.error(new Span(start, pos - start), "expected a number, found '" + text.substring(start, pos)
                    + "'; put a space between a number and a name");
            return token(TokenKind.BAD, start);
        }
        return token(TokenKind.NUMBER, start);
    }

    private Token token(TokenKind kind, int start) {
        return new Token(kind, text.substring(start, pos), start, pos - start);
    }

    static boolean isNameStart(char c) {
        return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_';
    }

    static boolean isNamePart(char c) {
        return isNameStart(c) || isDigit(c);
    }

    static boolean isDigit(char c) {
        return c >= '0' && c <= '9';
    }
}
