package dev.lawful.examples.report;

import java.util.Locale;

/**
 * How the table writes numbers. Files ({@code report.json}, the CSV files) hold the full doubles; the table rounds.
 */
final class Figures {
    /** Significant digits of {@link #of(double)}. */
    static final int DIGITS = 3;
    /** Most decimals {@link #rSquared(double)} writes. */
    static final int MAX_DECIMALS = 12;

    private Figures() {
    }

    /**
     * @param v a number
     * @return {@code v} to three significant digits, trailing zeros kept: plain for 10^-4 ≤ |v| &lt; 1000
     *         ({@code 0.500}, {@code 12.3}, {@code 0.000123}), else scientific with a short exponent
     *         ({@code 1.23e4}, {@code 4.50e-16}), which is {@code String.format("%.3g")} with the exponent's
     *         {@code +} and leading zeros dropped; {@code 0} for either zero, {@code n/a} for NaN, {@code inf} and
     *         {@code -inf} for the infinities
     */
    static String of(double v) {
        if (Double.isNaN(v)) {
            return "n/a";
        }
        if (Double.isInfinite(v)) {
            return v > 0 ? "inf" : "-inf";
        }
        if (v == 0) {
            return "0";
        }
        String s = String.format(Locale.ROOT, "%." + DIGITS + "g", v);
        int e = s.indexOf('e');
        if (e < 0) {
            return s;
        }
        int exponent = Integer.parseInt(s.substring(e + 1).replace("+", ""));
        return s.substring(0, e) + "e" + exponent;
    }

    /**
     * @param v an R² value
     * @return for |v| &lt; 10, fixed decimals: four ({@code 0.9987}, {@code -0.2500}), or more when v is closer to 1,
     *         enough to show two significant digits of 1 − v ({@code 0.999987}), at most {@value #MAX_DECIMALS};
     *         because three significant digits would show every good fit as {@code 1.00}; {@link #of(double)}
     *         otherwise; {@code n/a} for NaN
     */
    static String rSquared(double v) {
        if (Double.isFinite(v) && Math.abs(v) < 10) {
            int decimals = 4;
            if (v < 1 && v > 0.999) {
                decimals = (int) Math.min(MAX_DECIMALS, Math.max(4, 1 - Math.floor(Math.log10(1 - v))));
            }
            return String.format(Locale.ROOT, "%." + decimals + "f", v);
        }
        return of(v);
    }
}
