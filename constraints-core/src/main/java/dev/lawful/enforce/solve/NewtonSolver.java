package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.ResidualSplit;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.NewtonStart;
import dev.lawful.enforce.plan.Stages;
import java.util.Arrays;

/**
 * The nonlinear tier: damped Newton per stage for every sample at once, from the law text's guesses (or the
 * plan's generic starting values), stopping each sample when its stage's laws are within the rounding bound or
 * after the iteration cap; then, when certifying, one check of every law. Gradients by {@link ImplicitGradient}.
 */
final class NewtonSolver implements TierSolver {
    /** A sample that no longer iterates: converged, failed, or out of step halvings. */
    private static final double STOPPED = -1;
    /**
     * How many times the rounding bound a residual of the split evaluation may be before the whole laws are
     * evaluated for that sample: far above the split's own error (a few roundings of the scale), and at about
     * 1e-13 of the scale still below where Newton's last quadratic step starts.
     */
    private static final double NEAR = 1024;

    private final Columns columns;
    private final Certifier certifier;
    private final StageBlocks blocks;
    private final ImplicitGradient gradient;
    private final LawEvaluator.Partial completedJacobian;
    /**
     * The laws split into the addends Newton's steps leave alone (inputs and free outputs only), evaluated once per
     * forward, and those they move ({@link ResidualSplit}); null when no law has an addend of the first kind.
     */
    private final ResidualSplit split;
    private final ResidualSplit.Workspace splitWork;
    private final Stages stages;
    private final NewtonStart start;
    private final LawEvaluator.Workspace guessEvaluation;
    private final SolveWork work;
    private final int[] completed;
    private final int n;
    private final int nIn;
    private final int nOut;
    private final int nnz;
    private final int maxIterations;
    private int capacity;
    /** Per sample: the point before the last step, the step, the step length t (or {@link #STOPPED}). */
    private double[] previous;
    private double[] step;
    private double[] stepLength;
    /** Per sample: the scaled residual norm at the last accepted point, and the scales it was judged in. */
    private double[] norm;
    private double[] referenceScale;
    private int[] iterations;
    private double[] guesses;
    /** The samples still iterating, gathered: their indices, inputs, outputs and evaluations. */
    private int[] active;
    private double[] activeX;
    private double[] activeY;
    private double[] activeResidual;
    private double[] activeScale;
    private double[] activeJy;
    /** Per sample, and gathered for the samples evaluated: the fixed parts of residuals and scales. */
    private double[] fixedResidual;
    private double[] fixedScale;
    private double[] activeFixedResidual;
    private double[] activeFixedScale;

    NewtonSolver(CompletionPlan plan, Columns columns) {
        this.columns = columns;
        this.certifier = new Certifier(plan);
        this.blocks = new StageBlocks(plan, certifier);
        this.gradient = new ImplicitGradient(plan);
        this.completedJacobian = plan.evaluator().partial(plan.completed());
        ResidualSplit parts = ResidualSplit.of(plan.expanded(), plan.evaluator(), plan.completed());
        this.split = parts.fixedAddends() == 0 ? null : parts;
        this.splitWork = split == null ? null : split.newWorkspace();
        this.stages = plan.stages();
        this.start = plan.start();
        this.guessEvaluation = start.guesses() == null ? null : start.guesses().newWorkspace();
        this.work = new SolveWork(plan, true);
        this.completed = plan.completed();
        this.n = plan.lawCount();
        this.nIn = plan.inputWidth();
        this.nOut = plan.outputWidth();
        this.nnz = plan.evaluator().outputNonzeros();
        this.maxIterations = plan.maxIterations();
    }

    private void ensure(int batch) {
        work.ensure(batch);
        if (batch <= capacity) {
            return;
        }
        capacity = batch;
        previous = new double[batch * n];
        step = new double[batch * n];
        stepLength = new double[batch];
        norm = new double[batch];
        referenceScale = new double[batch * n];
        iterations = new int[batch];
        guesses = start.guesses() == null ? null : new double[batch * start.guesses().lawCount()];
        active = new int[batch];
        activeX = new double[batch * nIn];
        activeY = new double[batch * nOut];
        activeResidual = new double[batch * n];
        activeScale = new double[batch * n];
        activeJy = new double[batch * nnz];
        fixedResidual = new double[batch * n];
        fixedScale = new double[batch * n];
        activeFixedResidual = new double[batch * n];
        activeFixedScale = new double[batch * n];
    }

    @Override
    public void forward(double[] x, double[] z, int batch, double[] full, byte[] st, boolean certify) {
        ensure(batch);
        columns.scatterFree(x, z, batch, full, st);
        if (split != null) {
            split.fixed(x, full, batch, fixedResidual, fixedScale, splitWork);
        }
        startValues(x, batch, full);
        for (int g = 0; g < stages.count(); g++) {
            stage(x, batch, full, st, g);
        }
        // each stage stopped with its own laws within the bound and later stages do not move its outputs; the
        // final pass re-checks every law of every sample in one evaluation
        if (certify) {
            certifier.verify(x, batch, full, st, work);
        } else {
            certifier.markNonFiniteResults(batch, full, st);
        }
    }

    /** Guesses where the law text gives them, the generic start values elsewhere (and where a guess is not finite). */
    private void startValues(double[] x, int batch, double[] full) {
        double[] startValue = start.start();
        for (int s = 0; s < batch; s++) {
            for (int k = 0; k < n; k++) {
                full[s * nOut + completed[k]] = startValue[k];
            }
        }
        if (start.guesses() != null) {
            start.guesses().residuals(x, full, batch, guesses, null, guessEvaluation);
            int[] target = start.target();
            int g = target.length;
            for (int s = 0; s < batch; s++) {
                for (int j = 0; j < g; j++) {
                    double v = guesses[s * g + j];
                    full[s * nOut + completed[target[j]]] = Double.isFinite(v) ? v : startValue[target[j]];
                }
            }
        }
    }

    /**
     * Damped Newton on one stage for every sample at once: each batch evaluation serves all samples still
     * iterating; a step that does not reduce the scaled residual norm is halved (down to 1/1024).
     */
    private void stage(double[] x, int batch, double[] full, byte[] st, int g) {
        Arrays.fill(norm, 0, batch, Double.POSITIVE_INFINITY);
        Arrays.fill(stepLength, 0, batch, 0.0);
        Arrays.fill(iterations, 0, batch, 0);
        int remaining = 0;
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.OK) {
                st[s] = SampleStatus.NOT_CONVERGED;
                remaining++;
            }
        }
        for (int iteration = 0; iteration <= 4 * maxIterations && remaining > 0; iteration++) {
            evaluateActive(x, full, batch, st, stages.get(g).laws());
            remaining = 0;
            for (int s = 0; s < batch; s++) {
                if (st[s] == SampleStatus.NOT_CONVERGED && stepLength[s] >= 0 && iterate(s, g, full, st)) {
                    remaining++;
                }
            }
        }
    }

    /**
     * One Newton decision for sample s at its evaluated point: converged, backtrack, give up, or take a step.
     *
     * @return whether the sample goes on iterating
     */
    private boolean iterate(int s, int g, double[] full, byte[] st) {
        Stages.Stage stage = stages.get(g);
        int[] stageLaws = stage.laws();
        if (certifier.converged(s, work, stageLaws)) {
            st[s] = SampleStatus.OK;
            return false;
        }
        // judged in the scales of the last accepted point: the scale moves with the iterate, and a norm divided by
        // the current scale can stay at 1 while the residual itself falls
        double nrm = scaledNorm(s, stageLaws);
        double t = stepLength[s];
        if (t > 0 && !(nrm < (1 - 1e-4 * t) * norm[s])) {
            return backtrack(s, stage, t, full);
        }
        if (iterations[s] >= maxIterations) {
            stepLength[s] = STOPPED;
            return false;
        }
        for (int i : stageLaws) {
            referenceScale[s * n + i] = work.scale[s * n + i] > 0 ? work.scale[s * n + i] : 1;
        }
        norm[s] = scaledNorm(s, stageLaws);
        if (!blocks.factorSample(s, g, work)) {
            // singular where Newton starts: the start is at fault; later, Newton has broken down
            st[s] = iterations[s] == 0 ? SampleStatus.SINGULAR : SampleStatus.NOT_CONVERGED;
            return false;
        }
        double[] v = work.vector;
        blocks.solveStep(s, g, work, v);
        for (int j = 0; j < stage.size(); j++) {
            int o = completed[stage.vars()[j]];
            previous[s * n + j] = full[s * nOut + o];
            step[s * n + j] = v[j];
            full[s * nOut + o] += v[j];
        }
        stepLength[s] = 1;
        iterations[s]++;
        return true;
    }

    /** Halves the step from the previous point, or stops the sample below a step of 1/1024. */
    private boolean backtrack(int s, Stages.Stage stage, double t, double[] full) {
        if (t < 1.0 / 1024) {
            stepLength[s] = STOPPED;
            return false;
        }
        t /= 2;
        stepLength[s] = t;
        for (int j = 0; j < stage.size(); j++) {
            int o = completed[stage.vars()[j]];
            full[s * nOut + o] = previous[s * n + j] + t * step[s * n + j];
        }
        return true;
    }

    /**
     * Residuals, scales and the completed columns' dC/dy of the samples Newton still iterates on, into their rows of
     * the work arrays (other rows are left as they were). Samples converge at different iterations, so once a
     * quarter of the batch is done the rest are gathered into contiguous rows and evaluated alone: the batch then
     * costs the sum of its samples' iterations rather than the batch size times the slowest sample's.
     *
     * <p>With a {@link ResidualSplit}, the laws' fixed parts were evaluated once and only the moving parts are
     * evaluated here; a sample whose residuals come out within {@link #NEAR} times the rounding bound is then
     * evaluated again on the whole laws, whose residual is accurate to a rounding of itself rather than of the
     * scale: Newton's stopping test and its last steps (where the residual is a few roundings of the scale and the
     * split's own rounding would stall the line search) always see the whole evaluation.
     */
    private void evaluateActive(double[] x, double[] full, int batch, byte[] st, int[] stageLaws) {
        int count = 0;
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.NOT_CONVERGED && stepLength[s] >= 0) {
                active[count++] = s;
            }
        }
        if (count == 0) {
            return;
        }
        if (split == null) {
            evaluateRows(x, full, batch, count, false);
            return;
        }
        evaluateRows(x, full, batch, count, true);
        int near = 0;
        for (int a = 0; a < count; a++) {
            int s = active[a];
            if (certifier.within(s, work, stageLaws, NEAR)) {
                active[near++] = s;
            }
        }
        if (near > 0) {
            evaluateRows(x, full, batch, near, false);
        }
    }

    /**
     * Evaluates the samples {@code active[0 .. count)}: the whole batch in place when they are most of it, else
     * gathered; with the split's moving parts or on the whole laws.
     */
    private void evaluateRows(double[] x, double[] full, int batch, int count, boolean moving) {
        if (4 * count >= 3 * batch) {
            if (moving) {
                split.evaluate(x, full, batch, fixedResidual, fixedScale, work.residual, work.scale, work.jy,
                        splitWork);
            } else {
                completedJacobian.evaluate(x, full, batch, work.residual, work.scale, work.jy, work.evaluation);
            }
            return;
        }
        for (int a = 0; a < count; a++) {
            int s = active[a];
            if (nIn > 0) {
                System.arraycopy(x, s * nIn, activeX, a * nIn, nIn);
            }
            System.arraycopy(full, s * nOut, activeY, a * nOut, nOut);
            if (moving) {
                System.arraycopy(fixedResidual, s * n, activeFixedResidual, a * n, n);
                System.arraycopy(fixedScale, s * n, activeFixedScale, a * n, n);
            }
        }
        double[] xs = nIn > 0 ? activeX : x;
        if (moving) {
            split.evaluate(xs, activeY, count, activeFixedResidual, activeFixedScale, activeResidual, activeScale,
                    activeJy, splitWork);
        } else {
            completedJacobian.evaluate(xs, activeY, count, activeResidual, activeScale, activeJy, work.evaluation);
        }
        for (int a = 0; a < count; a++) {
            int s = active[a];
            System.arraycopy(activeResidual, a * n, work.residual, s * n, n);
            System.arraycopy(activeScale, a * n, work.scale, s * n, n);
            System.arraycopy(activeJy, a * nnz, work.jy, s * nnz, nnz);
        }
    }

    /** @return the 2-norm of the stage's residuals, each divided by its scale at the last accepted point */
    private double scaledNorm(int s, int[] subset) {
        double sum = 0;
        for (int i : subset) {
            double sc = referenceScale[s * n + i];
            double r = work.residual[s * n + i] / (sc > 0 ? sc : 1);
            sum += r * r;
        }
        return Math.sqrt(sum);
    }

    @Override
    public int backward(double[] x, int batch, double[] full, double[] g, double[] gz, double[] gx,
            boolean throwOnSingular) {
        work.ensure(batch);
        return gradient.backward(x, batch, full, g, gz, gx, throwOnSingular, work);
    }
}
