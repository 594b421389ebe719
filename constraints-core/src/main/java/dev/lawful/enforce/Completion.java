package dev.lawful.enforce;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.CompletionPlanner;
import dev.lawful.enforce.plan.ReferencePoint;
import dev.lawful.enforce.solve.Columns;
import dev.lawful.enforce.solve.FailureReport;
import dev.lawful.enforce.solve.LimitStep;
import dev.lawful.enforce.solve.TierSolver;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Residual completion: the network predicts the free outputs z, and this enforcer computes the n completed
 * outputs y_c from the n scalar laws C(x, z, y_c) = 0, so every law holds to rounding.
 *
 * <p><b>Tiers</b> ({@link Tier}): constant-affine law sets are folded at build time into y_c = M z + N x + k;
 * affine ones solve A(x, z) y_c = b(x, z) per sample by LU with partial pivoting (A = ∂C/∂y_c); nonlinear ones
 * run damped Newton per sample from the law text's {@code guess} values (or, without a guess, from fixed values
 * between 0.5 and 1.5 of the output's declared unit, different per output so that symmetric laws are not started
 * on their degenerate point; which root Newton then finds is not specified), stopping when every residual is at
 * rounding level or after
 * {@link Builder#maxIterations(int)} steps. Every tier ends with one refinement step on the residual evaluated with
 * compensated sums.
 *
 * <p><b>Exactness.</b> With the double entry points each scalar law i holds to
 * |C_i| ≤ (d_i + 3)·2⁻⁵³·s_i, where s_i is its natural scale (the sum of the magnitudes of its addends with
 * products distributed over sums, {@link dev.lawful.algebra.ExpandedLaws#scale(int)}) and d_i its rounding depth
 * (products, quotients, powers and functions along the deepest addend,
 * {@link dev.lawful.algebra.ExpandedLaws#roundingDepth(int)}); for an element balance d_i is 1, so the bound is
 * 4 double ulps of the magnitude of its terms. The bound is checked on every sample: a sample that misses it counts
 * as not converged, never as a silent success (a caller that only trains on the outputs may skip this final check
 * with {@link BoundCheck#SKIP}; the result is then the solve's alone and not certified). With the float entry points the outputs are rounded to float
 * after enforcement in double, which adds at most ½·Σ_j |∂C_i/∂y_c,j|·ulp_f32(y_c,j) (plus the double bound):
 * for a law linear in its completed outputs that is at most 2⁻²⁴·s_i, about one float ulp of the magnitude of
 * its terms; a term y_c^k contributes up to k times as much.
 *
 * <p><b>Gradients</b> (identical for all tiers, from the implicit function theorem, never by unrolling Newton):
 * with upstream ḡ on the outputs, solve Aᵀλ = ḡ_c at the solution, then ḡ_z = ḡ_f − (∂C/∂z)ᵀλ and
 * ḡ_x = −(∂C/∂x)ᵀλ. {@link #jacobians} gives dy/dz and dy/dx per sample.
 *
 * <p><b>Bad samples</b>: NaN or infinite inputs, a singular A, or a Newton that does not converge never give
 * silently wrong numbers. By default ({@link OnBadSample#THROW}) the call fails with an
 * {@link EnforcementException} naming the sample and the laws; with {@link OnBadSample#MASK} the sample's outputs
 * are NaN and its {@link SampleStatus} code goes to the caller's status mask.
 *
 * <p><b>Layout</b>: outputs come back in declaration order by default (so label columns never need reordering),
 * or free outputs first and completed last ({@link Layout#FREE_FIRST}); {@link #columns()} names each column.
 *
 * <p><b>Structure</b>: the build makes an immutable {@link CompletionPlan} ({@link CompletionPlanner}); each
 * {@link Workspace} holds a {@link TierSolver} of the plan's tier with that thread's work arrays.
 *
 * <p>Immutable and safe to share between threads; each thread passes its own {@link Workspace} (or null, to
 * allocate one for the call).
 */
public final class Completion {
    /** Column order of the full output vector. */
    public enum Layout {
        /** Outputs in the order the law set declares them. */
        DECLARED,
        /** Free outputs first (in {@link #freeOutputs()} order), then completed ones. */
        FREE_FIRST
    }

    private final CompletionPlan plan;
    private final Columns columns;
    private final FailureReport failures;
    private final OnBadSample policy;
    private final Layout layout;
    private final int nIn;
    private final int nOut;
    private final int nFree;

    /**
     * Work arrays for one thread: the solver of this completion's tier with its own arrays, and the conversion
     * buffers of the float entry points and of the free-first layout. Grows to the largest batch it has seen, then
     * allocates nothing. Not thread-safe.
     */
    public static final class Workspace {
        private final Completion owner;
        private final TierSolver solver;
        /** Keeps samples inside the limits, or null when the law set has none. */
        private final LimitStep limitStep;
        private int capacity;
        private double[] x;
        private double[] z;
        private double[] y;
        private double[] out;
        private double[] g;
        private double[] gyFloat;
        private double[] gz;
        private double[] gx;
        private byte[] status;

        private Workspace(Completion owner) {
            this.owner = owner;
            this.solver = TierSolver.create(owner.plan, owner.columns);
            this.limitStep = owner.plan.limits() == null ? null : new LimitStep(owner.plan, solver);
        }

        private void ensure(int batch) {
            if (batch <= capacity) {
                return;
            }
            Completion c = owner;
            capacity = batch;
            x = new double[batch * c.nIn];
            z = new double[batch * c.nFree];
            y = new double[batch * c.nOut];
            out = new double[batch * c.nOut];
            g = new double[batch * c.nOut];
            gyFloat = new double[batch * c.nOut];
            gz = new double[batch * c.nFree];
            gx = new double[batch * c.nIn];
            status = new byte[batch];
        }
    }

    /** Configures a completion; see {@link Completion#builder(LawSet)}. */
    public static final class Builder {
        private final LawSet laws;
        private String[] completedNames;
        private boolean automatic;
        private String[] allowed;
        private OnBadSample policy = OnBadSample.THROW;
        private Layout layout = Layout.DECLARED;
        private int maxIterations = 50;
        private double[] xRef;
        private double[] yRef;
        private double[] limitScales;

        private Builder(LawSet laws) {
            this.laws = laws;
        }

        /** Completes exactly these output elements ({@code name} or {@code name[i]}), overriding the law text. */
        public Builder complete(String... elements) {
            this.completedNames = elements.clone();
            this.automatic = false;
            return this;
        }

        /** Lets the library choose the best-conditioned completed outputs, overriding the law text. */
        public Builder automatic() {
            this.automatic = true;
            this.completedNames = null;
            return this;
        }

        /** Restricts the automatic choice to these output elements (default: all outputs). */
        public Builder allow(String... elements) {
            this.allowed = elements.clone();
            return this;
        }

        /** What to do with a sample that cannot be enforced (default {@link OnBadSample#THROW}). */
        public Builder onBadSample(OnBadSample policy) {
            this.policy = policy;
            return this;
        }

        /** Column order of the outputs (default {@link Layout#DECLARED}). */
        public Builder layout(Layout layout) {
            this.layout = layout;
            return this;
        }

        /** Newton's iteration cap for nonlinear laws (default 50). */
        public Builder maxIterations(int maxIterations) {
            if (maxIterations < 1) {
                throw new IllegalArgumentException("maxIterations must be at least 1, found " + maxIterations);
            }
            this.maxIterations = maxIterations;
            return this;
        }

        /**
         * The point (inputs, outputs in declared units) where the automatic choice, the rank check and the
         * condition number are evaluated. Default: {@link ReferencePoint#generic(LawSet)}, a fixed generic point
         * (the same on every run), so that special points where laws happen to be dependent are not met by accident.
         */
        public Builder referencePoint(double[] x, double[] y) {
            this.xRef = x.clone();
            this.yRef = y.clone();
            return this;
        }

        /**
         * The metric in which a sample outside a limit is moved: the free outputs change so that
         * Σ_o ((y*_o − y_o)/size_o)², over all outputs, free and completed, is least while laws and limits hold.
         * Pass the sizes the loss sees (a normalizer's standard deviations) so the move is the smallest one in the
         * loss's terms. Default: 1 of each output's declared unit.
         *
         * @param sizes one positive, finite size per output element, in its declared unit (copied)
         * @return this builder
         */
        public Builder limitScales(double... sizes) {
            this.limitScales = sizes.clone();
            return this;
        }

        /**
         * @return the completion
         * @throws dev.lawful.algebra.LawException when the choice is impossible: wrong number of completed outputs,
         *         an output no law involves, dependent (redundant or contradictory) laws, a singular block, or a
         *         guess that uses a completed output
         * @throws IllegalArgumentException when the reference point's lengths do not match the law set
         */
        public Completion build() {
            ReferencePoint reference = null;
            if (xRef != null && laws.expand().size() > 0) {
                reference = ReferencePoint.of(laws, xRef, yRef);
            }
            return new Completion(this, CompletionPlanner.plan(laws, new CompletionPlanner.Request(completedNames,
                    automatic, allowed, maxIterations, reference, limitScales)));
        }
    }

    /**
     * @param laws the law set
     * @return a completion of the outputs named by the law text's {@code complete} statement, or of an automatic
     *         well-conditioned choice when there is none; failing on bad samples
     */
    public static Completion of(LawSet laws) {
        return builder(laws).build();
    }

    /** @return a builder for a completion of {@code laws} */
    public static Builder builder(LawSet laws) {
        return new Builder(laws);
    }

    private Completion(Builder b, CompletionPlan plan) {
        this.plan = plan;
        this.columns = new Columns(plan);
        this.failures = new FailureReport(plan);
        this.policy = b.policy;
        this.layout = b.layout;
        this.nIn = plan.inputWidth();
        this.nOut = plan.outputWidth();
        this.nFree = plan.freeWidth();
    }

    // ---- description -----------------------------------------------------------------------------------------

    /** @return the law set */
    public LawSet laws() {
        return plan.laws();
    }

    /** @return how the laws are solved */
    public Tier tier() {
        return plan.tier();
    }

    /** @return the 2-norm condition number of ∂C/∂y_c at the reference point */
    public double condition() {
        return plan.condition();
    }

    /** @return notes from the build: the automatic choice, ill-conditioning, missing guesses */
    public List<String> warnings() {
        return plan.warnings();
    }

    /** @return the bad-sample policy */
    public OnBadSample onBadSample() {
        return policy;
    }

    /** @return the output layout */
    public Layout layout() {
        return layout;
    }

    /** @return the free output elements (what the network predicts), as indices into the declared outputs */
    public int[] freeOutputs() {
        return plan.free().clone();
    }

    /** @return the completed output elements, as indices into the declared outputs, in solve order */
    public int[] completedOutputs() {
        return plan.completed().clone();
    }

    /** @return names of the free output elements, {@code name} or {@code name[i]} */
    public List<String> freeNames() {
        return names(plan.free());
    }

    /** @return names of the completed output elements */
    public List<String> completedNames() {
        return names(plan.completed());
    }

    /** @return the name of each column of the full output vector, in this completion's layout */
    public List<String> columns() {
        if (layout == Layout.DECLARED) {
            return plan.laws().outputNames();
        }
        List<String> c = new ArrayList<>(names(plan.free()));
        c.addAll(names(plan.completed()));
        return c;
    }

    /** @return input elements per sample */
    public int inputWidth() {
        return nIn;
    }

    /** @return free output elements per sample (the network head's width) */
    public int freeWidth() {
        return nFree;
    }

    /** @return output elements per sample */
    public int outputWidth() {
        return nOut;
    }

    /** @return a new workspace for one thread */
    public Workspace newWorkspace() {
        return new Workspace(this);
    }

    // ---- forward ---------------------------------------------------------------------------------------------

    /**
     * Completes a batch in double precision.
     *
     * @param x         inputs, {@code batch * inputWidth()} values in declared units (null when there are none);
     *                  read only
     * @param z         free outputs, {@code batch * freeWidth()} values in {@link #freeOutputs()} order; read only
     * @param batch     number of samples
     * @param y         output buffer, modified: {@code batch * outputWidth()} values in this completion's layout
     * @param status    optional output buffer of {@code batch} bytes for {@link SampleStatus} codes (null to skip)
     * @param workspace this thread's workspace, or null to allocate one for this call
     * @throws EnforcementException under {@link OnBadSample#THROW} for the first sample that cannot be enforced (what
     *         {@code y} then holds is unspecified)
     * @throws IllegalArgumentException when an array is too short or the workspace belongs to another completion
     */
    public void forward(double[] x, double[] z, int batch, double[] y, byte[] status, Workspace workspace) {
        forward(x, z, batch, y, status, workspace, BoundCheck.EVERY_SAMPLE);
    }

    /**
     * Completes a batch in double precision, certifying the result or not as {@code check} says (see
     * {@link BoundCheck}: {@link BoundCheck#SKIP} is for training, where it saves one evaluation of every law per
     * sample).
     *
     * @see #forward(double[], double[], int, double[], byte[], Workspace)
     */
    public void forward(double[] x, double[] z, int batch, double[] y, byte[] status, Workspace workspace,
            BoundCheck check) {
        if (check == null) {
            throw new IllegalArgumentException("check must be BoundCheck.EVERY_SAMPLE or BoundCheck.SKIP, not null");
        }
        need("x", x, (long) batch * nIn);
        need("z", z, (long) batch * nFree);
        need("y", y, (long) batch * nOut);
        if (status != null) {
            need(status, batch);
        }
        if (batch == 0) {
            return;
        }
        Workspace ws = mine(workspace);
        ws.ensure(batch);
        // in declared order the caller's buffer is the solve's (unless it is also an input)
        double[] full = layout == Layout.DECLARED && y != x && y != z ? y : ws.y;
        byte[] st = ws.status;
        ws.solver.forward(x, z, batch, full, st, check == BoundCheck.EVERY_SAMPLE);
        if (ws.limitStep != null) {
            ws.limitStep.apply(x, batch, full, st);
        }
        if (policy == OnBadSample.THROW) {
            for (int s = 0; s < batch; s++) {
                if (st[s] != SampleStatus.OK) {
                    throw failures.failure(s, st[s]);
                }
            }
        }
        columns.toLayout(batch, full, st, y, layout == Layout.FREE_FIRST);
        if (status != null) {
            System.arraycopy(st, 0, status, 0, batch);
        }
    }

    /**
     * Completes a batch given and returned in float; the enforcement runs in double and the outputs are rounded at
     * the end (see the class documentation for the resulting bound).
     *
     * @see #forward(double[], double[], int, double[], byte[], Workspace)
     */
    public void forward(float[] x, float[] z, int batch, float[] y, byte[] status, Workspace workspace) {
        forward(x, z, batch, y, status, workspace, BoundCheck.EVERY_SAMPLE);
    }

    /**
     * Float variant of {@link #forward(double[], double[], int, double[], byte[], Workspace, BoundCheck)}.
     *
     * @param y output buffer, modified: {@code batch * outputWidth()} values
     */
    public void forward(float[] x, float[] z, int batch, float[] y, byte[] status, Workspace workspace,
            BoundCheck check) {
        need("x", x, (long) batch * nIn);
        need("z", z, (long) batch * nFree);
        need("y", y, (long) batch * nOut);
        if (batch == 0) {
            return;
        }
        Workspace ws = mine(workspace);
        ws.ensure(batch);
        widen(x, ws.x, batch * nIn);
        widen(z, ws.z, batch * nFree);
        forward(ws.x, ws.z, batch, ws.out, status, ws, check);
        for (int i = 0; i < batch * nOut; i++) {
            y[i] = (float) ws.out[i];
        }
    }

    // ---- gradients -------------------------------------------------------------------------------------------

    /**
     * Vector-Jacobian product: maps gradients on the outputs to gradients on the free outputs (and inputs), by
     * the implicit function theorem at the solution {@code y}. With limits, a sample that lies on a limit gets the
     * gradient of the move: the completion's gradient projected onto the active limits' null space in the move's
     * metric, and the limits' own dependence on the inputs (exact when the laws' and the limits' coefficients on
     * the outputs are constants; see {@code docs/mathematics.md} for the other tiers and the one-sided choice at a
     * switch between active sets).
     *
     * @param x         inputs of the forward call (null when there are none); read only
     * @param y         outputs the forward call returned (this completion's layout); read only
     * @param gradOut   upstream gradients ∂L/∂y on the outputs, same layout; read only
     * @param batch     number of samples
     * @param gradZ     output buffer, modified: ∂L/∂z, {@code batch * freeWidth()} values
     * @param gradX     optional output buffer, modified: ∂L/∂x, {@code batch * inputWidth()} values (null to skip)
     * @param workspace this thread's workspace, or null to allocate one for this call
     * @throws EnforcementException under {@link OnBadSample#THROW} when A is singular at a sample (under MASK its
     *         gradients are NaN)
     * @throws IllegalArgumentException when an array is too short or the workspace belongs to another completion
     */
    public void backward(double[] x, double[] y, double[] gradOut, int batch, double[] gradZ, double[] gradX,
            Workspace workspace) {
        need("x", x, (long) batch * nIn);
        need("y", y, (long) batch * nOut);
        need("gradOut", gradOut, (long) batch * nOut);
        need("gradZ", gradZ, (long) batch * nFree);
        if (gradX != null) {
            need("gradX", gradX, (long) batch * nIn);
        }
        if (batch == 0) {
            return;
        }
        Workspace ws = mine(workspace);
        ws.ensure(batch);
        double[] full = y;
        double[] g = gradOut;
        if (layout != Layout.DECLARED) {
            // the solve reads outputs and gradients in declared order
            full = ws.y;
            g = ws.g;
            columns.fromFreeFirst(batch, y, full);
            columns.fromFreeFirst(batch, gradOut, g);
        }
        int singular = ws.solver.backward(x, batch, full, g, gradZ, gradX, policy == OnBadSample.THROW);
        if (singular >= 0) {
            throw failures.failure(singular, SampleStatus.SINGULAR);
        }
        if (ws.limitStep != null) {
            ws.limitStep.gradients(x, batch, full, gradZ, gradX);
        }
    }

    /**
     * Float variant of {@link #backward(double[], double[], double[], int, double[], double[], Workspace)}: widened
     * to double, computed in double, rounded once.
     *
     * @param gradZ output buffer, modified: {@code batch * freeWidth()} values
     * @param gradX optional output buffer, modified: {@code batch * inputWidth()} values (null to skip)
     * @throws IllegalArgumentException when an array is too short
     */
    public void backward(float[] x, float[] y, float[] gradOut, int batch, float[] gradZ, float[] gradX,
            Workspace workspace) {
        need("x", x, (long) batch * nIn);
        need("y", y, (long) batch * nOut);
        need("gradOut", gradOut, (long) batch * nOut);
        need("gradZ", gradZ, (long) batch * nFree);
        if (gradX != null) {
            need("gradX", gradX, (long) batch * nIn);
        }
        if (batch == 0) {
            return;
        }
        Workspace ws = mine(workspace);
        ws.ensure(batch);
        widen(x, ws.x, batch * nIn);
        widen(y, ws.out, batch * nOut);
        widen(gradOut, ws.gyFloat, batch * nOut);
        backward(ws.x, ws.out, ws.gyFloat, batch, ws.gz, gradX == null ? null : ws.gx, ws);
        for (int i = 0; i < batch * nFree; i++) {
            gradZ[i] = (float) ws.gz[i];
        }
        if (gradX != null) {
            for (int i = 0; i < batch * nIn; i++) {
                gradX[i] = (float) ws.gx[i];
            }
        }
    }

    /**
     * Full per-sample Jacobians of the outputs at the solution: {@code dzOut} = ∂y/∂z (outputWidth × freeWidth,
     * row-major, rows in this completion's layout) and {@code dxOut} = ∂y/∂x (outputWidth × inputWidth). Costs
     * outputWidth vector-Jacobian products per batch, and allocates their buffers.
     *
     * @param x         inputs (null when there are none); read only
     * @param y         outputs from forward, this completion's layout; read only
     * @param batch     number of samples
     * @param dzOut     optional output buffer, modified: {@code batch * outputWidth * freeWidth} values (null to skip)
     * @param dxOut     optional output buffer, modified: {@code batch * outputWidth * inputWidth} values (null to skip)
     * @param workspace this thread's workspace, or null to allocate one for this call
     */
    public void jacobians(double[] x, double[] y, int batch, double[] dzOut, double[] dxOut, Workspace workspace) {
        if (dzOut != null) {
            need("dzOut", dzOut, (long) batch * nOut * nFree);
        }
        if (dxOut != null) {
            need("dxOut", dxOut, (long) batch * nOut * nIn);
        }
        Workspace ws = mine(workspace);
        double[] gy = new double[batch * nOut];
        double[] gz = new double[batch * nFree];
        double[] gx = dxOut == null ? null : new double[batch * nIn];
        // one vector-Jacobian product per output row: exact, and reuses the backward path of every tier
        for (int c = 0; c < nOut; c++) {
            Arrays.fill(gy, 0);
            for (int s = 0; s < batch; s++) {
                gy[s * nOut + c] = 1;
            }
            backward(x, y, gy, batch, gz, gx, ws);
            for (int s = 0; s < batch; s++) {
                if (dzOut != null) {
                    System.arraycopy(gz, s * nFree, dzOut, (s * nOut + c) * nFree, nFree);
                }
                if (dxOut != null) {
                    System.arraycopy(gx, s * nIn, dxOut, (s * nOut + c) * nIn, nIn);
                }
            }
        }
    }

    // ---- helpers ---------------------------------------------------------------------------------------------

    private Workspace mine(Workspace ws) {
        if (ws == null) {
            return newWorkspace();
        }
        if (ws.owner != this) {
            throw new IllegalArgumentException("the workspace belongs to another completion; use this completion's"
                    + " newWorkspace() (one per thread)");
        }
        return ws;
    }

    private List<String> names(int[] outputs) {
        List<String> all = plan.laws().outputNames();
        List<String> out = new ArrayList<>(outputs.length);
        for (int o : outputs) {
            out.add(all.get(o));
        }
        return out;
    }

    private static void widen(float[] from, double[] to, int count) {
        for (int i = 0; i < count; i++) {
            to[i] = from[i];
        }
    }

    private static void need(String what, double[] a, long count) {
        if (count > 0 && (a == null || a.length < count)) {
            throw new IllegalArgumentException(what + " must hold at least " + count + " values for this batch, found "
                    + (a == null ? "null" : a.length));
        }
    }

    private static void need(String what, float[] a, long count) {
        if (count > 0 && (a == null || a.length < count)) {
            throw new IllegalArgumentException(what + " must hold at least " + count + " values for this batch, found "
                    + (a == null ? "null" : a.length));
        }
    }

    private static void need(byte[] status, int batch) {
        if (status.length < batch) {
            throw new IllegalArgumentException("status must hold at least " + batch + " bytes, found " + status.length);
        }
    }
}
