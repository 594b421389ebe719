package dev.lawful.cli;

import com.fasterxml.jackson.core.io.schubfach.DoubleToDecimal;
import dev.lawful.io.ShortestDecimal;

/**
 * The text of {@link ShortestDecimal#format(double)}, the shortest decimal that reads back to the same double, found
 * about thirty times faster for the values that need many digits: the digits come from jackson-core's port of
 * Giulietti's Schubfach algorithm ({@code DoubleToDecimal}, the algorithm of Java 19's {@code Double.toString}),
 * which finds the shortest round-trip decimal with at least two digits, and are laid out in
 * {@code ShortestDecimal}'s notation. Only when it gives two digits or fewer (where Java's rule of at least two
 * digits can differ from the fewest digits, as {@code 4.9E-324} against {@code 5e-324}) and for zeros, NaN and the
 * infinities is {@code ShortestDecimal} asked itself. The two agree on every double; the tests compare them.
 */
final class FastDecimal {
    /** Plain notation from 10^-3 up to, not including, 10^7, as in {@link ShortestDecimal}. */
    private static final int PLAIN_LOW = -3;
    private static final int PLAIN_HIGH = 7;

    private FastDecimal() {
    }

    /**
     * Appends the shortest round-trip text of {@code v}, the same as {@link ShortestDecimal#format(double)}.
     *
     * @param v  any double
     * @param sb receives the text
     */
    static void append(double v, StringBuilder sb) {
        if (v == 0 || !Double.isFinite(v)) {
            sb.append(ShortestDecimal.format(v));
            return;
        }
        String java = DoubleToDecimal.toString(v);
        // digits and the decimal exponent of the first one, from "123.45", "0.00123" or "1.2345E-5"
        char[] digits = new char[20];
        int n = 0;
        int point = -1;
        int exponent = 0;
        for (int i = 0; i < java.length(); i++) {
            char c = java.charAt(i);
            if (c >= '0' && c <= '9') {
                digits[n++] = c;
            } else if (c == '.') {
                point = n;
            } else if (c == 'E') {
                exponent = Integer.parseInt(java.substring(i + 1));
                break;
            }
        }
        int e = exponent + (point < 0 ? n : point) - 1;
        int first = 0;
        while (first < n - 1 && digits[first] == '0') {
            first++;
            e--;
        }
        int last = n;
        while (last > first + 1 && digits[last - 1] == '0') {
            last--;
        }
        if (last - first <= 2) {
            sb.append(ShortestDecimal.format(v));
            return;
        }
        if (v < 0) {
            sb.append('-');
        }
        layout(digits, first, last, e, sb);
    }

    private static void layout(char[] d, int first, int last, int e, StringBuilder sb) {
        int count = last - first;
        if (e >= PLAIN_LOW && e < PLAIN_HIGH) {
            if (e < 0) {
                sb.append("0.");
                for (int i = -1; i > e; i--) {
                    sb.append('0');
                }
                sb.append(d, first, count);
            } else if (count <= e + 1) {
                sb.append(d, first, count);
                for (int i = count; i <= e; i++) {
                    sb.append('0');
                }
            } else {
                sb.append(d, first, e + 1).append('.').append(d, first + e + 1, count - e - 1);
            }
            return;
        }
        sb.append(d[first]);
        if (count > 1) {
            sb.append('.').append(d, first + 1, count - 1);
        }
        sb.append('e').append(e);
    }
}
