package dev.lawful.enforce;

import java.util.Objects;

/**
 * The fixed bins in which a {@link ResidualReport} counts relative residuals, one decade each on a log10 scale:
 *
 * <pre>
 * bin  0: exactly 0
 * bin  1: (0, 1e-16]
 * bin  2: (1e-16, 1e-15]
 *   ...
 * bin 16: (1e-2, 1e-1]
 * bin 17: (1e-1, 1]
 * bin 18: greater than 1, infinity included
 * </pre>
 *
 * Bin 1 holds (0, 1e-16] and bin k for 2 ≤ k ≤ 17 holds (10^(k-18), 10^(k-17)], each edge being the double
 * nearest to that power of ten (the value of the literal {@code 1e-16}); bins are closed above, so a relative
 * residual of exactly {@code 1e-15} falls in bin 2. One rounding of a double is at most 2^-53 ≈ 1.1e-16 of the
 * value, so a law that holds to a few double roundings shows in bins 0 to 2; a float32 rounding (2^-24 ≈ 6e-8)
 * shows in bin 10, (1e-8, 1e-7].
 */
public final class ResidualHistogram {
    /** Number of bins. */
    public static final int BINS = 19;

    /** Upper edge of bins 0 .. 17; bin 18 has none. */
    private static final double[] UPPER = {0, 1e-16, 1e-15, 1e-14, 1e-13, 1e-12, 1e-11, 1e-10, 1e-9, 1e-8, 1e-7,
        1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 1e-1, 1};
    private static final String[] EXPONENT_TEXT = {"0", "1e-16", "1e-15", "1e-14", "1e-13", "1e-12", "1e-11", "1e-10",
        "1e-9", "1e-8", "1e-7", "1e-6", "1e-5", "1e-4", "1e-3", "0.01", "0.1", "1"};

    /**
     * Per biased binary exponent e (the top bits of a non-negative double): the bin of the smallest value with that
     * exponent, and the one edge inside its binade, above which a value is in the next bin (a binade [2<sup>k</sup>,
     * 2<sup>k+1</sup>) is narrower than a decade, so it holds at most one edge; +∞ when it holds none). Exponent 0
     * (zero and the subnormals) has bin 0 and edge 0, so zero is bin 0 and a subnormal bin 1. A value's bin is then
     * one look-up and one comparison, without the branches of a search, which a processor mispredicts when
     * residuals straddle an edge.
     */
    private static final int[] BASE = new int[0x800];
    private static final double[] EDGE = new double[0x800];

    static {
        for (int e = 1; e < 0x7FF; e++) {
            double low = Double.longBitsToDouble((long) e << 52);
            double high = Double.longBitsToDouble((long) (e + 1) << 52);
            BASE[e] = search(low);
            EDGE[e] = BASE[e] < UPPER.length && UPPER[BASE[e]] < high ? UPPER[BASE[e]] : Double.POSITIVE_INFINITY;
        }
        BASE[0x7FF] = BINS - 1;
        EDGE[0x7FF] = Double.POSITIVE_INFINITY;
    }

    private ResidualHistogram() {
    }

    /**
     * @param relative a relative residual: zero, positive, or positive infinity
     * @return its bin, 0 .. {@value #BINS} - 1
     * @throws IllegalArgumentException when {@code relative} is negative or NaN
     */
    public static int bin(double relative) {
        if (!(relative >= 0)) {
            throw new IllegalArgumentException("a relative residual is >= 0, found " + relative);
        }
        int e = (int) ((Double.doubleToRawLongBits(relative) & Long.MAX_VALUE) >>> 52);
        return BASE[e] + (relative > EDGE[e] ? 1 : 0);
    }

    /** The bin of a value > 0 by binary search over the edges, for the tables of {@link #bin}. */
    private static int search(double relative) {
        int lo = 1;
        int hi = UPPER.length;
        // the first edge >= relative; UPPER.length when there is none
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            if (UPPER[mid] >= relative) {
                hi = mid;
            } else {
                lo = mid + 1;
            }
        }
        return lo;
    }

    /**
     * @param bin a bin
     * @return its upper edge ({@code 0} for bin 0, {@code 1e-16} for bin 1 ...), positive infinity for the last bin
     * @throws IndexOutOfBoundsException when there is no such bin
     */
    public static double upperEdge(int bin) {
        Objects.checkIndex(bin, BINS);
        return bin < UPPER.length ? UPPER[bin] : Double.POSITIVE_INFINITY;
    }

    /**
     * @param bin a bin
     * @return its interval as text: {@code 0}, {@code (0, 1e-16]}, {@code (1e-16, 1e-15]}, ..., {@code (0.1, 1]},
     *         {@code > 1}
     * @throws IndexOutOfBoundsException when there is no such bin
     */
    public static String label(int bin) {
        Objects.checkIndex(bin, BINS);
        if (bin == 0) {
            return "0";
        }
        if (bin == BINS - 1) {
            return "> 1";
        }
        return "(" + EXPONENT_TEXT[bin - 1] + ", " + EXPONENT_TEXT[bin] + "]";
    }

    /**
     * @param bin a bin
     * @return a short heading for a table column: {@code 0}, {@code <=1e-16}, ..., {@code <=1}, {@code >1}
     * @throws IndexOutOfBoundsException when there is no such bin
     */
    public static String heading(int bin) {
        Objects.checkIndex(bin, BINS);
        if (bin == 0) {
            return "0";
        }
        return bin == BINS - 1 ? ">1" : "<=" + EXPONENT_TEXT[bin];
    }
}
