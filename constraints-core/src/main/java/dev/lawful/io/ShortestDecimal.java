package dev.lawful.io;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;

/**
 * The shortest decimal text of a double that reads back to the same double: the fewest significant digits d such
 * that {@link Double#parseDouble(String)} of the text gives exactly the original value (every bit, the sign of zero
 * included).
 *
 * <p><b>Which decimal.</b> Among all decimals that round to {@code v} under IEEE 754 round-to-nearest (the rule
 * {@code Double.parseDouble} follows), take those with the fewest significant digits; if there are two, the one
 * nearer to {@code v}; if both are equally near, the one whose last digit is even. This is the selection Java 19 and
 * later specify for {@link Double#toString(double)}, except that Java also considers 2-digit decimals when one digit
 * suffices and then prefers the nearer one ({@code 4.9E-324}); here the fewest digits always win ({@code 5e-324}).
 * Java 17's {@code Double.toString} round-trips too, but sometimes with more digits than needed: it writes
 * {@code 1e23} as {@code 9.999999999999999E22} and {@code 2.82879384806159e17} with 18 digits.
 *
 * <p><b>Layout.</b> With digits {@code d1 d2 ... dn} (no trailing zeros) and decimal exponent e, so that
 * |v| = d1.d2...dn × 10^e:
 * <ul>
 *   <li>10^-3 ≤ |v| &lt; 10^7: plain decimal notation, with no exponent and no trailing {@code .0}: {@code 0.001},
 *       {@code 0.30000000000000004}, {@code 12.5}, {@code 1500000};</li>
 *   <li>otherwise scientific notation with a lower-case {@code e}, no {@code +} and no {@code .0} after a single
 *       digit: {@code 1e23}, {@code 5e-324}, {@code 1.7976931348623157e308}, {@code 1.5e-5};</li>
 *   <li>zero as {@code 0} and negative zero as {@code -0}; NaN as {@code NaN}; the infinities as {@code Infinity} and
 *       {@code -Infinity} (the spellings {@code Double.parseDouble} reads back).</li>
 * </ul>
 *
 * <p><b>How.</b> The exact binary value ({@link BigDecimal}) is rounded down and up to p significant digits; a
 * decimal of at most p digits that reads back exists exactly when one of those two does, and if one exists for p
 * it exists for every larger p, so the shortest length is found by bisection. The length of Java's own
 * {@code Double.toString} is the first guess: when it has at most 15 digits it is already the shortest (see
 * {@code FAST_DIGITS}); when one digit fewer does not read back, that length is the shortest and only one more check
 * is needed. The exact value is truncated once to 18 digits and the candidates
 * are then found with {@code long} arithmetic. Costs a few microseconds per value; meant for writing files, not
 * for hot loops.
 */
public final class ShortestDecimal {
    /** Every double is identified by 17 significant digits. */
    private static final int MAX_DIGITS = 17;
    /**
     * Java's text is taken as it is when it has at most this many digits and the value is normal: two different
     * decimals of at most 15 significant digits are at least 10^-15 of their magnitude apart, more than the width
     * of a normal double's rounding interval (one ulp, at most 2^-52 ≈ 2.2e-16 of the value), so such a text is
     * the only decimal of at most 15 digits that reads back, hence the shortest and the nearest of its length.
     * (A subnormal's interval is far wider relative to its value: Java writes 2^-1074 as 4.9E-324, but 5e-324
     * reads back too.)
     */
    private static final int FAST_DIGITS = 15;

    private ShortestDecimal() {
    }

    /**
     * A finite positive decimal digits × 10^(exponent - digits.length() + 1), so that the value is
     * {@code d1.d2...dn × 10^exponent}.
     *
     * @param digits   the significant digits, without leading or trailing zeros (at least one digit)
     * @param exponent the decimal exponent of the first digit
     */
    record Decimal(String digits, int exponent) {
    }

    /**
     * Formats {@code v} as described in the class comment.
     *
     * @param v any double
     * @return its shortest round-trip text; {@code Double.parseDouble} of it equals {@code v} bit for bit (any NaN
     *         gives {@code NaN}, which reads back as the canonical NaN)
     */
    public static String format(double v) {
        if (Double.isNaN(v)) {
            return "NaN";
        }
        if (Double.isInfinite(v)) {
            return v > 0 ? "Infinity" : "-Infinity";
        }
        if (v == 0) {
            return 1 / v < 0 ? "-0" : "0";
        }
        Decimal d = shortest(Math.abs(v));
        StringBuilder sb = new StringBuilder(24);
        if (v < 0) {
            sb.append('-');
        }
        layout(d, sb);
        return sb.toString();
    }

    /**
     * @param a a finite positive double
     * @return its shortest round-trip decimal, as specified in the class comment
     */
    static Decimal shortest(double a) {
        String java = Double.toString(a);
        int guess = Math.min(MAX_DIGITS, significantDigits(java));
        if (guess <= FAST_DIGITS && a >= Double.MIN_NORMAL) {
            return fromJava(java);
        }
        Candidates c = new Candidates(a);
        long best;
        int bestDigits;
        if (guess <= 1 || c.nearestThatReadsBack(guess - 1) < 0) {
            // nothing shorter than Java's own length reads back (by monotonicity, nothing shorter at all)
            bestDigits = guess;
            best = c.nearestThatReadsBack(guess);
        } else {
            // bisect: no decimal of at most lo digits reads back, one of at most hi digits does
            int lo = 0;
            int hi = guess - 1;
            best = c.nearestThatReadsBack(hi);
            while (hi - lo > 1) {
                int mid = (lo + hi) >>> 1;
                long m = c.nearestThatReadsBack(mid);
                if (m < 0) {
                    lo = mid;
                } else {
                    hi = mid;
                    best = m;
                }
            }
            bestDigits = hi;
        }
        if (best < 0) {
            // cannot happen: Double.toString round-trips, and 17 digits always suffice
            throw new AssertionError("no round-trip decimal of " + bestDigits + " digits for " + a);
        }
        // best × 10^(e - 17); drop trailing zeros
        int scale = c.exponent - (Candidates.WIDTH - 1);
        while (best % 10 == 0) {
            best /= 10;
            scale++;
        }
        String digits = Long.toString(best);
        return new Decimal(digits, scale + digits.length() - 1);
    }

    /**
     * The decimals next to one double, found from its exact value truncated once to {@value #WIDTH} significant
     * digits, x = (t + δ) × 10^(e - 17) with t an integer of 18 digits and 0 ≤ δ &lt; 1. Every grid of p ≤ 17
     * significant digits is coarser than that of t, so the p-digit decimals just below and above x follow from t
     * with integer arithmetic; only telling which of the two is nearer may need the exact value, and only when
     * the answer hangs on δ.
     */
    private static final class Candidates {
        static final int WIDTH = 18;
        private static final long[] POW10 = new long[WIDTH + 1];

        static {
            POW10[0] = 1;
            for (int i = 1; i <= WIDTH; i++) {
                POW10[i] = POW10[i - 1] * 10;
            }
        }

        final double a;
        final BigDecimal exact;
        final BigDecimal truncated;
        /** t: 18 digits. */
        final long t;
        /** Decimal exponent e of the first digit. */
        final int exponent;
        /** Whether δ = 0. */
        final boolean onGrid;

        Candidates(double a) {
            this.a = a;
            this.exact = new BigDecimal(a);
            BigDecimal r = exact.round(new MathContext(WIDTH, RoundingMode.FLOOR));
            this.truncated = r;
            this.onGrid = r.compareTo(exact) == 0;
            long u = r.unscaledValue().longValueExact();
            int digits = r.precision();
            this.t = u * POW10[WIDTH - digits];
            this.exponent = digits - 1 - r.scale();
        }

        /**
         * @return of the decimals of at most {@code p} significant digits just below and just above the double,
         *         the one that reads back (the nearer if both do, the even last digit on a tie), as an integer
         *         m with value m × 10^(e - 17); or -1 when neither reads back
         */
        long nearestThatReadsBack(int p) {
            long q = POW10[WIDTH - p];
            long down = t / q * q;
            long up = onGrid && down == t ? down : down + q;
            // written with p digits (trailing zeros of the 18-digit form dropped), which parses much faster
            int shift = exponent - (WIDTH - 1) + (WIDTH - p);
            boolean downOk = readsBack(down / q, shift);
            boolean upOk = up != down && readsBack(up / q, shift);
            if (downOk && upOk) {
                // (x - down) - (up - x) = j + 2δ in units of the truncation's last place
                long j = 2 * t - down - up;
                int sign;
                if (onGrid || j >= 0 || j <= -2) {
                    sign = Long.signum(j) != 0 ? Long.signum(j) : (onGrid ? 0 : 1);
                } else {
                    // j = -1: the sign of 2δ - 1, from the exact value
                    BigDecimal lastPlace = BigDecimal.ONE.scaleByPowerOfTen(exponent - (WIDTH - 1));
                    sign = exact.subtract(truncated).multiply(BigDecimal.valueOf(2)).compareTo(lastPlace);
                }
                if (sign != 0) {
                    return sign < 0 ? down : up;
                }
                return (down / q) % 2 == 0 ? down : up;
            }
            return downOk ? down : upOk ? up : -1;
        }

        /** @return whether m × 10^shift reads back to the double */
        private boolean readsBack(long m, int shift) {
            return Double.parseDouble(m + "e" + shift) == a;
        }
    }

    /**
     * @param javaText the text of {@link Double#toString(double)} for a finite positive double ({@code 123.45},
     *                 {@code 0.0012}, {@code 1.0E-5}, {@code 9.999999999999999E22})
     * @return its digits without leading or trailing zeros, and the decimal exponent of the first of them
     */
    static Decimal fromJava(String javaText) {
        int e = javaText.indexOf('E');
        String mantissa = e < 0 ? javaText : javaText.substring(0, e);
        int exponent = e < 0 ? 0 : Integer.parseInt(javaText.substring(e + 1));
        int point = mantissa.indexOf('.');
        String all = point < 0 ? mantissa : mantissa.substring(0, point) + mantissa.substring(point + 1);
        int intDigits = point < 0 ? mantissa.length() : point;
        int first = 0;
        while (first < all.length() - 1 && all.charAt(first) == '0') {
            first++;
        }
        int last = all.length();
        while (last > first + 1 && all.charAt(last - 1) == '0') {
            last--;
        }
        return new Decimal(all.substring(first, last), exponent + intDigits - 1 - first);
    }

    /**
     * @param javaText the text of {@link Double#toString(double)} for a finite positive double
     * @return how many significant digits it has, leading and trailing zeros not counted (at least 1)
     */
    static int significantDigits(String javaText) {
        int end = javaText.indexOf('E');
        if (end < 0) {
            end = javaText.length();
        }
        int first = -1;
        int last = -1;
        int count = 0;
        for (int i = 0; i < end; i++) {
            char c = javaText.charAt(i);
            if (c < '0' || c > '9') {
                continue;
            }
            if (c != '0') {
                if (first < 0) {
                    first = count;
                }
                last = count;
            }
            count++;
        }
        return first < 0 ? 1 : last - first + 1;
    }

    /** Appends the digits in plain or scientific notation, as the class comment describes. */
    static void layout(Decimal d, StringBuilder sb) {
        String digits = d.digits();
        int e = d.exponent();
        int n = digits.length();
        if (e >= -3 && e < 7) {
            if (e < 0) {
                sb.append("0.");
                for (int i = -1; i > e; i--) {
                    sb.append('0');
                }
                sb.append(digits);
            } else if (n <= e + 1) {
                sb.append(digits);
                for (int i = n; i <= e; i++) {
                    sb.append('0');
                }
            } else {
                sb.append(digits, 0, e + 1).append('.').append(digits, e + 1, n);
            }
        } else {
            sb.append(digits.charAt(0));
            if (n > 1) {
                sb.append('.').append(digits, 1, n);
            }
            sb.append('e').append(e);
        }
    }
}
