package dev.lawful.algebra;

/**
 * The parser's reading of number tokens: finite doubles, whole numbers and indices within the vector length limit.
 * Each reports a bad token to the diagnostics and abandons the statement, as the parser's rules do.
 */
final class Literals {
    private final Diagnostics diagnostics;

    Literals(Diagnostics diagnostics) {
        this.diagnostics = diagnostics;
    }

    double number(Token t) {
        double v;
        try {
            v = Double.parseDouble(t.text());
        } catch (NumberFormatException e) {
            diagnostics.error(t.span(), "expected a number, found '" + t.text() + "'");
            throw new Parser.Abandon();
        }
        if (!Double.isFinite(v)) {
            diagnostics.error(t.span(), "number " + t.text() + " is out of the range of double (about 1.8e308)");
            throw new Parser.Abandon();
        }
        return v;
    }

    int integer(Token t) {
        String s = t.text();
        for (int i = 0; i < s.length(); i++) {
            if (!Scanner.isDigit(s.charAt(i))) {
                diagnostics.error(t.span(), "expected a whole number, found " + s);
                throw new Parser.Abandon();
            }
        }
        if (s.length() > 9) {
            return Integer.MAX_VALUE;
        }
        return Integer.parseInt(s);
    }

    int index(Token t) {
        int i = integer(t);
        if (i > Limits.MAX_VECTOR_LENGTH) {
            diagnostics.error(t.span(), "index " + t.text() + " is beyond the vector length limit of "
                    + Limits.MAX_VECTOR_LENGTH);
            throw new Parser.Abandon();
        }
        return i;
    }
}
