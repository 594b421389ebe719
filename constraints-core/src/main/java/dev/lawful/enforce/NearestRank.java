package dev.lawful.enforce;

/**
 * Percentiles by the nearest-rank method: the p-th percentile of n values sorted ascending, v_1 ≤ ... ≤ v_n, is
 * v_k with rank k = ⌈p·n/100⌉ (1-based), and v_1 for p = 0. It is always one of the values (never interpolated),
 * so the 99th percentile of a residual is a residual that some sample really has: at least 99 % of the samples
 * are at or below it, and fewer than 1 % above. This is the estimate Apache Commons Math calls {@code R_1} (the
 * inverse of the empirical distribution function, Hyndman and Fan's definition 1).
 */
public final class NearestRank {
    private NearestRank() {
    }

    /**
     * @param sorted  values sorted ascending in {@code sorted[0 .. n-1]}, none NaN (not modified)
     * @param n       how many values, at least 1
     * @param percent p, from 0 to 100
     * @return the value of rank ⌈p·n/100⌉ (the smallest value for p = 0)
     * @throws IllegalArgumentException when {@code n} is not in 1 .. {@code sorted.length} or {@code percent} is not
     *                                  in [0, 100]
     */
    public static double of(double[] sorted, int n, double percent) {
        return sorted[index(n, percent)];
    }

    /**
     * @param n       how many values, at least 1
     * @param percent p, from 0 to 100
     * @return the 0-based index of the nearest-rank p-th percentile among n sorted values: ⌈p·n/100⌉ - 1, at least 0
     * @throws IllegalArgumentException when {@code n < 1} or {@code percent} is not in [0, 100]
     */
    public static int index(int n, double percent) {
        return (int) rank(n, percent) - 1;
    }

    /**
     * @param n       how many values, at least 1 (below 2<sup>46</sup>, so that p·n is exact for a whole-number p)
     * @param percent p, from 0 to 100
     * @return the 1-based nearest rank of the p-th percentile among n sorted values: ⌈p·n/100⌉, at least 1
     * @throws IllegalArgumentException when {@code n < 1} or {@code percent} is not in [0, 100]
     */
    public static long rank(long n, double percent) {
        if (n < 1) {
            throw new IllegalArgumentException("a percentile needs at least one value, found " + n);
        }
        if (!(percent >= 0 && percent <= 100)) {
            throw new IllegalArgumentException("a percentile must be from 0 to 100, found " + percent);
        }
        // for a whole-number p, p·n is exact and p·n/100 is at least 0.01 from any integer it is not equal to, far
        // more than its rounding error, so the ceiling is the exact rank
        double rank = Math.ceil(percent * n / 100);
        return (long) Math.max(1, Math.min(n, rank));
    }
}
