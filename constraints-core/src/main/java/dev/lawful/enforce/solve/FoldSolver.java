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
    private final double[] k;
    private final int[] completed;
    private final int n;
    private final int nIn;
    private final int nOut;
    private final int nFree;
    /**
     * N by rows of nonzeros: row r's are {@code xStart[r] .. xStart[r+1]} in {@code xCol} and {@code xCoef} (laws
     * usually read a few inputs each).
     */
    private final int[] xStart;
    private final int[] xCol;
    private final double[] xCoef;
    /** Whether some entry of N is zero, so some input reaches some completed output through no product. */
    private final boolean probeInputs;

    FoldSolver(CompletionPlan plan, Columns columns) {
        Fold fold = plan.fold();
        this.columns = columns;
        this.certifier = new Certifier(plan);
        this.blocks = new StageBlocks(plan, certifier);
        this.work = new SolveWork(plan, false);
        this.m = fold.m();
        this.k = fold.k();
        this.completed = plan.completed();
        this.n = plan.lawCount();
        this.nIn = plan.inputWidth();
        this.nOut = plan.outputWidth();
        this.nFree = plan.freeWidth();
        double[] nx = fold.n();
        int nonzeros = 0;
        for (double v : nx) {
            nonzeros += v != 0 ? 1 : 0;
        }
        this.probeInputs = nonzeros < nx.length;
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
            foldFour(z, batch, r, full);
        }
        for (; r < n; r++) {
            foldOne(z, batch, r, full);
        }
        if (nIn > 0) {
            addInputs(x, batch, full);
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
     * Completed output r of every sample, without the inputs ({@link #addInputs}). Every product M_rf·z_f is
     * formed (zero coefficients included), and 0·∞ and 0·NaN are NaN, so a non-finite free output makes every
     * completed output non-finite, and so does a non-finite input through {@link #addInputs}: the inputs are scanned
     * only for samples whose first completed output is not finite, to tell a non-finite input (NOT_FINITE) from an
     * overflow (NOT_CONVERGED).
     */
    private void foldOne(double[] z, int batch, int r, double[] full) {
        for (int s = 0; s < batch; s++) {
            int zo = s * nFree;
            double v = k[r];
            for (int f = 0; f < nFree; f++) {
                v += m[r * nFree + f] * z[zo + f];
            }
            full[s * nOut + completed[r]] = v;
        }
    }

    /**
     * Completed outputs r .. r+3 of every sample: four per pass over a sample's free outputs, each summed over even
     * and odd free outputs separately, eight independent running sums, so the additions overlap instead of
     * waiting on one another.
     */
    private void foldFour(double[] z, int batch, int r, double[] full) {
        final double[] m = this.m;
        final int nf = nFree;
        final int m0 = r * nf;
        final int m1 = m0 + nf;
        final int m2 = m1 + nf;
        final int m3 = m2 + nf;
        for (int s = 0; s < batch; s++) {
            int zo = s * nf;
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
            int yo = s * nOut;
            full[yo + completed[r]] = v0;
            full[yo + completed[r + 1]] = v1;
            full[yo + completed[r + 2]] = v2;
            full[yo + completed[r + 3]] = v3;
        }
    }

    /**
     * Adds N x to every completed output, over N's nonzeros in column order. Where N has a zero, {@link
     * Finite#probe} of the sample's inputs (0, or NaN for a non-finite input) stands for the zero products, so a
     * non-finite input makes every completed output non-finite even when a law does not read it.
     */
    private void addInputs(double[] x, int batch, double[] full) {
        for (int s = 0; s < batch; s++) {
            int xo = s * nIn;
            int yo = s * nOut;
            double probe = probeInputs ? Finite.probe(x, xo, nIn) : 0;
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
            addInputRow(r, g0, gx, xo);
            addInputRow(r + 1, g1, gx, xo);
            addInputRow(r + 2, g2, gx, xo);
            addInputRow(r + 3, g3, gx, xo);
        }
    }

    /** ḡ_x += (row r of N)·g_r, over the row's nonzeros. */
    private void addInputRow(int r, double gr, double[] gx, int xo) {
        for (int e = xStart[r]; e < xStart[r + 1]; e++) {
            gx[xo + xCol[e]] += xCoef[e] * gr;
        }
    }
}
