package dev.lawful.algebra;

/** Scalar arithmetic shared by the reference evaluation and the compiled evaluator, so both agree to the bit. */
final class Kernels {
    private Kernels() {
    }

    /**
     * Compensated sum of {@code a[0..n)} in order (Neumaier's scheme): the exact rounding error of each addition
     * is carried in a correction term added at the end, so the result is accurate to about one ulp of the
     * largest term whatever the cancellation. The error term is computed with Knuth's branch-free TwoSum, which
     * gives the same exact error as Neumaier's branch on |s| >= |v| without an unpredictable branch per term.
     */
    static double neumaier(double[] a, int n) {
        if (n == 0) {
            return 0;
        }
        double s = a[0];
        double c = 0;
        for (int i = 1; i < n; i++) {
            double v = a[i];
            double t = s + v;
            double z = t - s;
            c += (s - (t - z)) + (v - z);
            s = t;
        }
        // an infinite sum makes the error term NaN (∞ − ∞); the plain sum is then the right answer
        return Double.isFinite(s) ? s + c : s;
    }

    /** Largest integer exponent evaluated by repeated multiplication rather than {@link StrictMath#pow}. */
    static final int MAX_INTEGER_POWER = 16;

    /**
     * Power: whole exponents up to {@value #MAX_INTEGER_POWER} in magnitude by binary exponentiation (x^2 is
     * exactly x*x, and no call to pow costs tens of nanoseconds), otherwise {@link StrictMath#pow}.
     */
    static double pow(double x, double y) {
        if (y == Math.rint(y) && Math.abs(y) <= MAX_INTEGER_POWER) {
            return powi(x, (int) y);
        }
        return StrictMath.pow(x, y);
    }

    /** x^n by binary exponentiation; a negative n gives 1 / x^|n|. */
    static double powi(double x, int n) {
        int k = Math.abs(n);
        double result = 1.0;
        double base = x;
        while (k > 0) {
            if ((k & 1) != 0) {
                result *= base;
            }
            k >>= 1;
            if (k > 0) {
                base *= base;
            }
        }
        return n < 0 ? 1.0 / result : result;
    }
}
