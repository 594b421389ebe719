package dev.lawful.enforce;

/**
 * The dense linear algebra of one sample's projection, on preallocated arrays (nothing is allocated after
 * construction except on error paths).
 *
 * <p>With A = dC/dy (n laws by p outputs), the metric W = diag(w), N = diag(‖row k of A W^-1/2‖) and
 * B̃ = N⁻¹ A W^-1/2 (each law's row scaled to unit length, which changes neither the projection nor the rank but
 * equilibrates the rows), the Householder factorisation B̃ᵀ = Q R (Q: p×n with orthonormal columns, R: n×n upper
 * triangular) gives every quantity the enforcer needs without forming the normal matrix S = A W⁻¹ Aᵀ (whose
 * condition number is the square of A's):
 * <ul>
 *   <li>correction W⁻¹ Aᵀ S⁻¹ C = W^-1/2 Q R⁻ᵀ N⁻¹ C;</li>
 *   <li>transposed projector Pᵀ ḡ = ḡ − W^1/2 Q Qᵀ W^-1/2 ḡ (N cancels);</li>
 *   <li>input adjoint S⁻¹ A W⁻¹ ḡ = N⁻¹ R⁻¹ Qᵀ W^-1/2 ḡ.</li>
 * </ul>
 * Storage is column-major: column k of the p×n array {@link #m} is law k; after {@link #factor(double)} its entries
 * above the diagonal hold R's column k and the entries from the diagonal down hold Householder vector k, with R's
 * diagonal in {@link #diag}.
 */
final class ProjectionFactor {
    final int n;
    final int p;
    /** p×n, column-major: law k at {@code m[k*p .. k*p+p-1]}. */
    final double[] m;
    /** Row norms of A W^-1/2 before scaling. */
    final double[] norm;
    final double[] diag;
    private final double[] beta;
    /** n-vector scratch. */
    final double[] u;
    /** p-vector scratch. */
    final double[] v;

    ProjectionFactor(int n, int p) {
        this.n = n;
        this.p = p;
        this.m = new double[Math.max(1, n * p)];
        this.norm = new double[n];
        this.diag = new double[n];
        this.beta = new double[n];
        this.u = new double[n];
        this.v = new double[p];
    }

    /** @return an independent copy of this factorisation, with its own scratch vectors */
    ProjectionFactor copy() {
        ProjectionFactor c = new ProjectionFactor(n, p);
        System.arraycopy(m, 0, c.m, 0, m.length);
        System.arraycopy(norm, 0, c.norm, 0, n);
        System.arraycopy(diag, 0, c.diag, 0, n);
        System.arraycopy(beta, 0, c.beta, 0, n);
        return c;
    }

    /**
     * Loads A from the evaluator's sparse storage of one sample and scales it.
     *
     * @param jy       the Jacobian entries dC/dy of the batch
     * @param base     position of this sample's first entry in {@code jy}
     * @param start    law k's entries are {@code start[k] .. start[k+1]-1}
     * @param columns  the output column of each entry
     * @param invSqrtW 1/sqrt(w_j)
     * @return -1 when every coefficient is finite, otherwise the first law with a non-finite coefficient
     */
    int load(double[] jy, int base, int[] start, int[] columns, double[] invSqrtW) {
        java.util.Arrays.fill(m, 0, n * p, 0.0);
        int bad = -1;
        for (int k = 0; k < n; k++) {
            int col = k * p;
            double max = 0;
            for (int e = start[k]; e < start[k + 1]; e++) {
                double a = jy[base + e] * invSqrtW[columns[e]];
                m[col + columns[e]] = a;
                max = Math.max(max, Math.abs(a));
            }
            if (!(max < Double.POSITIVE_INFINITY)) {
                if (bad < 0) {
                    bad = k;
                }
                norm[k] = Double.NaN;
                continue;
            }
            double ss = 0;
            if (max > 0) {
                // scaled by the largest entry first, so the sum of squares neither overflows nor underflows
                double inv = 1 / max;
                for (int j = 0; j < p; j++) {
                    double t = m[col + j] * inv;
                    ss += t * t;
                }
            }
            double nk = max * Math.sqrt(ss);
            norm[k] = nk;
            if (nk > 0) {
                double inv = 1 / nk;
                for (int j = 0; j < p; j++) {
                    m[col + j] *= inv;
                }
            }
        }
        return bad;
    }

    /**
     * Householder QR of the loaded matrix, law by law in order.
     *
     * @param tolerance a law whose unit row lies within this distance of the span of the laws before it is
     *                  dependent on them
     * @return -1 when R is nonsingular to that tolerance, otherwise the first dependent law; the factorisation
     *         is then complete for the laws before it and {@link #dependence(int, double)} can explain it
     */
    int factor(double tolerance) {
        for (int k = 0; k < n; k++) {
            int col = k * p;
            double ss = 0;
            for (int i = k; i < p; i++) {
                ss += m[col + i] * m[col + i];
            }
            double alpha = Math.sqrt(ss);
            if (!(alpha > tolerance)) {
                diag[k] = alpha;
                return k;
            }
            double x0 = m[col + k];
            double s = x0 >= 0 ? 1 : -1;
            m[col + k] = x0 + s * alpha;
            diag[k] = -s * alpha;
            double b = 1 / (alpha * (alpha + Math.abs(x0)));
            beta[k] = b;
            for (int l = k + 1; l < n; l++) {
                int other = l * p;
                double w = 0;
                for (int i = k; i < p; i++) {
                    w += m[col + i] * m[other + i];
                }
                w *= b;
                for (int i = k; i < p; i++) {
                    m[other + i] -= w * m[col + i];
                }
            }
        }
        return -1;
    }

    /**
     * After {@link #factor(double)} stopped at law {@code k}: which earlier laws its row is a combination of.
     * Allocates (an error path).
     *
     * @param threshold smallest coefficient (of the unit rows) that counts as taking part
     * @return the earlier laws taking part, ascending
     */
    int[] dependence(int k, double threshold) {
        int col = k * p;
        double[] c = new double[k];
        for (int i = k - 1; i >= 0; i--) {
            double t = m[col + i];
            for (int l = i + 1; l < k; l++) {
                t -= m[l * p + i] * c[l];
            }
            c[i] = t / diag[i];
        }
        return java.util.stream.IntStream.range(0, k).filter(i -> Math.abs(c[i]) > threshold).toArray();
    }

    /**
     * The projection step δy = W⁻¹ Aᵀ S⁻¹ C of one sample.
     *
     * @param c        residuals C (SI), read from {@code c[cOff .. cOff+n-1]}
     * @param invSqrtW 1/sqrt(w_j)
     * @param y        outputs, updated in place: {@code y[yOff + j] -= δy_j}
     */
    void subtractCorrection(double[] c, int cOff, double[] invSqrtW, double[] y, int yOff) {
        // Rᵀ u = N⁻¹ C by forward substitution; R's column k lies above the diagonal of column k
        for (int k = 0; k < n; k++) {
            int col = k * p;
            double t = c[cOff + k] / norm[k];
            for (int l = 0; l < k; l++) {
                t -= m[col + l] * u[l];
            }
            u[k] = t / diag[k];
        }
        applyQ(u, v);
        for (int j = 0; j < p; j++) {
            y[yOff + j] -= v[j] * invSqrtW[j];
        }
    }

    /**
     * The vector-Jacobian product of the projection with respect to its incoming outputs, and the adjoint vector
     * for the inputs: with h = W^-1/2 ḡ, {@code gIn = ḡ − W^1/2 Q Qᵀ h} and {@code lambda = N⁻¹ R⁻¹ Qᵀ h}
     * (= S⁻¹ A W⁻¹ ḡ).
     *
     * @param g        upstream gradient, {@code g[gOff .. gOff+p-1]}
     * @param gIn      receives Pᵀ ḡ at {@code gIn[inOff ..]} (may alias {@code g} at the same offset)
     * @param lambda   when not null, receives S⁻¹ A W⁻¹ ḡ (n values at {@code lambda[0 ..]})
     */
    void adjoint(double[] g, int gOff, double[] sqrtW, double[] invSqrtW, double[] gIn, int inOff,
                 double[] lambda) {
        for (int j = 0; j < p; j++) {
            v[j] = g[gOff + j] * invSqrtW[j];
        }
        applyQt(v);
        if (lambda != null) {
            // R λ' = (Qᵀ h)[0..n) by back substitution, then λ = N⁻¹ λ'
            for (int k = n - 1; k >= 0; k--) {
                double t = v[k];
                for (int l = k + 1; l < n; l++) {
                    t -= m[l * p + k] * lambda[l];
                }
                lambda[k] = t / diag[k];
            }
            for (int k = 0; k < n; k++) {
                lambda[k] /= norm[k];
            }
        }
        for (int k = 0; k < n; k++) {
            u[k] = v[k];
        }
        applyQ(u, v);
        for (int j = 0; j < p; j++) {
            gIn[inOff + j] = g[gOff + j] - sqrtW[j] * v[j];
        }
    }

    /** out = Q [a; 0] = H_0 H_1 ... H_{n-1} [a; 0]. */
    private void applyQ(double[] a, double[] out) {
        for (int j = 0; j < p; j++) {
            out[j] = j < n ? a[j] : 0;
        }
        for (int k = n - 1; k >= 0; k--) {
            reflect(k, out);
        }
    }

    /** g = Qᵀ g in place (H_{n-1} ... H_0 g); its first n entries are the thin Qᵀ g. */
    private void applyQt(double[] g) {
        for (int k = 0; k < n; k++) {
            reflect(k, g);
        }
    }

    private void reflect(int k, double[] g) {
        int col = k * p;
        double w = 0;
        for (int i = k; i < p; i++) {
            w += m[col + i] * g[i];
        }
        w *= beta[k];
        for (int i = k; i < p; i++) {
            g[i] -= w * m[col + i];
        }
    }
}
