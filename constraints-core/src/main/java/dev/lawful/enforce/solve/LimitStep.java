package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.linear.DenseQp;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.LimitPlan;

/**
 * Keeps completed samples inside the limits g_j(x, y) ≥ 0. A sample whose completion already satisfies every limit
 * is left as it is, bit for bit (one evaluation and one comparison per limit). Otherwise the free outputs move the
 * least, in the plan's metric, so that laws and limits both hold: with J = dy_c/dz = −A⁻¹ ∂C/∂z at the current
 * solution (the implicit function theorem) and G = dg/dy, the step solves the strictly convex quadratic programme
 * <pre>  min ½ (u − z)ᵀ W (u − z)   s.t.   (G_f + G_c J) u ≥ (G_f + G_c J) z − g,   W = S_f + Jᵀ S_c J</pre>
 * (S = diag(1/size²)) by the dual active-set method ({@link DenseQp}), then completes the laws exactly at u. When
 * the completed outputs are affine in the free ones with coefficients that depend on the inputs only, the
 * linearisation is exact and one step suffices; otherwise the step repeats, up to the plan's cap.
 *
 * <p>A limit on one output by a constant holds exactly: an output the step leaves within rounding of its limit
 * is set to the limit itself (the laws then still hold to their bound, which is checked again). A limit on an
 * expression holds to (3)·2⁻⁵³ of its natural scale. A sample for which no step reaches the limits gets
 * {@link SampleStatus#OUTSIDE_LIMITS}. Not thread-safe: one per workspace.
 */
public final class LimitStep {
    private static final double EPS = 0x1p-53;
    /** Relative size below which a wrong-side free output counts as the projection's rounding and is snapped. */
    private static final double SNAP = 1e-9;
    /**
     * Relative margin by which limits that are not on one free output are aimed inside: above the programme's
     * feasibility tolerance, so the exact completion that follows lands inside rather than a rounding error outside.
     */
    private static final double MARGIN = 4 * DenseQp.DEFAULT_FEASIBILITY_TOLERANCE;

    private final LimitPlan limits;
    private final TierSolver solver;
    private final LawEvaluator evaluator;
    private final Certifier certifier;
    private final LimitLinearisation lin;
    private final LimitGradient gradient;
    private final int[] role;
    private final int[] free;
    private final int k;
    private final int m;
    private final int p;
    private final int nIn;
    private final DenseQp qp;
    private final LawEvaluator.Workspace limitWork;
    private double[] g = new double[0];
    private double[] gScale = new double[0];
    private final double[] xs;
    private final double[] zs;
    private final double[] us;
    private final double[] ys;
    private final double[] backup;
    private final byte[] st1 = new byte[1];
    private final double[] bqp;
    private final double[] magnitude;
    private final double[] lambda;
    private final int[] active;
    /** The plan's per-limit arrays, read directly by the per-sample check. */
    private final int[] single;
    private final double[] bound;
    private final boolean[] lower;
    /** Whether every limit bounds one output by a constant, so the fast path needs no evaluation. */
    private final boolean allConstantBounds;
    /**
     * The limits of one output by a constant, for the per-sample check: the output, and the limit as
     * {@code sign·y >= sign·bound} (sign +1 for a lower limit, −1 for an upper one; negation is exact).
     */
    private final int[] singleOutput;
    private final double[] singleSign;
    private final double[] singleSignedBound;
    /** The other limits (on expressions), checked against their values and scales. */
    private final int[] expressionLimits;

    /**
     * @param plan   a plan with limits
     * @param solver this workspace's solver of the plan's tier, used again to complete a moved sample once the
     *               batch's solve is done
     */
    public LimitStep(CompletionPlan plan, TierSolver solver) {
        this.limits = plan.limits();
        this.solver = solver;
        this.evaluator = limits.evaluator();
        this.certifier = new Certifier(plan);
        this.lin = new LimitLinearisation(plan);
        this.gradient = new LimitGradient(plan, lin);
        this.role = plan.roles().role();
        this.free = plan.free();
        this.k = plan.freeWidth();
        this.m = limits.count();
        this.p = plan.outputWidth();
        this.nIn = plan.inputWidth();
        this.qp = new DenseQp(Math.max(1, k), m);
        this.limitWork = evaluator.newWorkspace();
        this.xs = new double[nIn];
        this.zs = new double[k];
        this.us = new double[k];
        this.ys = new double[p];
        this.backup = new double[p];
        this.bqp = new double[m];
        this.magnitude = new double[m];
        this.lambda = new double[m];
        this.active = new int[Math.max(1, Math.min(k, m))];
        this.single = limits.singleOutput();
        this.bound = limits.bound();
        this.lower = limits.lower();
        int singles = 0;
        for (int j = 0; j < m; j++) {
            singles += single[j] >= 0 ? 1 : 0;
        }
        this.singleOutput = new int[singles];
        this.singleSign = new double[singles];
        this.singleSignedBound = new double[singles];
        this.expressionLimits = new int[m - singles];
        int a = 0;
        int b = 0;
        for (int j = 0; j < m; j++) {
            if (single[j] >= 0) {
                double sign = lower[j] ? 1 : -1;
                singleOutput[a] = single[j];
                singleSign[a] = sign;
                singleSignedBound[a++] = sign * bound[j];
            } else {
                expressionLimits[b++] = j;
            }
        }
        this.allConstantBounds = expressionLimits.length == 0;
    }

    /**
     * Moves every OK sample that is outside a limit.
     *
     * @param x     inputs, read only
     * @param full  modified: the full rows of moved samples
     * @param st    modified: OUTSIDE_LIMITS (or another failure) for samples that cannot be moved inside
     * @return the number of samples moved
     */
    public int apply(double[] x, int batch, double[] full, byte[] st) {
        evaluateExpressions(x, batch, full);
        int moved = 0;
        for (int s = 0; s < batch; s++) {
            if (st[s] != SampleStatus.OK || inside(full, s * p, g, gScale, s * m)) {
                continue;
            }
            moved++;
            st[s] = move(x, s, full);
        }
        return moved;
    }

    /**
     * The values and scales of every limit of a batch, into {@code g} and {@code gScale}, when some limit is on an
     * expression; limits of one output by a constant are compared with the outputs directly and need none.
     */
    private void evaluateExpressions(double[] x, int batch, double[] full) {
        if (allConstantBounds) {
            return;
        }
        if (g.length < batch * m) {
            g = new double[batch * m];
            gScale = new double[batch * m];
        }
        evaluator.residuals(x, full, batch, g, gScale, limitWork);
    }

    /**
     * @return whether a row satisfies every limit: a single output against its constant exactly, an expression
     *         limit to its rounding bound
     */
    private boolean inside(double[] row, int ro, double[] values, double[] scales, int go) {
        final int[] out = this.singleOutput;
        final double[] sign = this.singleSign;
        final double[] signedBound = this.singleSignedBound;
        for (int i = 0; i < out.length; i++) {
            // false for NaN, as the limit itself
            if (!(sign[i] * row[ro + out[i]] >= signedBound[i])) {
                return false;
            }
        }
        for (int j : expressionLimits) {
            if (!(values[go + j] >= -3 * EPS * scales[go + j])) {
                return false;
            }
        }
        return true;
    }

    /** Linearise, project, complete, until the row is inside or the cap is reached. */
    private byte move(double[] x, int s, double[] full) {
        if (nIn > 0) {
            System.arraycopy(x, s * nIn, xs, 0, nIn);
        }
        System.arraycopy(full, s * p, ys, 0, p);
        for (int f = 0; f < k; f++) {
            zs[f] = ys[free[f]];
        }
        if (settlesOnLimits(g, gScale, s * m)) {
            System.arraycopy(ys, 0, full, s * p, p);
            return SampleStatus.OK;
        }
        for (int iteration = 0; iteration < limits.maxIterations(); iteration++) {
            if (!lin.linearise(xs, ys, false)) {
                return SampleStatus.SINGULAR;
            }
            rightHandSides();
            if (!qp.factor(lin.w, k)) {
                return SampleStatus.OUTSIDE_LIMITS;
            }
            int code = qp.solve(lin.rows, bqp, m, zs, us, lambda, active);
            if (code < 0) {
                return SampleStatus.OUTSIDE_LIMITS;
            }
            snapFree();
            solver.forward(xs, us, 1, ys, st1, true);
            if (st1[0] != SampleStatus.OK) {
                return st1[0];
            }
            System.arraycopy(us, 0, zs, 0, k);
            lin.values(xs, ys);
            if (inside(ys, 0, lin.g, lin.gScale, 0) || settlesOnLimits(lin.g, lin.gScale, 0)) {
                System.arraycopy(ys, 0, full, s * p, p);
                return SampleStatus.OK;
            }
        }
        return SampleStatus.OUTSIDE_LIMITS;
    }

    /**
     * The programme's right-hand sides: row j holds for u when (row_j)·u ≥ (row_j)·z − g_j, aimed inside by a
     * margin unless the limit bounds one free output by a constant.
     */
    private void rightHandSides() {
        for (int j = 0; j < m; j++) {
            double b = -lin.g[j];
            double mag = Math.abs(lin.g[j]);
            for (int f = 0; f < k; f++) {
                b += lin.rows[j * k + f] * zs[f];
                mag += Math.abs(lin.rows[j * k + f] * zs[f]);
            }
            magnitude[j] = mag;
            bqp[j] = isFreeSingle(j) ? b : b + MARGIN * mag;
        }
    }

    private boolean isFreeSingle(int j) {
        return single[j] >= 0 && role[single[j]] < 0;
    }

    /**
     * A free output the programme left within rounding of its constant limit (on either side: there the limit is
     * active) is set to the limit itself, so it holds exactly and the least move lands on it.
     */
    private void snapFree() {
        for (int j = 0; j < m; j++) {
            if (isFreeSingle(j)) {
                int f = -role[single[j]] - 1;
                if (near(j, us[f])) {
                    us[f] = bound[j];
                }
            }
        }
    }

    /**
     * A completion that misses only limits of completed outputs by a constant, each by no more than the laws'
     * rounding allows, is settled by setting those outputs to their limits: when every law still holds to its
     * documented bound there (the certificate decides, not a guess at the size of the rounding), the sample keeps its
     * free outputs and sits exactly on its limits. A truth row with no rain then completes to no rain, not to a
     * margin above it.
     *
     * @param values the current row's limit values (read only for limits on expressions), from {@code go}
     * @param scales their natural scales
     * @return whether the current row was settled (ys then holds it); otherwise ys is unchanged
     */
    private boolean settlesOnLimits(double[] values, double[] scales, int go) {
        boolean changed = false;
        for (int j = 0; j < m; j++) {
            int o = single[j];
            boolean expressionOutside = o < 0 && !(values[go + j] >= -3 * EPS * scales[go + j]);
            if (expressionOutside || (o >= 0 && wrongSide(j, ys[o]) && role[o] < 0)) {
                return false;
            }
        }
        System.arraycopy(ys, 0, backup, 0, p);
        for (int j = 0; j < m; j++) {
            int o = single[j];
            if (o >= 0 && wrongSide(j, ys[o])) {
                ys[o] = bound[j];
                changed = true;
            }
        }
        if (changed && lawsHold()) {
            return true;
        }
        System.arraycopy(backup, 0, ys, 0, p);
        return false;
    }

    private boolean wrongSide(int j, double y) {
        return lower[j] ? y < bound[j] : y > bound[j];
    }

    /** @return whether y is within rounding of limit j's constant, judged by the size of the programme's row */
    private boolean near(int j, double y) {
        double scale = Math.abs(bound[j]) + Math.abs(y) + magnitude[j] / Math.max(1e-300, rowNorm(j));
        return Math.abs(y - bound[j]) <= SNAP * scale;
    }

    private double rowNorm(int j) {
        double r = 0;
        for (int f = 0; f < k; f++) {
            r = Math.max(r, Math.abs(lin.rows[j * k + f]));
        }
        return r;
    }

    /** @return whether every law still holds to its bound at the row after snapping */
    private boolean lawsHold() {
        st1[0] = SampleStatus.OK;
        certifier.verify(xs, 1, ys, st1, lin.check);
        return st1[0] == SampleStatus.OK;
    }

    /**
     * Turns the completion's gradients of a batch into the gradients through the limits: unchanged for a sample
     * inside every limit, projected onto the active limits' null space for a sample on one ({@link LimitGradient}).
     *
     * @param x    inputs of the forward call; read only
     * @param full the full rows the forward call returned, declared order; read only
     * @param gz   modified: the completion's ḡ on the free outputs on entry, the gradient through the limits on return
     * @param gx   optional, modified likewise for the inputs
     */
    public void gradients(double[] x, int batch, double[] full, double[] gz, double[] gx) {
        gradient.correct(x, batch, full, gz, gx);
    }
}
