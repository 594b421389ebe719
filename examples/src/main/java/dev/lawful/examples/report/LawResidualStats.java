package dev.lawful.examples.report;

/**
 * One network's residuals of one law over the test rows, as magnitudes |r| = |lhs − rhs| in the law's SI unit.
 *
 * @param law       the law's name
 * @param unit      the law's SI unit ({@code ""} for a pure number)
 * @param samples   the number of test rows n
 * @param max       the largest |r|
 * @param mean      the mean |r|
 * @param p99       the nearest-rank 99th percentile of |r| ({@link Metrics#percentile}): the |r| of rank ⌈0.99 n⌉
 * @param zeros     how many rows have r exactly 0 (shown in a bin of their own on the log-scale plots)
 * @param mark      the law's mark, the residual size that matters to a user
 * @param aboveMark how many rows have |r| &gt; {@code mark}
 */
public record LawResidualStats(String law, String unit, int samples, double max, double mean, double p99, int zeros,
                               double mark, int aboveMark) {
}
