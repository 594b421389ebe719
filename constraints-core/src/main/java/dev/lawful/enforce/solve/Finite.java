package dev.lawful.enforce.solve;

/** The finiteness test of the hot paths. */
final class Finite {
    private Finite() {
    }

    /** @return whether {@code a[from .. from+count)} are all finite (no NaN, no infinity) */
    static boolean finite(double[] a, int from, int count) {
        return probe(a, from, count) == 0;
    }

    /**
     * @return +0.0 when {@code a[from .. from+count)} are all finite, NaN otherwise: added to a sum, it makes the
     *         sum NaN exactly when one of those values is not finite and leaves it unchanged otherwise (but for
     *         the sign of a zero sum)
     */
    static double probe(double[] a, int from, int count) {
        // v·0 is ±0 for a finite v and NaN otherwise; eight running sums so the additions overlap
        double p0 = 0;
        double p1 = 0;
        double p2 = 0;
        double p3 = 0;
        double p4 = 0;
        double p5 = 0;
        double p6 = 0;
        double p7 = 0;
        int i = 0;
        for (; i + 8 <= count; i += 8) {
            int k = from + i;
            p0 += a[k] * 0.0;
            p1 += a[k + 1] * 0.0;
            p2 += a[k + 2] * 0.0;
            p3 += a[k + 3] * 0.0;
            p4 += a[k + 4] * 0.0;
            p5 += a[k + 5] * 0.0;
            p6 += a[k + 6] * 0.0;
            p7 += a[k + 7] * 0.0;
        }
        for (; i < count; i++) {
            p0 += a[from + i] * 0.0;
        }
        return (p0 + p1) + (p2 + p3) + (p4 + p5) + (p6 + p7);
    }
}
