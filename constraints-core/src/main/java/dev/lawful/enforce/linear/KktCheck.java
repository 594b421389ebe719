package dev.lawful.enforce.linear;

import java.util.Objects;

/**
 * The Karush–Kuhn–Tucker certificate of a solution (u, λ) of minimise ½ (u − z)ᵀ W (u − z) subject to A u ≥ b
 * ({@link DenseQp}), from W, A, b and z alone, so that it also checks answers from elsewhere. W is strictly convex,
 * so these conditions hold at the minimiser and nowhere else. Each is measured relative to the size of the terms it
 * compares, so that the numbers read as backward errors (the relative change of the data that would make the
 * condition exact) and are comparable with 2⁻⁵³ ≈ 1.1e-16:
 * <ul>
 *   <li>stationarity, W(u − z) = Aᵀλ: max_j |(W(u − z) − Aᵀλ)_j| / (Σ_i |W_ji| (|u_i| + |z_i|) + Σ_i |a_ij λ_i|);
 *       the scale holds |u| and |z| rather than |u − z| because u − z cannot be known better than u and z;</li>
 *   <li>primal feasibility, A u ≥ b: max_i max(0, b_i − a_iᵀu) / (Σ_j |a_ij u_j| + |b_i|);</li>
 *   <li>dual feasibility, λ ≥ 0: max_i max(0, −λ_i) / max_i |λ_i|;</li>
 *   <li>complementary slackness, λ_i (a_iᵀu − b_i) = 0: max_i |λ_i| |a_iᵀu − b_i| / (max_l |λ_l| · (Σ_j |a_ij u_j| +
 *       |b_i|)), the relative slack of each constraint weighted by its multiplier's share of the largest one.</li>
 * </ul>
 * A quotient 0/0 counts as 0. A NaN anywhere makes the result NaN, which compares as failure with any bound.
 * Allocates nothing.
 */
public final class KktCheck {
    /** Index of stationarity in the output. */
    public static final int STATIONARITY = 0;
    /** Index of primal feasibility in the output. */
    public static final int PRIMAL = 1;
    /** Index of dual feasibility in the output. */
    public static final int DUAL = 2;
    /** Index of complementary slackness in the output. */
    public static final int COMPLEMENTARITY = 3;
    /** Number of values written. */
    public static final int SIZE = 4;

    private KktCheck() {
    }

    /** {@link #check(double[], int, int, double[], int, double[], int, int, double[], int, double[], int, double[],
     * int, double[], int)} with every offset 0. */
    public static double check(double[] w, int k, double[] a, double[] b, int m, double[] z, double[] u,
            double[] lambda, double[] out) {
        return check(w, 0, k, a, 0, b, 0, m, z, 0, u, 0, lambda, 0, out, 0);
    }

    /**
     * Writes the four relative violations (class comment) to {@code out[outOffset + STATIONARITY ..
     * outOffset + COMPLEMENTARITY]} and returns the largest.
     *
     * @param w      W, k×k row-major, the whole matrix (not modified)
     * @param a      A, m×k row-major (not modified)
     * @param b      m entries (not modified)
     * @param z      k entries (not modified)
     * @param u      the solution to check, k entries (not modified)
     * @param lambda its multipliers, m entries (not modified)
     * @param out    output: {@value #SIZE} entries
     * @return the largest of the four, NaN when any is
     * @throws IllegalArgumentException  when k &lt; 1 or m &lt; 0
     * @throws IndexOutOfBoundsException when an array is too short for its offset and size
     */
    public static double check(double[] w, int wOffset, int k, double[] a, int aOffset, double[] b, int bOffset,
            int m, double[] z, int zOffset, double[] u, int uOffset, double[] lambda, int lambdaOffset, double[] out,
            int outOffset) {
        if (k < 1 || m < 0) {
            throw new IllegalArgumentException("need k ≥ 1 and m ≥ 0, found k = " + k + ", m = " + m);
        }
        Objects.checkFromIndexSize(wOffset, k * k, w.length);
        Objects.checkFromIndexSize(aOffset, m * k, a.length);
        Objects.checkFromIndexSize(bOffset, m, b.length);
        Objects.checkFromIndexSize(zOffset, k, z.length);
        Objects.checkFromIndexSize(uOffset, k, u.length);
        Objects.checkFromIndexSize(lambdaOffset, m, lambda.length);
        Objects.checkFromIndexSize(outOffset, SIZE, out.length);
        double largest = 0;
        for (int i = 0; i < m; i++) {
            largest = Math.max(largest, Math.abs(lambda[lambdaOffset + i]));
        }
        out[outOffset + STATIONARITY] = stationarity(w, wOffset, k, a, aOffset, m, z, zOffset, u, uOffset, lambda,
                lambdaOffset);
        double primal = 0;
        double dual = 0;
        double complementarity = 0;
        for (int i = 0; i < m; i++) {
            // the slack and its scale exactly as DenseQp's feasibility test forms them, so that a solution it accepts
            // reads here as primal ≤ τ
            int row = aOffset + i * k;
            double bi = b[bOffset + i];
            double slack = -bi;
            double scale = Math.abs(bi);
            for (int j = 0; j < k; j++) {
                double t = a[row + j] * u[uOffset + j];
                slack += t;
                scale += Math.abs(t);
            }
            double li = lambda[lambdaOffset + i];
            primal = Math.max(primal, ratio(Math.max(0, -slack), scale));
            dual = Math.max(dual, ratio(Math.max(0, -li), largest));
            complementarity = Math.max(complementarity, ratio(Math.abs(li) * Math.abs(slack), largest * scale));
        }
        out[outOffset + PRIMAL] = primal;
        out[outOffset + DUAL] = dual;
        out[outOffset + COMPLEMENTARITY] = complementarity;
        double worst = 0;
        for (int c = 0; c < SIZE; c++) {
            worst = Math.max(worst, out[outOffset + c]);
        }
        return worst;
    }

    private static double stationarity(double[] w, int wOffset, int k, double[] a, int aOffset, int m, double[] z,
            int zOffset, double[] u, int uOffset, double[] lambda, int lambdaOffset) {
        double worst = 0;
        for (int j = 0; j < k; j++) {
            double residual = 0;
            double scale = 0;
            for (int i = 0; i < k; i++) {
                double wji = w[wOffset + j * k + i];
                double ui = u[uOffset + i];
                double zi = z[zOffset + i];
                residual += wji * (ui - zi);
                scale += Math.abs(wji) * (Math.abs(ui) + Math.abs(zi));
            }
            for (int i = 0; i < m; i++) {
                double t = a[aOffset + i * k + j] * lambda[lambdaOffset + i];
                residual -= t;
                scale += Math.abs(t);
            }
            worst = Math.max(worst, ratio(Math.abs(residual), scale));
        }
        return worst;
    }

    /** n / s with 0/0 = 0 (NaN stays NaN; a positive n over s = 0 is infinite, as it should be). */
    private static double ratio(double n, double s) {
        return n == 0 ? 0 : n / s;
    }
}
