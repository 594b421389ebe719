package dev.lawful.cli;

import ch.randelshofer.fastdoubleparser.JavaDoubleParser;
import java.nio.charset.StandardCharsets;

/**
 * Splits one line of a CSV file into its values, one at a time, and parses a value as a number, on the line's bytes
 * (no {@code String} per value): the splitter of {@link CsvSource}. Values are separated by the separator; white
 * space around a value is dropped (a tab too, unless it is the separator); a value may be quoted with {@code "},
 * {@code ""} standing for one quote, and ends on its line. A number is decimal ({@code 12}, {@code -0.5},
 * {@code .5}, {@code 1.}, {@code 6.02e23}) or, ignoring case, {@code NaN}, {@code Inf} or {@code Infinity} with an
 * optional sign; the decimal forms are checked here and parsed by FastDoubleParser, which gives the nearest double
 * as {@code Double.parseDouble} does.
 */
final class CsvFields {
    /** Longest piece of a bad value quoted in a message. */
    private static final int QUOTE_LIMIT = 40;

    private final byte[] b;
    private final int to;
    private final byte separator;
    private int pos;
    private boolean done;
    private int from;
    private int until;
    private String quoted;

    CsvFields(byte[] b, int from, int to, byte separator) {
        this.b = b;
        this.pos = from;
        this.to = to;
        this.separator = separator;
    }

    /**
     * Moves to the next value; false after the last.
     *
     * @throws DataException naming {@code file} and {@code line} when a quote is not closed or text follows it
     */
    boolean nextAt(String file, long line) {
        try {
            return next();
        } catch (DataException e) {
            throw DataException.at(file, "line " + line, null, e.getMessage());
        }
    }

    private boolean next() {
        if (done) {
            return false;
        }
        int j = pos;
        while (j < to && (b[j] == ' ' || b[j] == '\t' && separator != '\t')) {
            j++;
        }
        quoted = null;
        if (j < to && b[j] == '"') {
            return nextQuoted(j);
        }
        int e = j;
        while (e < to && b[e] != separator) {
            e++;
        }
        int t = e;
        while (t > j && (b[t - 1] == ' ' || b[t - 1] == '\t' && separator != '\t')) {
            t--;
        }
        from = j;
        until = t;
        done = e >= to;
        pos = e + 1;
        return true;
    }

    private boolean nextQuoted(int j) {
        java.io.ByteArrayOutputStream sb = new java.io.ByteArrayOutputStream();
        int k = j + 1;
        while (true) {
            if (k >= to) {
                throw new DataException("a value opens a quote that is not closed on this line");
            }
            if (b[k] == '"') {
                if (k + 1 < to && b[k + 1] == '"') {
                    sb.write('"');
                    k += 2;
                    continue;
                }
                k++;
                break;
            }
            sb.write(b[k++]);
        }
        while (k < to && (b[k] == ' ' || b[k] == '\t' && separator != '\t')) {
            k++;
        }
        if (k < to && b[k] != separator) {
            throw new DataException("a value has text after its closing quote; expected a separator or the end"
                    + " of the line");
        }
        quoted = sb.toString(StandardCharsets.UTF_8);
        done = k >= to;
        pos = k + 1;
        return true;
    }

    /** @return the current value as text */
    String text() {
        return quoted != null ? quoted : new String(b, from, until - from, StandardCharsets.UTF_8);
    }

    /** @return the current value as text, shortened for a message */
    String shown() {
        String s = text();
        return s.length() > QUOTE_LIMIT ? s.substring(0, QUOTE_LIMIT) + "..." : s;
    }

    /**
     * @return the current value as a number
     * @throws DataException (message without the place) when it is not one of the accepted forms
     */
    double number() {
        if (quoted != null) {
            byte[] q = quoted.getBytes(StandardCharsets.UTF_8);
            return parse(q, 0, q.length);
        }
        return parse(b, from, until);
    }

    private double parse(byte[] s, int i0, int n) {
        if (n == i0) {
            throw new DataException("the value is empty; expected a number");
        }
        int i = i0;
        boolean negative = s[i] == '-';
        if (s[i] == '+' || s[i] == '-') {
            i++;
        }
        int special = special(s, i, n);
        if (special != 0) {
            return special == 1 ? Double.NaN : negative ? Double.NEGATIVE_INFINITY : Double.POSITIVE_INFINITY;
        }
        if (!decimal(s, i, n)) {
            String text = new String(s, i0, n - i0, StandardCharsets.UTF_8);
            String shownText = text.length() > QUOTE_LIMIT ? text.substring(0, QUOTE_LIMIT) + "..." : text;
            throw new DataException("'" + shownText + "' is not a number"
                    + (text.matches("[+-]?[0-9]*,[0-9]+") ? " (a decimal comma? write numbers with a decimal"
                    + " point)" : ""));
        }
        return JavaDoubleParser.parseDouble(s, i0, n - i0);
    }

    /** @return 1 for NaN, 2 for Inf or Infinity (any case), 0 otherwise */
    private static int special(byte[] s, int i, int n) {
        int len = n - i;
        if (len != 3 && len != 8) {
            return 0;
        }
        String t = new String(s, i, len, StandardCharsets.ISO_8859_1).toLowerCase(java.util.Locale.ROOT);
        return t.equals("nan") ? 1 : t.equals("inf") || t.equals("infinity") ? 2 : 0;
    }

    /** @return whether s[i, n) is digits, an optional point and digits (one digit at least), an exponent */
    private static boolean decimal(byte[] s, int i, int n) {
        int digits = 0;
        while (i < n && s[i] >= '0' && s[i] <= '9') {
            i++;
            digits++;
        }
        if (i < n && s[i] == '.') {
            i++;
            while (i < n && s[i] >= '0' && s[i] <= '9') {
                i++;
                digits++;
            }
        }
        if (digits == 0) {
            return false;
        }
        if (i < n && (s[i] == 'e' || s[i] == 'E')) {
            i++;
            if (i < n && (s[i] == '+' || s[i] == '-')) {
                i++;
            }
            int exponent = 0;
            while (i < n && s[i] >= '0' && s[i] <= '9') {
                i++;
                exponent++;
            }
            if (exponent == 0) {
                return false;
            }
        }
        return i == n;
    }
}
