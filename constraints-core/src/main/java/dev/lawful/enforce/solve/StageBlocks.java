package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.linear.DenseLu;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.ConstantBlocks;
import dev.lawful.enforce.plan.Stages;
import java.util.Arrays;

/**
 * The Jacobian blocks of the solve stages: built per sample from the evaluator's dC/dy entries and factored into
 * the thread's work arrays (or taken from the plan when constant), a step y_stage ← y_stage − t·B⁻¹r_stage with
 * them, and the refinement that ends the affine tiers. Immutable.
 */
final class StageBlocks {
    private final LawEvaluator evaluator;
    private final Stages stages;
    private final ConstantBlocks constant;
    private final Certifier certifier;
    private final int[] completed;
    private final int n;
    private final int nOut;

    StageBlocks(CompletionPlan plan, Certifier certifier) {
        this.evaluator = plan.evaluator();
        this.stages = plan.stages();
        this.constant = plan.blocks();
        this.certifier = certifier;
        this.completed = plan.completed();
        this.n = plan.lawCount();
        this.nOut = plan.outputWidth();
    }

    /** @return whether every stage's block is the same for every sample (factored in the plan) */
    boolean isConstant() {
        return constant != null;
    }

    /**
     * Builds the stage block of sample s from {@code w.jy} and factors it into {@code w.lu}, {@code w.pivots}
     * (nothing to do for a constant block).
     *
     * @return false when the block is singular to working precision
     */
    boolean factorSample(int s, int g, SolveWork w) {
        if (constant != null) {
            return true;
        }
        Stages.Stage stage = stages.get(g);
        int m = stage.size();
        int nnz = evaluator.outputNonzeros();
        int base = s * n * n + stages.offset(g);
        Arrays.fill(w.lu, base, base + m * m, 0.0);
        int[] entries = stage.entries();
        for (int k = 0; k < entries.length; k++) {
            w.lu[base + stage.rows()[k] * m + stage.cols()[k]] = w.jy[s * nnz + entries[k]];
        }
        return DenseLu.factor(w.lu, m, w.pivots, base, s * n + stages.pivotOffset(g));
    }

    /**
     * Solves B v = −r_stage for sample s with the stage block's factors in place.
     *
     * @param v modified: the step, {@code stage size} values
     */
    void solveStep(int s, int g, SolveWork w, double[] v) {
        Stages.Stage stage = stages.get(g);
        int m = stage.size();
        for (int j = 0; j < m; j++) {
            v[j] = -w.residual[s * n + stage.laws()[j]];
        }
        if (constant != null) {
            DenseLu.solve(constant.stageLu()[g], m, constant.stagePivot()[g], v, 0);
        } else {
            DenseLu.solve(w.lu, m, w.pivots, v, 0, s * n * n + stages.offset(g), s * n + stages.pivotOffset(g));
        }
    }

    /**
     * y_stage ← y_stage − t·B⁻¹ r_stage for sample s, with the stage block's factors in place.
     *
     * @param full modified: sample s's completed outputs of the stage
     */
    void applyStep(int s, int g, double t, double[] full, SolveWork w) {
        Stages.Stage stage = stages.get(g);
        double[] v = w.vector;
        solveStep(s, g, w, v);
        for (int j = 0; j < stage.size(); j++) {
            full[s * nOut + completed[stage.vars()[j]]] += t * v[j];
        }
    }

    /**
     * Checks every sample once; only when some sample is above rounding level, refines stage by stage (one
     * correction with its block where its laws are not yet within the bound) and checks again.
     *
     * @param full modified: completed outputs
     * @param st   modified: statuses
     */
    void refineAll(double[] x, int batch, double[] full, byte[] st, SolveWork w) {
        evaluator.residuals(x, full, batch, w.residual, w.scale, w.evaluation);
        boolean needed = false;
        for (int s = 0; s < batch && !needed; s++) {
            needed = st[s] == SampleStatus.OK && !certifier.converged(s, w, null);
        }
        if (!needed) {
            return;
        }
        for (int g = 0; g < stages.count(); g++) {
            refineStage(x, batch, full, st, w, g);
        }
        certifier.verify(x, batch, full, st, w);
    }

    private void refineStage(double[] x, int batch, double[] full, byte[] st, SolveWork w, int g) {
        evaluator.residuals(x, full, batch, w.residual, w.scale, w.evaluation);
        Stages.Stage stage = stages.get(g);
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.OK && !certifier.converged(s, w, stage.laws())) {
                // the block's factors from the solve are still in place (or constant)
                applyStep(s, g, 1.0, full, w);
            }
        }
    }
}
