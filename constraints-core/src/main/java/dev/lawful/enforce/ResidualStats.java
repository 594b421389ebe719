package dev.lawful.enforce;

import java.util.Arrays;

/**
 * Three summaries of the magnitudes of one law's residuals over the samples of a batch whose residual is finite:
 * either |lhs - rhs| in the law's unit, or the relative residual |lhs - rhs| / scale (a pure number). Each is NaN
 * when no sample has a finite residual.
 *
 * @param max  the largest magnitude
 * @param mean the arithmetic mean of the magnitudes (compensated sum divided by their count)
 * @param p99  the 99th percentile by the nearest-rank method ({@link NearestRank}): the magnitude of rank ⌈0.99 n⌉
 *             among the n sorted magnitudes
 */
public record ResidualStats(double max, double mean, double p99) {
    /** The summaries of no samples: every field NaN. */
    public static final ResidualStats NONE = new ResidualStats(Double.NaN, Double.NaN, Double.NaN);

    /**
     * Summarises magnitudes.
     *
     * @param values magnitudes (each ≥ 0, none NaN) in {@code values[0 .. n-1]}; sorted ascending in place
     * @param n      how many
     * @return their summaries, or {@link #NONE} when {@code n} is 0
     */
    static ResidualStats of(double[] values, int n) {
        if (n == 0) {
            return NONE;
        }
        Arrays.sort(values, 0, n);
        // Neumaier's compensated sum, in ascending order
        double sum = 0;
        double compensation = 0;
        for (int i = 0; i < n; i++) {
            double v = values[i];
            double t = sum + v;
            compensation += Math.abs(sum) >= Math.abs(v) ? (sum - t) + v : (v - t) + sum;
            sum = t;
        }
        return new ResidualStats(values[n - 1], (sum + compensation) / n, NearestRank.of(values, n, 99));
    }
}
