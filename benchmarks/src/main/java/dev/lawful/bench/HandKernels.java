package dev.lawful.bench;

/**
 * The baseline of {@link KernelBench}: the mathematics of one {@link GridLaws} law set written by hand in plain
 * loops, the practical limit of each tier. It knows the structure (which coefficients are constant, the cyclic
 * block), computes in double with plain sums, and checks nothing: no non-finite test, no refinement and no
 * residual bound, which is what the library pays for its guarantee.
 *
 * <ul>
 *   <li>constant-affine: y_c = M z + N x with M = K⁻¹B and N = K⁻¹ folded at construction (K the constant
 *       cyclic block); backward ḡ_z = ḡ_f + Mᵀḡ_c, ḡ_x = Nᵀḡ_c;</li>
 *   <li>affine: per sample K(x) y_c = B z + x' by Gaussian elimination with partial pivoting; backward solves
 *       K(x)ᵀλ = ḡ_c, then ḡ_z = ḡ_f + Bᵀλ, ḡ_x = (−λ_k y_k, λ_k);</li>
 *   <li>nonlinear: Newton from 0 until every residual is within 8·2⁻⁵³ of its law's natural scale (cap 60);
 *       backward as affine with the Jacobian at the solution;</li>
 *   <li>projection: out = y − Q(Ay − x) with Q = Aᵀ(AAᵀ)⁻¹ precomputed; backward μ = (AAᵀ)⁻¹Aḡ,
 *       ḡ_y = ḡ − Aᵀμ, ḡ_x = μ.</li>
 * </ul>
 * Not thread-safe (it holds its work arrays); allocates nothing per call.
 */
final class HandKernels {
    private final String tier;
    private final int n;
    private final int f;
    private final int p;
    private final int nIn;
    private final double coupling;
    /** B, n×F row-major. */
    private final double[] b;
    /** Constant-affine: M = K⁻¹B (n×F) and N = K⁻¹ (n×n). */
    private final double[] m;
    private final double[] nx;
    /** Projection: A (n×p) and Q = Aᵀ(AAᵀ)⁻¹ (p×n), and (AAᵀ)⁻¹ (n×n). */
    private final double[] a;
    private final double[] q;
    private final double[] sInverse;
    // work arrays
    private final double[] block;
    private final double[] rhs;
    private final double[] abs;
    private final double[] vector;

    HandKernels(String tier, int free, int laws) {
        this.tier = tier;
        this.n = laws;
        this.f = free;
        this.p = laws + free;
        this.nIn = GridLaws.inputWidth(tier, laws);
        this.coupling = GridLaws.coupling(tier);
        b = new double[n * f];
        for (int k = 0; k < n; k++) {
            for (int j = 0; j < f; j++) {
                b[k * f + j] = GridLaws.coefficient(k, j);
            }
        }
        block = new double[n * n];
        rhs = new double[n];
        abs = new double[n];
        vector = new double[Math.max(n, p)];
        if (tier.equals("constant-affine")) {
            double[] k = new double[n * n];
            fillBlock(k, null, 0, false);
            nx = inverse(k, n);
            m = new double[n * f];
            for (int r = 0; r < n; r++) {
                for (int c = 0; c < n; c++) {
                    for (int j = 0; j < f; j++) {
                        m[r * f + j] += nx[r * n + c] * b[c * f + j];
                    }
                }
            }
        } else {
            m = null;
            nx = null;
        }
        if (tier.equals("projection")) {
            a = new double[n * p];
            for (int k = 0; k < n; k++) {
                a[k * p + k] += 1;
                a[k * p + GridLaws.next(k, n)] += coupling;
                for (int j = 0; j < f; j++) {
                    a[k * p + n + j] = -b[k * f + j];
                }
            }
            double[] s = new double[n * n];
            for (int r = 0; r < n; r++) {
                for (int c = 0; c < n; c++) {
                    double sum = 0;
                    for (int i = 0; i < p; i++) {
                        sum += a[r * p + i] * a[c * p + i];
                    }
                    s[r * n + c] = sum;
                }
            }
            sInverse = inverse(s, n);
            q = new double[p * n];
            for (int i = 0; i < p; i++) {
                for (int c = 0; c < n; c++) {
                    double sum = 0;
                    for (int r = 0; r < n; r++) {
                        sum += a[r * p + i] * sInverse[r * n + c];
                    }
                    q[i * n + c] = sum;
                }
            }
        } else {
            a = null;
            q = null;
            sInverse = null;
        }
    }

    /** Forward of the tier: for projection {@code z} is the incoming full outputs (p per sample). */
    void forward(double[] x, double[] z, int batch, double[] y) {
        switch (tier) {
            case "constant-affine":
                foldedForward(x, z, batch, y);
                break;
            case "affine":
                affineForward(x, z, batch, y);
                break;
            case "nonlinear":
                newtonForward(x, z, batch, y);
                break;
            default:
                projectionForward(x, z, batch, y);
                break;
        }
    }

    /**
     * Backward of the tier: {@code y} the forward outputs (for projection the incoming outputs), {@code gy} the
     * upstream gradient on all p outputs; writes {@code gz} (F per sample, p for projection) and {@code gx}.
     */
    void backward(double[] x, double[] y, double[] gy, int batch, double[] gz, double[] gx) {
        switch (tier) {
            case "constant-affine":
                foldedBackward(gy, batch, gz, gx);
                break;
            case "projection":
                projectionBackward(gy, batch, gz, gx);
                break;
            default:
                solvedBackward(x, y, gy, batch, gz, gx);
                break;
        }
    }

    // ---- constant-affine ---------------------------------------------------------------------------------------

    private void foldedForward(double[] x, double[] z, int batch, double[] y) {
        for (int s = 0; s < batch; s++) {
            int zo = s * f;
            int yo = s * p;
            int xo = s * nIn;
            int r = 0;
            // four outputs per pass over z: four running sums in registers
            for (; r + 4 <= n; r += 4) {
                double s0 = 0;
                double s1 = 0;
                double s2 = 0;
                double s3 = 0;
                int m0 = r * f;
                for (int j = 0; j < f; j++) {
                    double zj = z[zo + j];
                    s0 += m[m0 + j] * zj;
                    s1 += m[m0 + f + j] * zj;
                    s2 += m[m0 + 2 * f + j] * zj;
                    s3 += m[m0 + 3 * f + j] * zj;
                }
                for (int c = 0; c < n; c++) {
                    double xc = x[xo + c];
                    s0 += nx[r * n + c] * xc;
                    s1 += nx[(r + 1) * n + c] * xc;
                    s2 += nx[(r + 2) * n + c] * xc;
                    s3 += nx[(r + 3) * n + c] * xc;
                }
                y[yo + r] = s0;
                y[yo + r + 1] = s1;
                y[yo + r + 2] = s2;
                y[yo + r + 3] = s3;
            }
            for (; r < n; r++) {
                double s0 = 0;
                for (int j = 0; j < f; j++) {
                    s0 += m[r * f + j] * z[zo + j];
                }
                for (int c = 0; c < n; c++) {
                    s0 += nx[r * n + c] * x[xo + c];
                }
                y[yo + r] = s0;
            }
            System.arraycopy(z, zo, y, yo + n, f);
        }
    }

    private void foldedBackward(double[] gy, int batch, double[] gz, double[] gx) {
        for (int s = 0; s < batch; s++) {
            int go = s * p;
            int zo = s * f;
            System.arraycopy(gy, go + n, gz, zo, f);
            for (int c = 0; c < n; c++) {
                gx[s * nIn + c] = 0;
            }
            for (int r = 0; r < n; r++) {
                double g = gy[go + r];
                for (int j = 0; j < f; j++) {
                    gz[zo + j] += m[r * f + j] * g;
                }
                for (int c = 0; c < n; c++) {
                    gx[s * nIn + c] += nx[r * n + c] * g;
                }
            }
        }
    }

    // ---- affine and nonlinear ----------------------------------------------------------------------------------

    private void affineForward(double[] x, double[] z, int batch, double[] y) {
        for (int s = 0; s < batch; s++) {
            freeProducts(z, s * f, x, s * nIn + n, rhs, null);
            fillBlock(block, x, s * nIn, false);
            solveInPlace(block, rhs, n);
            System.arraycopy(rhs, 0, y, s * p, n);
            System.arraycopy(z, s * f, y, s * p + n, f);
        }
    }

    private void newtonForward(double[] x, double[] z, int batch, double[] y) {
        for (int s = 0; s < batch; s++) {
            int yo = s * p;
            freeProducts(z, s * f, x, s * nIn, rhs, abs);
            for (int k = 0; k < n; k++) {
                y[yo + k] = 0;
            }
            for (int iteration = 0; iteration < 60; iteration++) {
                boolean done = true;
                for (int k = 0; k < n; k++) {
                    double v = y[yo + k];
                    double w = coupling * y[yo + GridLaws.next(k, n)];
                    double residual = v * v * v + v + w - rhs[k];
                    double scale = Math.abs(v * v * v) + Math.abs(v) + Math.abs(w) + abs[k];
                    done &= Math.abs(residual) <= 0x1p-50 * scale;
                    vector[k] = residual;
                }
                if (done) {
                    break;
                }
                fillBlock(block, y, yo, false);
                solveInPlace(block, vector, n);
                for (int k = 0; k < n; k++) {
                    y[yo + k] -= vector[k];
                }
            }
            System.arraycopy(z, s * f, y, yo + n, f);
        }
    }

    private void solvedBackward(double[] x, double[] y, double[] gy, int batch, double[] gz, double[] gx) {
        boolean affine = tier.equals("affine");
        for (int s = 0; s < batch; s++) {
            int go = s * p;
            int yo = s * p;
            if (affine) {
                fillBlock(block, x, s * nIn, true);
            } else {
                fillBlock(block, y, yo, true);
            }
            System.arraycopy(gy, go, vector, 0, n);
            solveInPlace(block, vector, n);
            int zo = s * f;
            System.arraycopy(gy, go + n, gz, zo, f);
            for (int k = 0; k < n; k++) {
                double lambda = vector[k];
                int bo = k * f;
                for (int j = 0; j < f; j++) {
                    gz[zo + j] += b[bo + j] * lambda;
                }
            }
            int xo = s * nIn;
            for (int k = 0; k < n; k++) {
                if (affine) {
                    gx[xo + k] = -vector[k] * y[yo + k];
                    gx[xo + n + k] = vector[k];
                } else {
                    gx[xo + k] = vector[k];
                }
            }
        }
    }

    /** out_k = Σ_j B_kj z_j + x_k, and the sum of the magnitudes of the addends when {@code magnitude} is given. */
    private void freeProducts(double[] z, int zo, double[] x, int xo, double[] out, double[] magnitude) {
        int k = 0;
        for (; k + 4 <= n; k += 4) {
            double s0 = 0;
            double s1 = 0;
            double s2 = 0;
            double s3 = 0;
            int b0 = k * f;
            for (int j = 0; j < f; j++) {
                double zj = z[zo + j];
                s0 += b[b0 + j] * zj;
                s1 += b[b0 + f + j] * zj;
                s2 += b[b0 + 2 * f + j] * zj;
                s3 += b[b0 + 3 * f + j] * zj;
            }
            out[k] = s0 + x[xo + k];
            out[k + 1] = s1 + x[xo + k + 1];
            out[k + 2] = s2 + x[xo + k + 2];
            out[k + 3] = s3 + x[xo + k + 3];
        }
        for (; k < n; k++) {
            double s0 = 0;
            for (int j = 0; j < f; j++) {
                s0 += b[k * f + j] * z[zo + j];
            }
            out[k] = s0 + x[xo + k];
        }
        if (magnitude != null) {
            for (k = 0; k < n; k++) {
                double s0 = Math.abs(x[xo + k]);
                for (int j = 0; j < f; j++) {
                    s0 += Math.abs(b[k * f + j] * z[zo + j]);
                }
                magnitude[k] = s0;
            }
        }
    }

    /**
     * Fills the n×n block ∂C/∂y_c (transposed when asked): the diagonal is 1 (constant-affine), 1 + x_k (affine,
     * {@code v} the inputs) or 3y_k² + 1 (nonlinear, {@code v} the outputs), plus the coupling to y_next(k).
     */
    private void fillBlock(double[] out, double[] v, int offset, boolean transposed) {
        java.util.Arrays.fill(out, 0, n * n, 0.0);
        for (int k = 0; k < n; k++) {
            double d;
            if (tier.equals("affine")) {
                d = 1 + v[offset + k];
            } else if (tier.equals("nonlinear")) {
                double t = v[offset + k];
                d = 3 * t * t + 1;
            } else {
                d = 1;
            }
            out[k * n + k] += d;
            int c = GridLaws.next(k, n);
            out[transposed ? c * n + k : k * n + c] += coupling;
        }
    }

    /** Solves a·u = r in place by Gaussian elimination with partial pivoting (a is destroyed, r becomes u). */
    static void solveInPlace(double[] a, double[] r, int n) {
        for (int col = 0; col < n; col++) {
            int pivot = col;
            double best = Math.abs(a[col * n + col]);
            for (int row = col + 1; row < n; row++) {
                double v = Math.abs(a[row * n + col]);
                if (v > best) {
                    best = v;
                    pivot = row;
                }
            }
            if (pivot != col) {
                for (int c = col; c < n; c++) {
                    double t = a[col * n + c];
                    a[col * n + c] = a[pivot * n + c];
                    a[pivot * n + c] = t;
                }
                double t = r[col];
                r[col] = r[pivot];
                r[pivot] = t;
            }
            double inv = 1 / a[col * n + col];
            for (int row = col + 1; row < n; row++) {
                double factor = a[row * n + col] * inv;
                if (factor != 0) {
                    for (int c = col + 1; c < n; c++) {
                        a[row * n + c] -= factor * a[col * n + c];
                    }
                    r[row] -= factor * r[col];
                }
            }
        }
        for (int row = n - 1; row >= 0; row--) {
            double sum = r[row];
            for (int c = row + 1; c < n; c++) {
                sum -= a[row * n + c] * r[c];
            }
            r[row] = sum / a[row * n + row];
        }
    }

    /** @return the inverse of the n×n matrix a (a is not modified); used at construction only */
    static double[] inverse(double[] a, int n) {
        double[] result = new double[n * n];
        double[] work = new double[n * n];
        double[] column = new double[n];
        for (int c = 0; c < n; c++) {
            System.arraycopy(a, 0, work, 0, n * n);
            java.util.Arrays.fill(column, 0);
            column[c] = 1;
            solveInPlace(work, column, n);
            for (int r = 0; r < n; r++) {
                result[r * n + c] = column[r];
            }
        }
        return result;
    }

    // ---- projection --------------------------------------------------------------------------------------------

    private void projectionForward(double[] x, double[] y, int batch, double[] out) {
        for (int s = 0; s < batch; s++) {
            int yo = s * p;
            for (int k = 0; k < n; k++) {
                double sum = -x[s * nIn + k];
                int ao = k * p;
                for (int i = 0; i < p; i++) {
                    sum += a[ao + i] * y[yo + i];
                }
                vector[k] = sum;
            }
            for (int i = 0; i < p; i++) {
                double sum = 0;
                int qo = i * n;
                for (int k = 0; k < n; k++) {
                    sum += q[qo + k] * vector[k];
                }
                out[yo + i] = y[yo + i] - sum;
            }
        }
    }

    private void projectionBackward(double[] g, int batch, double[] gradY, double[] gradX) {
        for (int s = 0; s < batch; s++) {
            int go = s * p;
            for (int k = 0; k < n; k++) {
                double sum = 0;
                int ao = k * p;
                for (int i = 0; i < p; i++) {
                    sum += a[ao + i] * g[go + i];
                }
                rhs[k] = sum;
            }
            for (int k = 0; k < n; k++) {
                double sum = 0;
                for (int c = 0; c < n; c++) {
                    sum += sInverse[k * n + c] * rhs[c];
                }
                vector[k] = sum;
                gradX[s * nIn + k] = sum;
            }
            System.arraycopy(g, go, gradY, go, p);
            for (int k = 0; k < n; k++) {
                double mu = vector[k];
                int ao = k * p;
                for (int i = 0; i < p; i++) {
                    gradY[go + i] -= a[ao + i] * mu;
                }
            }
        }
    }
}
