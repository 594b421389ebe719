package dev.lawful.algebra;

/** The kinds of token of the law language. */
public enum TokenKind {
    IDENT("name"), NUMBER("number"),
    PLUS("'+'"), MINUS("'-'"), STAR("'*'"), SLASH("'/'"), CARET("'^'"),
    LPAREN("'('"), RPAREN("')'"), LBRACKET("'['"), RBRACKET("']'"),
    COMMA("','"), COLON("':'"), EQUALS("'='"), DOT("'.'"),
    /** {@code <=} and {@code >=}, the relations of a limit */
    LESS_EQUAL("'<='"), GREATER_EQUAL("'>='"),
    NEWLINE("end of line"), EOF("end of file"), ERROR("invalid character"),
    /** a malformed token whose error the scanner has already reported */
    BAD("malformed token");

    private final String description;

    TokenKind(String description) {
        this.description = description;
    }

    /** @return how the kind is named in diagnostics */
    public String description() {
        return description;
    }
}
