package dev.lawful.enforce.linear;

/**
 * LU factorisation with partial pivoting of small dense n×n systems held in caller-owned arrays, so a per-sample
 * solve allocates nothing. Matrices are row-major {@code a[i*n + j]}.
 */
public final class DenseLu {
    private DenseLu() {
    }

    /**
     * Factors {@code a} in place (unit lower and upper triangle) and records the row permutation.
     *
     * @param a     n×n row-major, overwritten by the factors
     * @param n     order
     * @param pivot n entries, overwritten by the pivot rows
     * @return false when a pivot is below {@code 1e-14} times the largest entry of the matrix (singular to working
     *         precision), true otherwise
     */
    public static boolean factor(double[] a, int n, int[] pivot) {
        return factor(a, n, pivot, 0, 0);
    }

    /** {@link #factor(double[], int, int[])} on the matrix at {@code a[ao..]} with pivots at {@code pivot[po..]}. */
    public static boolean factor(double[] a, int n, int[] pivot, int ao, int po) {
        double largest = 0;
        for (int i = 0; i < n * n; i++) {
            largest = Math.max(largest, Math.abs(a[ao + i]));
        }
        if (!(largest > 0) || !Double.isFinite(largest)) {
            return false;
        }
        double tiny = 1e-14 * largest;
        for (int k = 0; k < n; k++) {
            int p = k;
            double best = Math.abs(a[ao + k * n + k]);
            for (int i = k + 1; i < n; i++) {
                double v = Math.abs(a[ao + i * n + k]);
                if (v > best) {
                    best = v;
                    p = i;
                }
            }
            pivot[po + k] = p;
            if (best <= tiny) {
                return false;
            }
            if (p != k) {
                for (int j = 0; j < n; j++) {
                    double t = a[ao + k * n + j];
                    a[ao + k * n + j] = a[ao + p * n + j];
                    a[ao + p * n + j] = t;
                }
            }
            double d = a[ao + k * n + k];
            for (int i = k + 1; i < n; i++) {
                double f = a[ao + i * n + k] / d;
                a[ao + i * n + k] = f;
                if (f != 0) {
                    for (int j = k + 1; j < n; j++) {
                        a[ao + i * n + j] -= f * a[ao + k * n + j];
                    }
                }
            }
        }
        return true;
    }

    /** Solves A x = b in place ({@code b} becomes x) with the factors from {@link #factor}. */
    public static void solve(double[] lu, int n, int[] pivot, double[] b, int offset) {
        solve(lu, n, pivot, b, offset, 0, 0);
    }

    /** Solves with the factors at {@code lu[lo..]} and pivots at {@code pivot[po..]}. */
    public static void solve(double[] lu, int n, int[] pivot, double[] b, int offset, int lo, int po) {
        for (int k = 0; k < n; k++) {
            int p = pivot[po + k];
            if (p != k) {
                double t = b[offset + k];
                b[offset + k] = b[offset + p];
                b[offset + p] = t;
            }
        }
        for (int i = 1; i < n; i++) {
            double s = b[offset + i];
            for (int j = 0; j < i; j++) {
                s -= lu[lo + i * n + j] * b[offset + j];
            }
            b[offset + i] = s;
        }
        for (int i = n - 1; i >= 0; i--) {
            double s = b[offset + i];
            for (int j = i + 1; j < n; j++) {
                s -= lu[lo + i * n + j] * b[offset + j];
            }
            b[offset + i] = s / lu[lo + i * n + i];
        }
    }

    /** Solves Aᵀ x = b in place with the factors of A from {@link #factor}. */
    public static void solveTransposed(double[] lu, int n, int[] pivot, double[] b, int offset) {
        solveTransposed(lu, n, pivot, b, offset, 0, 0);
    }

    /** Solves Aᵀ x = b with the factors at {@code lu[lo..]} and pivots at {@code pivot[po..]}. */
    public static void solveTransposed(double[] lu, int n, int[] pivot, double[] b, int offset, int lo, int po) {
        // P A = L U, so Aᵀ x = b is Uᵀ Lᵀ P x = b: forward with Uᵀ, back with Lᵀ, then undo the row swaps
        for (int i = 0; i < n; i++) {
            double s = b[offset + i];
            for (int j = 0; j < i; j++) {
                s -= lu[lo + j * n + i] * b[offset + j];
            }
            b[offset + i] = s / lu[lo + i * n + i];
        }
        for (int i = n - 1; i >= 0; i--) {
            double s = b[offset + i];
            for (int j = i + 1; j < n; j++) {
                s -= lu[lo + j * n + i] * b[offset + j];
            }
            b[offset + i] = s;
        }
        for (int k = n - 1; k >= 0; k--) {
            int p = pivot[po + k];
            if (p != k) {
                double t = b[offset + k];
                b[offset + k] = b[offset + p];
                b[offset + p] = t;
            }
        }
    }
}
