package dev.lawful.enforce;

import dev.lawful.algebra.LawEvaluator;
import java.util.Arrays;

/**
 * The batch solving behind {@link Completion}: the constant-affine fold, the staged affine solve, damped Newton per
 * stage, the refinement and the final check of the documented bound, each run for a whole batch so one evaluator
 * pass serves every sample. Holds only immutable data of its completion; all work arrays are in the caller's
 * {@link Completion.Workspace}.
 */
final class CompletionSolve {
    private static final double EPS = 0x1p-53;

    private final int n;
    private final int nIn;
    private final int nOut;
    private final int nFree;
    private final int[] completed;
    private final LawEvaluator evaluator;
    /** Residuals, scales and dC/dy of the completed columns only: all a forward solve reads. */
    private final LawEvaluator.Partial completedJacobian;
    private final int[] boundFactor;
    private final int[] entryLaw;
    private final int[] entryRole;
    private final double[] foldM;
    private final double[] foldN;
    private final double[] foldK;
    private final Stages stages;
    private final double[][] stageLu;
    private final int[][] stagePivot;
    private final double[] constantLu;
    private final int[] constantPivot;
    private final int[] free;
    private final int[] inEntryLaw;
    private final int[] inEntryColumn;
    private final LawEvaluator guessEvaluator;
    private final int[] guessTarget;
    private final double[] startValue;
    private final int maxIterations;

    /** The free outputs as runs of consecutive columns: z offset, full-row offset and length of each run. */
    private final int[] freeRunFrom;
    private final int[] freeRunTo;
    private final int[] freeRunLength;

    CompletionSolve(Completion c) {
        this.n = c.n;
        this.nIn = c.nIn;
        this.nOut = c.nOut;
        this.nFree = c.nFree;
        this.completed = c.completed;
        this.evaluator = c.evaluator;
        this.completedJacobian = c.evaluator.partial(c.completed);
        this.boundFactor = c.boundFactor;
        this.entryLaw = c.entryLaw;
        this.entryRole = c.entryRole;
        this.foldM = c.foldM;
        this.foldN = c.foldN;
        this.foldK = c.foldK;
        this.stages = c.stages;
        this.stageLu = c.stageLu;
        this.stagePivot = c.stagePivot;
        this.constantLu = c.constantLu;
        this.constantPivot = c.constantPivot;
        this.free = c.free;
        this.inEntryLaw = c.inEntryLaw;
        this.inEntryColumn = c.inEntryColumn;
        this.guessEvaluator = c.guessEvaluator;
        this.guessTarget = c.guessTarget;
        this.startValue = c.startValue;
        this.maxIterations = c.maxIterations;
        int runs = 0;
        for (int f = 0; f < nFree; f++) {
            if (f == 0 || free[f] != free[f - 1] + 1) {
                runs++;
            }
        }
        this.freeRunFrom = new int[runs];
        this.freeRunTo = new int[runs];
        this.freeRunLength = new int[runs];
        for (int f = 0, k = -1; f < nFree; f++) {
            if (f == 0 || free[f] != free[f - 1] + 1) {
                k++;
                freeRunFrom[k] = f;
                freeRunTo[k] = free[f];
            }
            freeRunLength[k]++;
        }
    }

    /**
     * The fold y_c = M z + N x + k for every sample, and each sample's status. Every product M_rf·z_f and N_ri·x_i
     * is formed (zero coefficients included), and 0·∞ and 0·NaN are NaN, so a non-finite input or free output makes
     * every completed output non-finite: the inputs are scanned only for samples whose first completed output is
     * not finite, to tell a non-finite input (NOT_FINITE) from an overflow (NOT_CONVERGED).
     */
    void forwardConstantAffine(double[] x, double[] z, int batch, double[] full, byte[] st) {
        final double[] m = foldM;
        final double[] nx = foldN;
        final double[] k = foldK;
        final int[] to = completed;
        final int nf = nFree;
        final int ni = nIn;
        final int no = nOut;
        final int laws = n;
        for (int s = 0; s < batch; s++) {
            int zo = s * nf;
            int xo = s * ni;
            int yo = s * no;
            int r = 0;
            // four completed outputs per pass over the sample's free outputs, each summed over even and odd free
            // outputs separately: eight independent running sums, so the additions overlap instead of waiting on
            // one another
            for (; r + 4 <= laws; r += 4) {
                double v0 = k[r];
                double v1 = k[r + 1];
                double v2 = k[r + 2];
                double v3 = k[r + 3];
                double w0 = 0;
                double w1 = 0;
                double w2 = 0;
                double w3 = 0;
                int m0 = r * nf;
                int m1 = m0 + nf;
                int m2 = m1 + nf;
                int m3 = m2 + nf;
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
                int n0 = r * ni;
                for (int i = 0; i < ni; i++) {
                    double xi = x[xo + i];
                    v0 += nx[n0 + i] * xi;
                    v1 += nx[n0 + ni + i] * xi;
                    v2 += nx[n0 + 2 * ni + i] * xi;
                    v3 += nx[n0 + 3 * ni + i] * xi;
                }
                full[yo + to[r]] = v0;
                full[yo + to[r + 1]] = v1;
                full[yo + to[r + 2]] = v2;
                full[yo + to[r + 3]] = v3;
            }
            for (; r < laws; r++) {
                double v = k[r];
                for (int f = 0; f < nf; f++) {
                    v += m[r * nf + f] * z[zo + f];
                }
                for (int i = 0; i < ni; i++) {
                    v += nx[r * ni + i] * x[xo + i];
                }
                full[yo + to[r]] = v;
            }
            double first = full[yo + to[0]];
            if (first - first == 0) {
                st[s] = SampleStatus.OK;
            } else {
                st[s] = finite(z, zo, nf) && finite(x, xo, ni) ? SampleStatus.NOT_CONVERGED : SampleStatus.NOT_FINITE;
            }
        }
    }

    void forwardAffine(double[] x, int batch, double[] full, byte[] st, Completion.Workspace ws, boolean certify) {
        // C is affine in y_c: per stage, C(y_stage = 0) + B y_stage = 0, so y_stage = −B⁻¹ C(0); then one
        // refinement with the same B
        for (int g = 0; g < stages.stages.size(); g++) {
            Stages.Stage stage = stages.stages.get(g);
            for (int s = 0; s < batch; s++) {
                for (int q : stage.vars()) {
                    full[s * nOut + completed[q]] = 0;
                }
            }
            if (stageLu[g] != null) {
                evaluator.residuals(x, full, batch, ws.residual, null, ws.evaluation);
            } else {
                completedJacobian.evaluate(x, full, batch, ws.residual, null, ws.jy, ws.evaluation);
            }
            for (int s = 0; s < batch; s++) {
                if (st[s] != SampleStatus.OK) {
                    continue;
                }
                if (!factorSample(s, g, ws)) {
                    st[s] = SampleStatus.SINGULAR;
                    continue;
                }
                applyStep(s, g, 1.0, full, ws);
            }
        }
        // every stage's block factors are kept (at their own offsets), so the refinement can reuse them
        if (certify) {
            refineAll(x, batch, full, st, ws);
        }
    }

    /**
     * Checks every sample once; only when some sample is above rounding level, refines stage by stage (one
     * correction with its block where its laws are not yet within the bound) and checks again.
     */
    void refineAll(double[] x, int batch, double[] full, byte[] st, Completion.Workspace ws) {
        evaluator.residuals(x, full, batch, ws.residual, ws.scale, ws.evaluation);
        boolean needed = false;
        for (int s = 0; s < batch && !needed; s++) {
            needed = st[s] == SampleStatus.OK && !converged(s, ws, null);
        }
        if (!needed) {
            return;
        }
        for (int g = 0; g < stages.stages.size(); g++) {
            refineStage(x, batch, full, st, ws, g);
        }
        verify(x, batch, full, st, ws);
    }

    void refineStage(double[] x, int batch, double[] full, byte[] st, Completion.Workspace ws, int g) {
        evaluator.residuals(x, full, batch, ws.residual, ws.scale, ws.evaluation);
        Stages.Stage stage = stages.stages.get(g);
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.OK && !converged(s, ws, stage.laws())) {
                // the block's factors from the solve are still in place (or constant)
                applyStep(s, g, 1.0, full, ws);
            }
        }
    }

    /** y_stage ← y_stage − t·B⁻¹ r_stage for sample s, with the stage block's factors in place. */
    void applyStep(int s, int g, double t, double[] full, Completion.Workspace ws) {
        Stages.Stage stage = stages.stages.get(g);
        int m = stage.size();
        double[] v = ws.vector;
        for (int j = 0; j < m; j++) {
            v[j] = -ws.residual[s * n + stage.laws()[j]];
        }
        if (stageLu[g] != null) {
            DenseLu.solve(stageLu[g], m, stagePivot[g], v, 0);
        } else {
            DenseLu.solve(ws.lu, m, ws.pivots, v, 0, s * n * n + stages.offsets[g], s * n + pivotOffset(g));
        }
        for (int j = 0; j < m; j++) {
            full[s * nOut + completed[stage.vars()[j]]] += t * v[j];
        }
    }

    /** Builds the stage block of sample s from the evaluator's dC/dy entries and factors it into the workspace. */
    boolean factorSample(int s, int g, Completion.Workspace ws) {
        if (stageLu[g] != null) {
            return true;
        }
        Stages.Stage stage = stages.stages.get(g);
        int m = stage.size();
        int nnz = evaluator.outputNonzeros();
        int base = s * n * n + stages.offsets[g];
        Arrays.fill(ws.lu, base, base + m * m, 0.0);
        int[] entries = stage.entries();
        for (int k = 0; k < entries.length; k++) {
            ws.lu[base + stage.rows()[k] * m + stage.cols()[k]] = ws.jy[s * nnz + entries[k]];
        }
        return DenseLu.factor(ws.lu, m, ws.pivots, base, s * n + pivotOffset(g));
    }

    /** @return where stage g's pivots start within a sample's n pivot slots (the stages' sizes add up to n) */
    int pivotOffset(int g) {
        int at = 0;
        for (int h = 0; h < g; h++) {
            at += stages.stages.get(h).size();
        }
        return at;
    }

    /** Builds the whole block A = ∂C/∂y_c of sample s (for gradients) and factors it into the workspace. */
    boolean factorWhole(int s, Completion.Workspace ws) {
        if (constantLu != null) {
            return true;
        }
        int nnz = evaluator.outputNonzeros();
        int base = s * n * n;
        Arrays.fill(ws.lu, base, base + n * n, 0.0);
        for (int e = 0; e < nnz; e++) {
            int k = entryRole[e];
            if (k >= 0) {
                ws.lu[base + entryLaw[e] * n + k] = ws.jy[s * nnz + e];
            }
        }
        return DenseLu.factor(ws.lu, n, ws.pivots, base, s * n);
    }

    /** Final check of the documented bound: a sample that misses it is not converged. */
    void verify(double[] x, int batch, double[] full, byte[] st, Completion.Workspace ws) {
        evaluator.residuals(x, full, batch, ws.residual, ws.scale, ws.evaluation);
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.OK && !converged(s, ws, null)) {
                st[s] = SampleStatus.NOT_CONVERGED;
            }
        }
    }

    /** @return whether the given laws (all when null) of sample s are within the documented bound */
    boolean converged(int s, Completion.Workspace ws, int[] subset) {
        int count = subset == null ? n : subset.length;
        for (int j = 0; j < count; j++) {
            int i = subset == null ? j : subset[j];
            double r = ws.residual[s * n + i];
            double scale = ws.scale[s * n + i];
            // an infinite scale would admit any residual: an output that overflowed is never within the bound
            if (!(Math.abs(r) <= boundFactor[i] * EPS * scale) || scale == Double.POSITIVE_INFINITY) {
                return false;
            }
        }
        return true;
    }

    void forwardNewton(double[] x, int batch, double[] full, byte[] st, Completion.Workspace ws, boolean certify) {
        // starting values: guesses where the law text gives them, the generic start values elsewhere
        for (int s = 0; s < batch; s++) {
            for (int k = 0; k < n; k++) {
                full[s * nOut + completed[k]] = startValue[k];
            }
        }
        if (guessEvaluator != null) {
            guessEvaluator.residuals(x, full, batch, ws.guesses, null, ws.guessEvaluation);
            int g = guessTarget.length;
            for (int s = 0; s < batch; s++) {
                for (int j = 0; j < g; j++) {
                    double v = ws.guesses[s * g + j];
                    full[s * nOut + completed[guessTarget[j]]] = Double.isFinite(v) ? v : startValue[guessTarget[j]];
                }
            }
        }
        for (int g = 0; g < stages.stages.size(); g++) {
            newtonStage(x, batch, full, st, ws, g);
        }
        // each stage stopped with its own laws within the bound and later stages do not move its outputs; the
        // final pass re-checks every law of every sample in one evaluation
        if (certify) {
            verify(x, batch, full, st, ws);
        }
    }

    /**
     * Damped Newton on one stage for every sample at once: each batch evaluation serves all samples still
     * iterating; a step that does not reduce the scaled residual norm is halved (down to 1/1024).
     */
    void newtonStage(double[] x, int batch, double[] full, byte[] st, Completion.Workspace ws, int g) {
        Stages.Stage stage = stages.stages.get(g);
        int[] stageLaws = stage.laws();
        int m = stage.size();
        double[] norm = ws.norm;
        double[] length = ws.stepLength;
        Arrays.fill(norm, 0, batch, Double.POSITIVE_INFINITY);
        Arrays.fill(length, 0, batch, 0.0);
        Arrays.fill(ws.iterations, 0, batch, 0);
        int remaining = 0;
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.OK) {
                st[s] = SampleStatus.NOT_CONVERGED;
                remaining++;
            }
        }
        for (int iteration = 0; iteration <= 4 * maxIterations && remaining > 0; iteration++) {
            evaluateActive(x, full, batch, st, length, ws);
            remaining = 0;
            for (int s = 0; s < batch; s++) {
                if (st[s] != SampleStatus.NOT_CONVERGED || length[s] < 0) {
                    continue;
                }
                if (converged(s, ws, stageLaws)) {
                    st[s] = SampleStatus.OK;
                    continue;
                }
                // judged in the scales of the last accepted point: the scale moves with the iterate, and a norm
                // divided by the current scale can stay at 1 while the residual itself falls
                double nrm = scaledNorm(s, ws, stageLaws, true);
                double t = length[s];
                if (t > 0 && !(nrm < (1 - 1e-4 * t) * norm[s])) {
                    // backtrack: halve the step from the previous point
                    if (t < 1.0 / 1024) {
                        length[s] = -1;
                        continue;
                    }
                    t /= 2;
                    length[s] = t;
                    for (int j = 0; j < m; j++) {
                        int o = completed[stage.vars()[j]];
                        full[s * nOut + o] = ws.previous[s * n + j] + t * ws.step[s * n + j];
                    }
                    remaining++;
                    continue;
                }
                if (ws.iterations[s] >= maxIterations) {
                    length[s] = -1;
                    continue;
                }
                for (int i : stageLaws) {
                    ws.referenceScale[s * n + i] = ws.scale[s * n + i] > 0 ? ws.scale[s * n + i] : 1;
                }
                norm[s] = scaledNorm(s, ws, stageLaws, true);
                if (!factorSample(s, g, ws)) {
                    // singular where Newton starts: the start is at fault; later, Newton has broken down
                    st[s] = ws.iterations[s] == 0 ? SampleStatus.SINGULAR : SampleStatus.NOT_CONVERGED;
                    continue;
                }
                double[] v = ws.vector;
                for (int j = 0; j < m; j++) {
                    v[j] = -ws.residual[s * n + stageLaws[j]];
                }
                if (stageLu[g] != null) {
                    DenseLu.solve(stageLu[g], m, stagePivot[g], v, 0);
                } else {
                    DenseLu.solve(ws.lu, m, ws.pivots, v, 0, s * n * n + stages.offsets[g], s * n + pivotOffset(g));
                }
                for (int j = 0; j < m; j++) {
                    int o = completed[stage.vars()[j]];
                    ws.previous[s * n + j] = full[s * nOut + o];
                    ws.step[s * n + j] = v[j];
                    full[s * nOut + o] += v[j];
                }
                length[s] = 1;
                ws.iterations[s]++;
                remaining++;
            }
        }
    }

    /**
     * Residuals, scales and the completed columns' dC/dy of the samples Newton still iterates on, into their rows of
     * the workspace (other rows are left as they were). Samples converge at different iterations, so once a quarter
     * of the batch is done the rest are gathered into contiguous rows and evaluated alone: the batch then costs the
     * sum of its samples' iterations rather than the batch size times the slowest sample's.
     */
    private void evaluateActive(double[] x, double[] full, int batch, byte[] st, double[] length,
            Completion.Workspace ws) {
        int[] active = ws.active;
        int count = 0;
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.NOT_CONVERGED && length[s] >= 0) {
                active[count++] = s;
            }
        }
        if (4 * count >= 3 * batch) {
            completedJacobian.evaluate(x, full, batch, ws.residual, ws.scale, ws.jy, ws.evaluation);
            return;
        }
        if (count == 0) {
            return;
        }
        int nnz = evaluator.outputNonzeros();
        for (int a = 0; a < count; a++) {
            int s = active[a];
            if (nIn > 0) {
                System.arraycopy(x, s * nIn, ws.activeX, a * nIn, nIn);
            }
            System.arraycopy(full, s * nOut, ws.activeY, a * nOut, nOut);
        }
        completedJacobian.evaluate(nIn > 0 ? ws.activeX : x, ws.activeY, count, ws.activeResidual, ws.activeScale,
                ws.activeJy, ws.evaluation);
        for (int a = 0; a < count; a++) {
            int s = active[a];
            System.arraycopy(ws.activeResidual, a * n, ws.residual, s * n, n);
            System.arraycopy(ws.activeScale, a * n, ws.scale, s * n, n);
            System.arraycopy(ws.activeJy, a * nnz, ws.jy, s * nnz, nnz);
        }
    }

    double scaledNorm(int s, Completion.Workspace ws, int[] subset, boolean reference) {
        double sum = 0;
        for (int i : subset) {
            double sc = reference ? ws.referenceScale[s * n + i] : ws.scale[s * n + i];
            double r = ws.residual[s * n + i] / (sc > 0 ? sc : 1);
            sum += r * r;
        }
        return Math.sqrt(sum);
    }


    /** Marks as not converged every sample still OK whose completed outputs are not all finite. */
    void markNonFiniteResults(int batch, double[] full, byte[] st) {
        for (int s = 0; s < batch; s++) {
            if (st[s] != SampleStatus.OK) {
                continue;
            }
            for (int k = 0; k < n; k++) {
                if (!Double.isFinite(full[s * nOut + completed[k]])) {
                    st[s] = SampleStatus.NOT_CONVERGED;
                    break;
                }
            }
        }
    }

    /**
     * Writes the free outputs into their columns of the full rows and, unless {@code st} is null, sets each
     * sample's status: OK, or NOT_FINITE when an input or free output is NaN or infinite.
     */
    void scatterFree(double[] x, double[] z, int batch, double[] full, byte[] st) {
        for (int s = 0; s < batch; s++) {
            int zo = s * nFree;
            int yo = s * nOut;
            for (int k = 0; k < freeRunFrom.length; k++) {
                System.arraycopy(z, zo + freeRunFrom[k], full, yo + freeRunTo[k], freeRunLength[k]);
            }
            if (st != null) {
                st[s] = finite(z, zo, nFree) && finite(x, s * nIn, nIn) ? SampleStatus.OK : SampleStatus.NOT_FINITE;
            }
        }
    }

    /** @return whether {@code a[from .. from+count)} are all finite (no NaN, no infinity) */
    static boolean finite(double[] a, int from, int count) {
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
        return (p0 + p1) + (p2 + p3) + (p4 + p5) + (p6 + p7) == 0;
    }

    /**
     * The vector-Jacobian product at the solution: for the constant-affine tier ḡ_z = ḡ_f + Mᵀḡ_c, ḡ_x = Nᵀḡ_c;
     * otherwise Aᵀλ = ḡ_c, ḡ_z = ḡ_f − (∂C/∂z)ᵀλ, ḡ_x = −(∂C/∂x)ᵀλ. {@code full} and {@code g} hold the outputs
     * and their gradients in declared order; rows with a non-finite value get NaN gradients.
     *
     * @return the first sample whose A is singular when {@code throwOnSingular}, else −1 (singular rows are NaN)
     */
    int backward(boolean constantAffine, boolean throwOnSingular, double[] x, int batch, double[] full, double[] g,
                 double[] gz, double[] gx, Completion.Workspace ws) {
        if (constantAffine) {
            for (int s = 0; s < batch; s++) {
                if (!finiteRow(full, g, s)) {
                    nanGradients(s, gz, gx);
                    continue;
                }
                // ḡ_z = ḡ_f + Mᵀ ḡ_c and ḡ_x = Nᵀ ḡ_c: rows of M (N) are read in order, four per pass over ḡ_z
                int zo = s * nFree;
                int go = s * nOut;
                for (int k = 0; k < freeRunFrom.length; k++) {
                    System.arraycopy(g, go + freeRunTo[k], gz, zo + freeRunFrom[k], freeRunLength[k]);
                }
                if (gx != null) {
                    Arrays.fill(gx, s * nIn, (s + 1) * nIn, 0.0);
                }
                int r = 0;
                for (; r + 4 <= n; r += 4) {
                    double g0 = g[go + completed[r]];
                    double g1 = g[go + completed[r + 1]];
                    double g2 = g[go + completed[r + 2]];
                    double g3 = g[go + completed[r + 3]];
                    int m0 = r * nFree;
                    for (int f = 0; f < nFree; f++) {
                        gz[zo + f] = gz[zo + f] + foldM[m0 + f] * g0 + foldM[m0 + nFree + f] * g1
                                + foldM[m0 + 2 * nFree + f] * g2 + foldM[m0 + 3 * nFree + f] * g3;
                    }
                    if (gx != null) {
                        int n0 = r * nIn;
                        int xo = s * nIn;
                        for (int i = 0; i < nIn; i++) {
                            gx[xo + i] = gx[xo + i] + foldN[n0 + i] * g0 + foldN[n0 + nIn + i] * g1
                                    + foldN[n0 + 2 * nIn + i] * g2 + foldN[n0 + 3 * nIn + i] * g3;
                        }
                    }
                }
                for (; r < n; r++) {
                    double gc = g[go + completed[r]];
                    int mo = r * nFree;
                    for (int f = 0; f < nFree; f++) {
                        gz[zo + f] += foldM[mo + f] * gc;
                    }
                    if (gx != null) {
                        int no = r * nIn;
                        int xo = s * nIn;
                        for (int i = 0; i < nIn; i++) {
                            gx[xo + i] += foldN[no + i] * gc;
                        }
                    }
                }
            }
            return -1;
        }
        evaluator.evaluate(x, full, batch, null, null, ws.jy, gx == null ? null : ws.jx, ws.evaluation);
        int nnz = evaluator.outputNonzeros();
        int nnzX = evaluator.inputNonzeros();
        double[] lambda = ws.vector;
        for (int s = 0; s < batch; s++) {
            if (!finiteRow(full, g, s)) {
                // a masked sample (NaN outputs) has no gradient either
                nanGradients(s, gz, gx);
                continue;
            }
            if (!factorWhole(s, ws)) {
                if (throwOnSingular) {
                    return s;
                }
                Arrays.fill(gz, s * nFree, (s + 1) * nFree, Double.NaN);
                if (gx != null) {
                    Arrays.fill(gx, s * nIn, (s + 1) * nIn, Double.NaN);
                }
                continue;
            }
            for (int k = 0; k < n; k++) {
                lambda[k] = g[s * nOut + completed[k]];
            }
            if (constantLu != null) {
                DenseLu.solveTransposed(constantLu, n, constantPivot, lambda, 0);
            } else {
                DenseLu.solveTransposed(ws.lu, n, ws.pivots, lambda, 0, s * n * n, s * n);
            }
            for (int f = 0; f < nFree; f++) {
                gz[s * nFree + f] = g[s * nOut + free[f]];
            }
            for (int e = 0; e < nnz; e++) {
                int r = entryRole[e];
                if (r < 0) {
                    gz[s * nFree + (-r - 1)] -= ws.jy[s * nnz + e] * lambda[entryLaw[e]];
                }
            }
            if (gx != null) {
                Arrays.fill(gx, s * nIn, (s + 1) * nIn, 0.0);
                for (int e = 0; e < nnzX; e++) {
                    gx[s * nIn + inEntryColumn[e]] -= ws.jx[s * nnzX + e] * lambda[inEntryLaw[e]];
                }
            }
        }
        return -1;
    }

    private boolean finiteRow(double[] full, double[] g, int s) {
        return finite(full, s * nOut, nOut) && finite(g, s * nOut, nOut);
    }

    private void nanGradients(int s, double[] gz, double[] gx) {
        Arrays.fill(gz, s * nFree, (s + 1) * nFree, Double.NaN);
        if (gx != null) {
            Arrays.fill(gx, s * nIn, (s + 1) * nIn, Double.NaN);
        }
    }
}
