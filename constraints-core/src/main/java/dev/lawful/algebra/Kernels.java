package dev.lawful.algebra;

/** Scalar arithmetic shared by the reference evaluation and the compiled evaluator, so both agree to the bit. */
final class Kernels {
    private Kernels() {
    }

    /**
     * Neumaier's compensated sum of {@code a[0..n)} in order: the rounding error of each addition is carried in a
     * correction term, so the result is accurate to about one ulp of the largest term whatever the cancellation.
     */
    static double neumaier(double[] a, int n) {
        double s = 0;
        double c = 0;
        for (int i = 0; i < n; i++) {
            double v = a[i];
            double t = s + v;
            if (Math.abs(s) >= Math.abs(v)) {
                c += (s - t) + v;
            } else {
                c += (v - t) + s;
            }
            s = t;
        }
        return s + c;
    }

    /** Power with exact small integer exponents: x^2 is x*x, otherwise {@link StrictMath#pow}. */
    static double pow(double x, double y) {
        if (y == 2) {
            return x * x;
        }
        return StrictMath.pow(x, y);
    }
}
