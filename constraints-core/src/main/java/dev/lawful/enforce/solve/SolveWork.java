package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.plan.CompletionPlan;

/**
 * Work arrays of one thread shared by a solver's stages, the certifying check and the gradients. Grows to the
 * largest batch it has seen, then allocates nothing. The per-sample block arrays ({@link #jy}, {@link #jx},
 * {@link #lu}, {@link #pivots}) exist only for solvers that factor blocks per sample.
 */
final class SolveWork {
    final LawEvaluator.Workspace evaluation;
    /** One sample's right-hand side or λ. */
    final double[] vector;
    private final CompletionPlan plan;
    private final boolean perSampleBlocks;
    private int capacity;
    /** Residual and natural scale of every law, {@code batch * n}. */
    double[] residual;
    double[] scale;
    /** The evaluator's dC/dy and dC/dx entries, {@code batch * nonzeros}. */
    double[] jy;
    double[] jx;
    /** Per-sample block factors ({@code n²} each) and pivots ({@code n} each). */
    double[] lu;
    int[] pivots;

    /**
     * @param plan            the completion's plan
     * @param perSampleBlocks whether blocks are built and factored per sample (affine, nonlinear)
     */
    SolveWork(CompletionPlan plan, boolean perSampleBlocks) {
        this.plan = plan;
        this.perSampleBlocks = perSampleBlocks;
        this.evaluation = plan.evaluator().newWorkspace();
        this.vector = new double[Math.max(1, Math.max(plan.lawCount(), plan.outputWidth()))];
    }

    /** Grows every array to hold {@code batch} samples. */
    void ensure(int batch) {
        if (batch <= capacity) {
            return;
        }
        capacity = batch;
        int n = plan.lawCount();
        residual = new double[batch * n];
        scale = new double[batch * n];
        if (perSampleBlocks) {
            jy = new double[batch * plan.evaluator().outputNonzeros()];
            jx = new double[batch * plan.evaluator().inputNonzeros()];
            lu = new double[batch * n * n];
            pivots = new int[batch * n];
        }
    }
}
