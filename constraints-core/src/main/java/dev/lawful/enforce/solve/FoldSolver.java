package dev.lawful.enforce.solve;

import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.Fold;
import java.util.Arrays;

/**
 * The constant-affine tier: y_c = M z + N x + k for every sample (the fold made at build time), then, when
 * certifying, the check of the bound and one refinement with the constant stage blocks where a sample misses it.
 * Backward: ḡ_z = ḡ_f + Mᵀḡ_c and ḡ_x = Nᵀḡ_c.
 */
final class FoldSolver implements TierSolver {
    private final Columns columns;
    private final Certifier certifier;
    private final StageBlocks blocks;
    private final SolveWork work;
    private final double[] m;
    private final double[] nx;
    private final double[] k;
    private final int[] completed;
    private final int n;
    private final int nIn;
    private final int nOut;
    private final int nFree;
    /**
     * N held by rows of nonzeros ({@code xStart[r] .. xStart[r+1]} index {@code xCol} and {@code xCoef}), used
     * instead of the dense rows when at most half of N is nonzero: laws usually read a few inputs each.
     */
    private final boolean sparseX;
    private final int[] xStart;
    private final int[] xCol;
    private final double[] xCoef;

    FoldSolver(CompletionPlan plan, Columns columns) {
        Fold fold = plan.fold();
        this.columns = columns;
        this.certifier = new Certifier(plan);
        this.blocks = new StageBlocks(plan, certifier);
        this.work = new SolveWork(plan, false);
        this.m = fold.m();
        this.nx = fold.n();
        this.k = fold.k();
        this.completed = plan.completed();
        this.n = plan.lawCount();
        this.nIn = plan.inputWidth();
        this.nOut = plan.outputWidth();
        this.nFree = plan.freeWidth();
        int nonzeros = 0;
        for (double v : nx) {
            nonzeros += v != 0 ? 1 : 0;
        }
        this.sparseX = nx.length > 0 && 2 * nonzeros <= nx.length;
        this.xStart = new int[n + 1];
        this.xCol = new int[nonzeros];
        this.xCoef = new double[nonzeros];
        int e = 0;
        for (int r = 0; r < n; r++) {
            for (int i = 0; i < nIn; i++) {
                if (nx[r * nIn + i] != 0) {
                    xCol[e] = i;
                    xCoef[e++] = nx[r * nIn + i];
                }
            }
            xStart[r + 1] = e;
        }
    }

    @Override
    public void forward(double[] x, double[] z, int batch, double[] full, byte[] st, boolean certify) {
        // the fold finds non-finite inputs itself
        columns.scatterFree(x, z, batch, full, null);
        // four completed outputs at a time over the whole batch: each pass is one compiled loop that keeps its four
        // rows of M in cache, whatever the JIT decides to inline (a per-sample helper was inlined in some runs
        // only, and those without ran 1.5x slower)
        int r = 0;
        for (; r + 4 <= n; r += 4) {
            foldFour(x, z, batch, r, full);
        }
        for (; r < n; r++) {
            foldOne(x, z, batch, r, full);
        }
        if (sparseX) {
            addSparseInputs(x, batch, full);
        }
        for (int s = 0; s < batch; s++) {
            int yo = s * nOut;
            double first = full[yo + completed[0]];
            if (first - first == 0) {
                st[s] = SampleStatus.OK;
            } else {
                st[s] = Finite.finite(z, s * nFree, nFree) && Finite.finite(x, s * nIn, nIn)
                        ? SampleStatus.NOT_CONVERGED : SampleStatus.NOT_FINITE;
            }
        }
        if (certify) {
            work.ensure(batch);
            blocks.refineAll(x, batch, full, st, work);
        } else {
            certifier.markNonFiniteResults(batch, full, st);
        }
    }

    /**
     * Completed output r of every sample. Every product M_rf·z_f and N_ri·x_i is formed (zero coefficients
     * included; a sparse N is added afterwards, {@link #addSparseInputs}), and 0·∞ and 0·NaN are NaN, so a
     * non-finite input or free output makes every completed output non-finite: the inputs are scanned only for
     * samples whose first completed output is not finite, to tell a non-finite input (NOT_FINITE) from an overflow
     * (NOT_CONVERGED).
     */
    private void foldOne(double[] x, double[] z, int batch, int r, double[] full) {
        final int ni = sparseX ? 0 : nIn;
        for (int s = 0; s < batch; s++) {
            int zo = s * nFree;
            int xo = s * nIn;
            double v = k[r];
            for (int f = 0; f < nFree; f++) {
                v += m[r * nFree + f] * z[zo + f];
            }
            for (int i = 0; i < ni; i++) {
                v += nx[r * nIn + i] * x[xo + i];
            }
            full[s * nOut + completed[r]] = v;
        }
    }

    /**
     * Completed outputs r .. r+3 of every sample: four per pass over a sample's free outputs, each summed over even
     * and odd free outputs separately, eight independent running sums, so the additions overlap instead of
     * waiting on one another.
     */
    private void foldFour(double[] x, double[] z, int batch, int r, double[] full) {
        final double[] m = this.m;
        final double[] nx = this.nx;
        final int nf = nFree;
        // a sparse N is added by its own pass afterwards
        final int ni = sparseX ? 0 : nIn;
        final int m0 = r * nf;
        final int m1 = m0 + nf;
        final int m2 = m1 + nf;
        final int m3 = m2 + nf;
        final int n0 = r * ni;
        for (int s = 0; s < batch; s++) {
            int zo = s * nf;
            int xo = s * ni;
            double v0 = k[r];
            double v1 = k[r + 1];
            double v2 = k[r + 2];
            double v3 = k[r + 3];
            double w0 = 0;
            double w1 = 0;
            double w2 = 0;
            double w3 = 0;
            int f = 0;
            for (; f + 2 <= nf; f += 2) {
                double za = z[zo + f];
                double zb = z[zo + f + 1];
                v0 += m[m0 + f] * za;
                v1 += m[m1 + f] * za;
                v2 += m[m2 + f] * za;
                v3 += m[m3 + f] * za;
                w0 += m[m0 + f + 1] * zb;
                w1 += m[m1 + f + 1] * zb;
                w2 += m[m2 + f + 1] * zb;
                w3 += m[m3 + f + 1] * zb;
            }
            if (f < nf) {
                double za = z[zo + f];
                v0 += m[m0 + f] * za;
                v1 += m[m1 + f] * za;
                v2 += m[m2 + f] * za;
                v3 += m[m3 + f] * za;
            }
            v0 += w0;
            v1 += w1;
            v2 += w2;
            v3 += w3;
            for (int i = 0; i < ni; i++) {
                double xi = x[xo + i];
                v0 += nx[n0 + i] * xi;
                v1 += nx[n0 + ni + i] * xi;
                v2 += nx[n0 + 2 * ni + i] * xi;
                v3 += nx[n0 + 3 * ni + i] * xi;
            }
            int yo = s * nOut;
            full[yo + completed[r]] = v0;
            full[yo + completed[r + 1]] = v1;
            full[yo + completed[r + 2]] = v2;
            full[yo + completed[r + 3]] = v3;
        }
    }

    /**
     * Adds N x to every completed output when N is held sparse: the same additions, in the same order, as the
     * dense rows without their zero products, and {@link Finite#probe} of the sample's inputs (0, or NaN for a
     * non-finite input) in their place, so a non-finite input still makes every completed output non-finite.
     */
    private void addSparseInputs(double[] x, int batch, double[] full) {
        for (int s = 0; s < batch; s++) {
            int xo = s * nIn;
            int yo = s * nOut;
            double probe = Finite.probe(x, xo, nIn);
            for (int r = 0; r < n; r++) {
                double v = full[yo + completed[r]] + probe;
                for (int e = xStart[r]; e < xStart[r + 1]; e++) {
                    v += xCoef[e] * x[xo + xCol[e]];
                }
                full[yo + completed[r]] = v;
            }
        }
    }

    @Override
    public int backward(double[] x, int batch, double[] full, double[] g, double[] gz, double[] gx,
            boolean throwOnSingular) {
        for (int s = 0; s < batch; s++) {
            if (!Finite.finite(full, s * nOut, nOut) || !Finite.finite(g, s * nOut, nOut)) {
                ImplicitGradient.nanRow(s, nFree, nIn, gz, gx);
                continue;
            }
            columns.gatherFree(g, s, gz);
            if (gx != null) {
                Arrays.fill(gx, s * nIn, (s + 1) * nIn, 0.0);
            }
            int r = 0;
            for (; r + 4 <= n; r += 4) {
                backwardFour(s, r, g, gz, gx);
            }
            for (; r < n; r++) {
                double gc = g[s * nOut + completed[r]];
                int mo = r * nFree;
                for (int f = 0; f < nFree; f++) {
                    gz[s * nFree + f] += m[mo + f] * gc;
                }
                if (gx != null) {
                    addInputRow(r, gc, gx, s * nIn);
                }
            }
        }
        return -1;
    }

    /** ḡ_z += Mᵀḡ_c and ḡ_x += Nᵀḡ_c for completed outputs r .. r+3: rows of M (N) read in order, four per pass. */
    private void backwardFour(int s, int r, double[] g, double[] gz, double[] gx) {
        int zo = s * nFree;
        int go = s * nOut;
        double g0 = g[go + completed[r]];
        double g1 = g[go + completed[r + 1]];
        double g2 = g[go + completed[r + 2]];
        double g3 = g[go + completed[r + 3]];
        int m0 = r * nFree;
        for (int f = 0; f < nFree; f++) {
            gz[zo + f] = gz[zo + f] + m[m0 + f] * g0 + m[m0 + nFree + f] * g1
                    + m[m0 + 2 * nFree + f] * g2 + m[m0 + 3 * nFree + f] * g3;
        }
        if (gx != null) {
            int xo = s * nIn;
            if (sparseX) {
                // the same additions per input, in the same row order, without the zero products
                addInputRow(r, g0, gx, xo);
                addInputRow(r + 1, g1, gx, xo);
                addInputRow(r + 2, g2, gx, xo);
                addInputRow(r + 3, g3, gx, xo);
                return;
            }
            int n0 = r * nIn;
            for (int i = 0; i < nIn; i++) {
                gx[xo + i] = gx[xo + i] + nx[n0 + i] * g0 + nx[n0 + nIn + i] * g1
                        + nx[n0 + 2 * nIn + i] * g2 + nx[n0 + 3 * nIn + i] * g3;
            }
        }
    }

    /** ḡ_x += (row r of N)·g_r, over the row's nonzeros when N is held sparse. */
    private void addInputRow(int r, double gr, double[] gx, int xo) {
        if (sparseX) {
            for (int e = xStart[r]; e < xStart[r + 1]; e++) {
                gx[xo + xCol[e]] += xCoef[e] * gr;
            }
            return;
        }
        int no = r * nIn;
        for (int i = 0; i < nIn; i++) {
            gx[xo + i] += nx[no + i] * gr;
        }
    }
}
