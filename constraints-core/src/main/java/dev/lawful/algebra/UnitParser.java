package dev.lawful.algebra;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Parses unit text such as {@code mol/s}, {@code W m-2}, {@code J/(kg K)} or {@code kg m^2 s^-3}.
 *
 * <pre>
 * unit     = "1" | product
 * product  = factor { ( " " | "*" | "." ) factor } [ "/" factor ]
 * factor   = atom [ exponent ]
 * atom     = symbol | "(" product ")" | "1"
 * exponent = [ "^" ] [ "+" | "-" ] digits        -- m2, m-2, m^2 and m^-2 are all allowed
 * symbol   = letters, looked up in {@link UnitTable} (with an optional SI prefix)
 * </pre>
 *
 * <p>Only one {@code /} per level, followed by one factor: {@code J/kg K} is ambiguous and rejected, write
 * {@code J/(kg K)} or {@code J K/kg}. Offset units (degC, degF) are rejected with the advice to use K.
 */
final class UnitParser {
    private final Diagnostics diagnostics;
    private final String text;
    private final int end;
    private int pos;
    private final int start;
    /** The symbol exponents of the last successful {@link #parse()}. */
    private Map<String, Integer> powers = Map.of();

    /**
     * @param diagnostics receives errors, with positions in the whole source
     * @param start       first character of the unit text in the source
     * @param end         one past the last character
     */
    UnitParser(Diagnostics diagnostics, int start, int end) {
        this.diagnostics = diagnostics;
        this.text = diagnostics.source().text();
        this.start = start;
        this.end = end;
        this.pos = start;
    }

    /** @return the parsed unit, or {@link Unit#NONE} after reporting an error */
    Unit parse() {
        String written = normalise(text.substring(start, end));
        if (written.isEmpty()) {
            return Unit.NONE;
        }
        Part whole = new Part();
        int errorsBefore = errorCount();
        if (!product(whole, 0)) {
            return Unit.NONE;
        }
        skipSpaces();
        if (pos < end) {
            error(new Span(pos, 1), "expected a unit symbol, found '" + text.charAt(pos) + "' in unit '"
                    + written + "'");
            return Unit.NONE;
        }
        if (errorCount() != errorsBefore) {
            return Unit.NONE;
        }
        if (whole.dim.maxAbsExponent() > Limits.MAX_UNIT_EXPONENT) {
            error(new Span(start, end - start), "unit exponent too large in '" + written + "' (limit "
                    + Limits.MAX_UNIT_EXPONENT + ")");
            return Unit.NONE;
        }
        if (!(whole.factor > 0) || Double.isInfinite(whole.factor) || whole.factor < Double.MIN_NORMAL) {
            error(new Span(start, end - start), "unit '" + written + "' is out of the range of double");
            return Unit.NONE;
        }
        powers = whole.powers;
        return new Unit(written, whole.factor, whole.dim);
    }

    /**
     * @return each symbol as written ({@code kJ}, {@code kg}, {@code K}) with its net exponent, in the order the
     *         symbols first appear, after a successful {@link #parse()}; symbols whose exponents cancel are left out.
     *         Lets a product of declared units be written out again with repeated symbols combined.
     */
    Map<String, Integer> powers() {
        Map<String, Integer> out = new LinkedHashMap<>(powers);
        out.values().removeIf(k -> k == 0);
        return out;
    }

    /**
     * @param text unit text, such as a declaration's {@link Unit#text()}
     * @return its symbols with their net exponents (see {@link #powers()}), or null when the text does not parse
     */
    static Map<String, Integer> powersOf(String text) {
        UnitParser parser = new UnitParser(new Diagnostics(new SourceText("unit", text)), 0, text.length());
        parser.parse();
        return parser.failed() ? null : parser.powers();
    }

    /** Factor, dimension and symbol exponents of a part of the unit text, combined as the grammar says. */
    private static final class Part {
        double factor = 1.0;
        Dimension dim = Dimension.NONE;
        final Map<String, Integer> powers = new LinkedHashMap<>();

        /** Multiplies by {@code other} raised to {@code sign} (1, or -1 after a '/'). */
        void times(Part other, int sign) {
            factor = sign > 0 ? factor * other.factor : factor / other.factor;
            dim = sign > 0 ? dim.times(other.dim) : dim.over(other.dim);
            other.powers.forEach((symbol, k) -> powers.merge(symbol, sign * k, Integer::sum));
        }

        /** Raises this part to the power {@code k}. */
        void pow(int k) {
            factor = Math.pow(factor, k);
            dim = dim.pow(k);
            powers.replaceAll((symbol, e) -> e * k);
        }
    }

    private int errors;

    private int errorCount() {
        return errors;
    }

    /** @return whether {@link #parse()} reported an error */
    boolean failed() {
        return errors > 0;
    }

    private void error(Span span, String message) {
        errors++;
        diagnostics.error(span, message);
    }

    static String normalise(String s) {
        return s.trim().replaceAll("\\s+", " ");
    }

    private boolean product(Part whole, int depth) {
        if (depth > 16) {
            error(new Span(pos, 1), "unit nested too deeply (limit 16 parentheses)");
            return false;
        }
        if (!factor(whole, depth)) {
            return false;
        }
        boolean divided = false;
        while (true) {
            int save = pos;
            skipSpaces();
            if (pos >= end || text.charAt(pos) == ')') {
                pos = save;
                return true;
            }
            char c = text.charAt(pos);
            boolean divide = false;
            int opAt = pos;
            if (c == '*' || c == '.' || c == '\u00b7') {
                pos++;
            } else if (c == '/') {
                pos++;
                divide = true;
            }
            if (divided) {
                error(new Span(opAt, 1), "ambiguous unit '" + normalise(text.substring(start, end)) + "': a '/' must"
                        + " be followed by one factor only; use parentheses, as in J/(kg K), or move the factor before"
                        + " the '/', as in J K/kg");
                return false;
            }
            skipSpaces();
            Part next = new Part();
            if (!factor(next, depth)) {
                return false;
            }
            whole.times(next, divide ? -1 : 1);
            divided = divide;
        }
    }

    /** Parses one factor into {@code part}, which is empty on entry. */
    private boolean factor(Part part, int depth) {
        skipSpaces();
        if (pos >= end) {
            error(new Span(Math.min(pos, end), 0), "expected a unit symbol, found the end of the unit");
            return false;
        }
        char c = text.charAt(pos);
        if (c == '(') {
            int open = pos;
            pos++;
            if (!product(part, depth + 1)) {
                return false;
            }
            skipSpaces();
            if (pos >= end || text.charAt(pos) != ')') {
                error(new Span(open, 1), "unclosed '(' in unit");
                return false;
            }
            pos++;
        } else if (c == '1') {
            pos++;
        } else if (isSymbolChar(c)) {
            int s = pos;
            while (pos < end && isSymbolChar(text.charAt(pos))) {
                pos++;
            }
            String symbol = text.substring(s, pos);
            UnitTable.Entry e = UnitTable.lookup(symbol);
            if (e == null) {
                error(new Span(s, pos - s), unknownSymbol(symbol));
                return false;
            }
            part.factor = e.factor();
            part.dim = e.dimension();
            part.powers.put(symbol, 1);
        } else {
            error(new Span(pos, 1), "expected a unit symbol, found '" + c + "'");
            return false;
        }
        int k = exponent();
        if (k == Integer.MIN_VALUE) {
            return false;
        }
        part.pow(k);
        return true;
    }

    private static String unknownSymbol(String symbol) {
        String lower = symbol.toLowerCase(java.util.Locale.ROOT);
        if (lower.equals("degc") || lower.equals("celsius") || lower.equals("degf") || lower.equals("fahrenheit")
                || symbol.equals("\u00b0C") || symbol.equals("\u00b0F")) {
            return "unit '" + symbol + "' has an offset from zero; write temperatures in K";
        }
        String near = Names.nearest(symbol, UnitTable.symbols());
        return "unknown unit '" + symbol + "'" + (near == null ? "" : "; did you mean '" + near + "'?");
    }

    /** @return the exponent (1 when none is written), or MIN_VALUE after an error */
    private int exponent() {
        if (pos >= end) {
            return 1;
        }
        int s = pos;
        boolean caret = text.charAt(pos) == '^';
        if (caret) {
            pos++;
        }
        int sign = 1;
        if (pos < end && (text.charAt(pos) == '-' || text.charAt(pos) == '+')) {
            sign = text.charAt(pos) == '-' ? -1 : 1;
            pos++;
        }
        int digitsStart = pos;
        while (pos < end && Character.isDigit(text.charAt(pos)) && text.charAt(pos) < 128) {
            pos++;
        }
        if (pos == digitsStart) {
            if (caret || pos != s) {
                String found = pos < end ? "'" + text.charAt(pos) + "'" : "the end of the unit";
                error(new Span(pos, pos < end ? 1 : 0), "expected a whole-number exponent after '"
                        + text.substring(s, pos) + "' in unit '" + normalise(text.substring(start, end)) + "', found "
                        + found);
                return Integer.MIN_VALUE;
            }
            return 1;
        }
        if (pos < end && text.charAt(pos) == '.' && pos + 1 < end && Character.isDigit(text.charAt(pos + 1))) {
            int fracEnd = pos + 1;
            while (fracEnd < end && Character.isDigit(text.charAt(fracEnd))) {
                fracEnd++;
            }
            error(new Span(digitsStart, fracEnd - digitsStart), "unit exponents must be whole numbers, found '"
                    + text.substring(digitsStart, fracEnd) + "' in unit '" + normalise(text.substring(start, end)) + "'");
            return Integer.MIN_VALUE;
        }
        String digits = text.substring(digitsStart, pos);
        if (digits.length() > 3 || Integer.parseInt(digits) > Limits.MAX_UNIT_EXPONENT) {
            error(new Span(s, pos - s), "unit exponent too large (limit " + Limits.MAX_UNIT_EXPONENT + ")");
            return Integer.MIN_VALUE;
        }
        return sign * Integer.parseInt(digits);
    }

    private void skipSpaces() {
        while (pos < end && Character.isWhitespace(text.charAt(pos))) {
            pos++;
        }
    }

    private static boolean isSymbolChar(char c) {
        return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '\u00b5' || c == '\u03bc' || c == '\u03a9'
                || c == '\u00b0';
    }
}
