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
 * <p><b>How.</b> The exact binary value is rounded down and up to p significant digits ({@link BigDecimal}); a
 * p-digit decimal that reads back exists exactly when one of those two does, and if one exists for p it exists
 * for every larger p, so the shortest length is found by bisection. The length of Java's own
 * {@code Double.toString} is the first guess: when one digit fewer does not read back, that length is already the
 * shortest and only one more check is needed. Costs a few microseconds per value; meant for writing files, not for
 * hot loops.
 */
public final class ShortestDecimal {
    /** Every double is identified by 17 significant digits. */
    private static final int MAX_DIGITS = 17;

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
        BigDecimal exact = new BigDecimal(a);
        int guess = significantDigits(Double.toString(a));
        BigDecimal best;
        if (guess <= 1) {
            best = nearestThatReadsBack(exact, a, 1);
        } else {
            BigDecimal fewer = nearestThatReadsBack(exact, a, guess - 1);
            if (fewer == null) {
                best = nearestThatReadsBack(exact, a, guess);
            } else {
                // bisect: no decimal of at most lo digits reads back, one of at most hi digits does
                int lo = 0;
                int hi = guess - 1;
                best = fewer;
                while (hi - lo > 1) {
                    int mid = (lo + hi) >>> 1;
                    BigDecimal c = nearestThatReadsBack(exact, a, mid);
                    if (c == null) {
                        lo = mid;
                    } else {
                        hi = mid;
                        best = c;
                    }
                }
            }
        }
        if (best == null) {
            // cannot happen: Double.toString round-trips, and 17 digits always suffice
            best = nearestThatReadsBack(exact, a, MAX_DIGITS);
        }
        best = best.stripTrailingZeros();
        String digits = best.unscaledValue().toString();
        return new Decimal(digits, digits.length() - 1 - best.scale());
    }

    /**
     * @return of the two decimals of at most {@code p} significant digits next to {@code exact} (rounded down and
     *         up), the one that reads back to {@code a}, the nearer if both do (the even last digit on a tie), or
     *         null when neither does
     */
    private static BigDecimal nearestThatReadsBack(BigDecimal exact, double a, int p) {
        BigDecimal down = exact.round(new MathContext(p, RoundingMode.FLOOR));
        BigDecimal up = exact.round(new MathContext(p, RoundingMode.CEILING));
        boolean downOk = readsBack(down, a);
        boolean upOk = readsBack(up, a);
        if (downOk && upOk) {
            int c = exact.subtract(down).compareTo(up.subtract(exact));
            if (c != 0) {
                return c < 0 ? down : up;
            }
            return down.unscaledValue().testBit(0) ? up : down;
        }
        return downOk ? down : upOk ? up : null;
    }

    private static boolean readsBack(BigDecimal d, double a) {
        return Double.parseDouble(d.toString()) == a;
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
