package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.Stages;

/**
 * The affine tier: C is affine in y_c, so per stage C(y_stage = 0) + B y_stage = 0 and y_stage = −B⁻¹C(0), one LU
 * solve per sample and stage (or the plan's factors when B is constant); then, when certifying, the check of the
 * bound and one refinement with the same factors. Gradients by {@link ImplicitGradient}.
 */
final class StagedLuSolver implements TierSolver {
    private final Columns columns;
    private final Certifier certifier;
    private final StageBlocks blocks;
    private final ImplicitGradient gradient;
    private final LawEvaluator evaluator;
    /** Residuals, scales and dC/dy of the completed columns only: all a forward solve reads. */
    private final LawEvaluator.Partial completedJacobian;
    private final Stages stages;
    private final SolveWork work;
    private final int[] completed;
    private final int nOut;

    StagedLuSolver(CompletionPlan plan, Columns columns) {
        this.columns = columns;
        this.certifier = new Certifier(plan);
        this.blocks = new StageBlocks(plan, certifier);
        this.gradient = new ImplicitGradient(plan);
        this.evaluator = plan.evaluator();
        this.completedJacobian = plan.evaluator().partial(plan.completed());
        this.stages = plan.stages();
        this.work = new SolveWork(plan, true);
        this.completed = plan.completed();
        this.nOut = plan.outputWidth();
    }

    @Override
    public void forward(double[] x, double[] z, int batch, double[] full, byte[] st, boolean certify) {
        work.ensure(batch);
        columns.scatterFree(x, z, batch, full, st);
        for (int g = 0; g < stages.count(); g++) {
            Stages.Stage stage = stages.get(g);
            for (int s = 0; s < batch; s++) {
                for (int q : stage.vars()) {
                    full[s * nOut + completed[q]] = 0;
                }
            }
            if (blocks.isConstant()) {
                evaluator.residuals(x, full, batch, work.residual, null, work.evaluation);
            } else {
                completedJacobian.evaluate(x, full, batch, work.residual, null, work.jy, work.evaluation);
            }
            for (int s = 0; s < batch; s++) {
                if (st[s] != SampleStatus.OK) {
                    continue;
                }
                if (!blocks.factorSample(s, g, work)) {
                    st[s] = SampleStatus.SINGULAR;
                    continue;
                }
                blocks.applyStep(s, g, 1.0, full, work);
            }
        }
        // every stage's block factors are kept (at their own offsets), so the refinement can reuse them
        if (certify) {
            blocks.refineAll(x, batch, full, st, work);
        } else {
            certifier.markNonFiniteResults(batch, full, st);
        }
    }

    @Override
    public int backward(double[] x, int batch, double[] full, double[] g, double[] gz, double[] gx,
            boolean throwOnSingular) {
        work.ensure(batch);
        return gradient.backward(x, batch, full, g, gz, gx, throwOnSingular, work);
    }
}
