package dev.lawful.enforce.solve;

import dev.lawful.enforce.plan.CompletionPlan;

/**
 * The per-batch solve of one tier with the work arrays of one thread: not thread-safe, so each thread makes its
 * own with {@link #create(CompletionPlan, Columns)}. Rows are full output rows in declared order.
 */
public interface TierSolver {
    /**
     * Completes a batch: writes the free outputs into {@code full}, solves for the completed ones and sets each
     * sample's status ({@link dev.lawful.enforce.SampleStatus}).
     *
     * @param x       inputs, {@code batch * inputWidth} values (declared units); read only
     * @param z       free outputs, {@code batch * freeWidth} values; read only
     * @param batch   number of samples
     * @param full    modified: {@code batch} full rows, declared order
     * @param st      modified: {@code batch} statuses
     * @param certify whether to end with the check of the documented bound on every sample (else only the
     *                outputs' finiteness is checked)
     */
    void forward(double[] x, double[] z, int batch, double[] full, byte[] st, boolean certify);

    /**
     * The vector-Jacobian product at a solution: ḡ_z and optionally ḡ_x from ḡ on the full rows (implicit function
     * theorem). A row with a non-finite output or gradient gets NaN gradients.
     *
     * @param x               inputs of the forward call; read only
     * @param full            the full rows the forward call returned, declared order; read only
     * @param g               upstream gradients on {@code full}; read only
     * @param gz              modified: {@code batch * freeWidth} gradients
     * @param gx              optional, modified: {@code batch * inputWidth} gradients (null to skip)
     * @param throwOnSingular whether to stop at the first sample whose block is singular
     * @return that sample when {@code throwOnSingular}, else −1 (a singular sample's gradients are then NaN)
     */
    int backward(double[] x, int batch, double[] full, double[] g, double[] gz, double[] gx, boolean throwOnSingular);

    /**
     * @param plan    the completion's plan
     * @param columns its column layout
     * @return a new solver of the plan's tier, with its own work arrays
     */
    static TierSolver create(CompletionPlan plan, Columns columns) {
        switch (plan.tier()) {
            case CONSTANT_AFFINE:
                return new FoldSolver(plan, columns);
            case AFFINE:
                return new StagedLuSolver(plan, columns);
            default:
                return new NewtonSolver(plan, columns);
        }
    }
}
