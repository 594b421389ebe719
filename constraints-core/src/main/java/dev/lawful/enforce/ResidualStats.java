package dev.lawful.enforce;

/**
 * Three summaries of the magnitudes of one law's residuals over the samples of a batch whose residual is finite:
 * either |lhs - rhs| in the law's unit, or the relative residual |lhs - rhs| / scale (a pure number). Each is NaN
 * when no sample has a finite residual.
 *
 * @param max  the largest magnitude
 * @param mean the arithmetic mean of the magnitudes: their exact sum divided by their count, rounded once
 *             ({@link ExactSum})
 * @param p99  the 99th percentile by the nearest-rank method ({@link NearestRank}): the magnitude of rank ⌈0.99 n⌉
 *             among the n sorted magnitudes, exactly up to {@value PercentileSketch#EXACT_LIMIT} magnitudes and
 *             beyond that from log-spaced buckets, at most 2<sup>-10</sup> of itself above ({@link PercentileSketch})
 */
public record ResidualStats(double max, double mean, double p99) {
    /** The summaries of no samples: every field NaN. */
    public static final ResidualStats NONE = new ResidualStats(Double.NaN, Double.NaN, Double.NaN);
}
