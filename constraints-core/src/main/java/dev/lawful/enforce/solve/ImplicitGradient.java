package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.linear.DenseLu;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.ConstantBlocks;
import java.util.Arrays;

/**
 * The vector-Jacobian product of a completion at its solution, by the implicit function theorem: solve Aᵀλ = ḡ_c
 * with A = ∂C/∂y_c, then ḡ_z = ḡ_f − (∂C/∂z)ᵀλ and ḡ_x = −(∂C/∂x)ᵀλ. The same formula is exact for the affine and
 * the nonlinear tiers, so gradients never unroll Newton. Immutable; the work arrays are the caller's.
 */
final class ImplicitGradient {
    private final LawEvaluator evaluator;
    private final ConstantBlocks constant;
    private final int[] entryLaw;
    private final int[] entryRole;
    private final int[] inEntryLaw;
    private final int[] inEntryColumn;
    private final int[] completed;
    private final int[] free;
    private final int n;
    private final int nIn;
    private final int nOut;
    private final int nFree;
    /**
     * Per dC/dy entry: whether it is the same constant for every sample, and that constant. The backward reads
     * those from here and evaluates only the others ({@link #varying}): a free output that enters a law linearly
     * with a constant coefficient (every free output of a balance law, typically) costs a store per sample
     * otherwise, and the hand-written kernel pays nothing for it.
     */
    private final boolean[] isConstant;
    private final double[] constantEntry;
    private final LawEvaluator.Partial varying;
    private final boolean anyVarying;
    /**
     * The constant dC/dz entries by free column: those of column f are {@code fixedFreeLaw/Value[fixedFreeStart[f]
     * .. fixedFreeStart[f + 1])}, in law order, so that each column's sum runs in a register and is stored once.
     */
    private final int[] fixedFreeStart;
    private final int[] fixedFreeLaw;
    private final double[] fixedFreeValue;
    /** The varying dC/dz entries (role < 0): entry, free column and law. */
    private final int[] varyingFreeEntry;
    private final int[] varyingFreeColumn;
    private final int[] varyingFreeLaw;

    ImplicitGradient(CompletionPlan plan) {
        this.evaluator = plan.evaluator();
        this.constant = plan.blocks();
        this.entryLaw = plan.entries().entryLaw();
        this.entryRole = plan.entries().entryRole();
        this.inEntryLaw = plan.entries().inEntryLaw();
        this.inEntryColumn = plan.entries().inEntryColumn();
        this.completed = plan.completed();
        this.free = plan.free();
        this.n = plan.lawCount();
        this.nIn = plan.inputWidth();
        this.nOut = plan.outputWidth();
        this.nFree = plan.freeWidth();
        this.constantEntry = evaluator.constantOutputEntries();
        this.isConstant = new boolean[constantEntry.length];
        boolean[] evaluated = new boolean[constantEntry.length];
        boolean some = false;
        int fixedCount = 0;
        int varyingCount = 0;
        for (int e = 0; e < constantEntry.length; e++) {
            isConstant[e] = !Double.isNaN(constantEntry[e]);
            evaluated[e] = !isConstant[e];
            some |= evaluated[e];
            if (entryRole[e] < 0) {
                if (isConstant[e]) {
                    fixedCount++;
                } else {
                    varyingCount++;
                }
            }
        }
        this.varying = evaluator.partialEntries(evaluated);
        this.anyVarying = some;
        this.fixedFreeStart = new int[nFree + 1];
        this.fixedFreeLaw = new int[fixedCount];
        this.fixedFreeValue = new double[fixedCount];
        this.varyingFreeEntry = new int[varyingCount];
        this.varyingFreeColumn = new int[varyingCount];
        this.varyingFreeLaw = new int[varyingCount];
        groupFreeEntries();
    }

    /** Fills the lists of dC/dz entries: the constant ones by free column, the varying ones in entry order. */
    private void groupFreeEntries() {
        for (int e = 0; e < constantEntry.length; e++) {
            if (entryRole[e] < 0 && isConstant[e]) {
                fixedFreeStart[-entryRole[e]]++;
            }
        }
        for (int f = 0; f < nFree; f++) {
            fixedFreeStart[f + 1] += fixedFreeStart[f];
        }
        int[] next = Arrays.copyOf(fixedFreeStart, nFree);
        int b = 0;
        // entries are stored law after law, so each column's list comes out in law order
        for (int e = 0; e < constantEntry.length; e++) {
            int r = entryRole[e];
            if (r >= 0) {
                continue;
            }
            if (isConstant[e]) {
                int a = next[-r - 1]++;
                fixedFreeLaw[a] = entryLaw[e];
                fixedFreeValue[a] = constantEntry[e];
            } else {
                varyingFreeEntry[b] = e;
                varyingFreeColumn[b] = -r - 1;
                varyingFreeLaw[b++] = entryLaw[e];
            }
        }
    }

    /**
     * @param w modified: Jacobians, block factors and λ
     * @see TierSolver#backward
     */
    int backward(double[] x, int batch, double[] full, double[] g, double[] gz, double[] gx, boolean throwOnSingular,
            SolveWork w) {
        if (anyVarying || gx != null) {
            varying.evaluate(x, full, batch, null, null, w.jy, gx == null ? null : w.jx, w.evaluation);
        }
        double[] lambda = w.vector;
        for (int s = 0; s < batch; s++) {
            if (!Finite.finite(full, s * nOut, nOut) || !Finite.finite(g, s * nOut, nOut)) {
                // a masked sample (NaN outputs) has no gradient either
                nanRow(s, nFree, nIn, gz, gx);
                continue;
            }
            if (!factorWhole(s, w)) {
                if (throwOnSingular) {
                    return s;
                }
                nanRow(s, nFree, nIn, gz, gx);
                continue;
            }
            for (int k = 0; k < n; k++) {
                lambda[k] = g[s * nOut + completed[k]];
            }
            solveWholeTransposed(s, w, lambda);
            applyLambda(s, g, gz, gx, lambda, w);
        }
        return -1;
    }

    /** ḡ_z = ḡ_f − (∂C/∂z)ᵀλ and ḡ_x = −(∂C/∂x)ᵀλ for sample s. */
    private void applyLambda(int s, double[] g, double[] gz, double[] gx, double[] lambda, SolveWork w) {
        int nnz = entryLaw.length;
        int nnzX = inEntryLaw.length;
        int zAt = s * nFree;
        for (int f = 0; f < nFree; f++) {
            double v = g[s * nOut + free[f]];
            for (int a = fixedFreeStart[f]; a < fixedFreeStart[f + 1]; a++) {
                v -= fixedFreeValue[a] * lambda[fixedFreeLaw[a]];
            }
            gz[zAt + f] = v;
        }
        for (int b = 0; b < varyingFreeEntry.length; b++) {
            gz[zAt + varyingFreeColumn[b]] -= w.jy[s * nnz + varyingFreeEntry[b]] * lambda[varyingFreeLaw[b]];
        }
        if (gx != null) {
            Arrays.fill(gx, s * nIn, (s + 1) * nIn, 0.0);
            for (int e = 0; e < nnzX; e++) {
                gx[s * nIn + inEntryColumn[e]] -= w.jx[s * nnzX + e] * lambda[inEntryLaw[e]];
            }
        }
    }

    /**
     * Solves A v = r for sample s with the factors {@link #factorWhole} left (or the plan's, when A is constant).
     *
     * @param v modified: r on entry, v on return ({@code n} values)
     */
    void solveWhole(int s, SolveWork w, double[] v) {
        if (constant != null) {
            DenseLu.solve(constant.wholeLu(), n, constant.wholePivot(), v, 0);
        } else {
            DenseLu.solve(w.lu, n, w.pivots, v, 0, s * n * n, s * n);
        }
    }

    /**
     * Solves Aᵀ v = r for sample s with the factors {@link #factorWhole} left (or the plan's, when A is constant).
     *
     * @param v modified: r on entry, v on return ({@code n} values)
     */
    void solveWholeTransposed(int s, SolveWork w, double[] v) {
        if (constant != null) {
            DenseLu.solveTransposed(constant.wholeLu(), n, constant.wholePivot(), v, 0);
        } else {
            DenseLu.solveTransposed(w.lu, n, w.pivots, v, 0, s * n * n, s * n);
        }
    }

    /** Builds the whole block A = ∂C/∂y_c of sample s and factors it into the work arrays (unless constant). */
    boolean factorWhole(int s, SolveWork w) {
        if (constant != null) {
            return true;
        }
        int nnz = entryLaw.length;
        int base = s * n * n;
        Arrays.fill(w.lu, base, base + n * n, 0.0);
        for (int e = 0; e < nnz; e++) {
            int k = entryRole[e];
            if (k >= 0) {
                w.lu[base + entryLaw[e] * n + k] = isConstant[e] ? constantEntry[e] : w.jy[s * nnz + e];
            }
        }
        return DenseLu.factor(w.lu, n, w.pivots, base, s * n);
    }

    /**
     * NaN gradients for sample s.
     *
     * @param gz modified: row s
     * @param gx optional, modified: row s
     */
    static void nanRow(int s, int nFree, int nIn, double[] gz, double[] gx) {
        Arrays.fill(gz, s * nFree, (s + 1) * nFree, Double.NaN);
        if (gx != null) {
            Arrays.fill(gx, s * nIn, (s + 1) * nIn, Double.NaN);
        }
    }
}
