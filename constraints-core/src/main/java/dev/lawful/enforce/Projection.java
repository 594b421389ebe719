package dev.lawful.enforce;

import static dev.lawful.enforce.Batches.load;
import static dev.lawful.enforce.Batches.store;

import java.util.Arrays;
import java.util.Objects;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.plan.ReferencePoint;

/**
 * Enforces a law set that is affine in the outputs by projecting each sample's outputs onto the laws: the nearest
 * outputs, in a chosen metric, at which every law holds.
 *
 * <p><b>Formula.</b> Write the n scalar laws as C(x, y) = A(x) y − b(x) = 0 with A = ∂C/∂y (n×p; its entries may
 * depend on the inputs x but not on the outputs y). For each sample the forward map is
 * <pre>
 *   y_out = y − W⁻¹ Aᵀ (A W⁻¹ Aᵀ)⁻¹ C(x, y),      W = diag(w),
 * </pre>
 * the minimiser of Σ_j w_j (y_out_j − y_j)² subject to C(x, y_out) = 0. C is the residual at the incoming y
 * (coherent SI units) and A comes from {@link LawEvaluator} (SI per declared unit), so x and y stay in their
 * declared units throughout. {@link #of(LawSet)} uses W = I, the orthogonal projection in declared units; it fits
 * outputs that share one unit and magnitude. {@link Builder#weights(double[])} sets w_j &gt; 0 (a larger weight
 * moves output j less), and {@link Builder#scales(double[])} sets w_j = 1/scale_j², the unit-aware projection:
 * each output moves in proportion to its typical magnitude whatever unit it is declared in; use it when the
 * outputs differ in unit or magnitude (orthogonal projection would move small outputs by the amounts large ones
 * need). The step comes from a Householder QR of the row-equilibrated A W^-1/2, never from the normal matrix, so
 * its accuracy degrades with cond(A), not cond(A)².
 *
 * <p><b>Precision.</b> Let s_i be law i's natural scale ({@link ExpandedLaws#scale(int)}, as {@link LawEvaluator}
 * reports it) and d_i its rounding depth ({@link ExpandedLaws#roundingDepth(int)}); evaluating the residual is
 * accurate to (d_i + 1)·2⁻⁵³·s_i. After the step the residuals are evaluated again, and a sample with a law above
 * that level gets one refinement step (the same formula at the new outputs; A does not change). The double entry
 * points then guarantee, for every sample they report as {@link SampleStatus#OK},
 * <pre>
 *   |C_i(x, y_out)| ≤ (d_i + 3) · 2⁻⁵³ · s_i(x, y_out)     (an element balance has d_i ≤ 1: two ulps of s_i)
 * </pre>
 * with C_i as the evaluator computes it ({@link #residualBound(int, double)}). The bound is checked on every
 * refined sample; one that misses it is reported as {@link SampleStatus#SINGULAR} (numerically singular), never
 * returned as if it held. The float entry points compute in double and round each output once, which moves law i
 * by at most 2⁻²⁴·s_i (half a float ulp per output, for outputs in float's normal range); they guarantee
 * |C_i| ≤ (2⁻²⁴ + (2d_i + 4)·2⁻⁵³)·s_i for residuals evaluated in double at the float values
 * ({@link #residualBoundFloat(int, double)}).
 *
 * <p><b>Backward.</b> A does not depend on y, so dy_out/dy = P = I − W⁻¹Aᵀ S⁻¹ A with S = A W⁻¹ Aᵀ, and the
 * vector-Jacobian product is ḡ_y = Pᵀ ḡ = ḡ − Aᵀ S⁻¹ A W⁻¹ ḡ. When every output coefficient is a constant,
 * dy_out/dx = −W⁻¹ Aᵀ S⁻¹ ∂C/∂x and ḡ_x = −(∂C/∂x)ᵀ S⁻¹ A W⁻¹ ḡ. When a coefficient depends on an input that
 * gradient needs second derivatives of the laws: {@link #supportsInputGradient()} is false, and asking for it
 * throws {@link UnsupportedOperationException} saying so.
 *
 * <p><b>Refusals at build time</b> ({@link dev.lawful.algebra.LawException} pointing at the law, through
 * {@link LawSet#problem}): a law whose derivative with respect to an output depends on an output (nonlinear in
 * the outputs), naming the law and the output; and laws whose output coefficients are linearly dependent at the
 * <em>reference point</em> (the same generic point as {@link Completion}'s, {@link ReferencePoint#generic}, or the
 * one given to {@link Builder#referencePoint}), tested in the projection's metric with the tolerance
 * {@link #RANK_TOLERANCE}, naming the laws and saying whether one is redundant or the set contradictory. A law set
 * whose coefficients happen to be dependent at that point (such as {@code (x - 1) * y = 0} at x = 1) is refused
 * even if they are independent elsewhere.
 *
 * <p><b>Bad samples</b> follow the {@link OnBadSample} policy: a non-finite input, output, coefficient or residual
 * ({@link SampleStatus#NOT_FINITE}), or laws linearly dependent at that sample ({@link SampleStatus#SINGULAR}).
 * Under {@link OnBadSample#THROW} the call fails with an {@link EnforcementException} naming the sample and the
 * laws (output buffers may then be partly written); under {@link OnBadSample#MASK} the sample's rows are NaN and
 * its status byte says why.
 *
 * <p>Batches are flat row-major arrays ({@code x[s*inputWidth ..]}, {@code y[s*outputWidth ..]}) processed in
 * chunks of {@value LawEvaluator#BLOCK} samples. Immutable and thread-safe; each thread passes its own
 * {@link Workspace}, and then nothing is allocated per sample (nor per call, when the output buffers are given).
 * Results do not depend on the batch size or on the thread.
 */
public final class Projection {
    /**
     * Rank tolerance: a law whose output-coefficient row, scaled to unit length in the metric, lies within this
     * distance of the span of the rows of the laws before it is treated as linearly dependent on them.
     */
    public static final double RANK_TOLERANCE = 1e-10;

    private static final double HALF_EPS = 0x1p-53;
    private static final double HALF_EPS_FLOAT = 0x1p-24;
    private static final int CHUNK = LawEvaluator.BLOCK;

    private final LawSet laws;
    private final int nIn;
    private final int p;
    private final double[] weights;
    private final OnBadSample policy;
    private final String inputGradientRefusal;
    private final ProjectionKernel kernel;

    /**
     * Work arrays for one thread: pass the same one to every call from that thread and nothing is allocated per
     * sample. Not thread-safe; get one from {@link #newWorkspace()}.
     */
    public static final class Workspace {
        final Projection owner;
        final LawEvaluator.Workspace eval;
        final ProjectionFactor factor;
        final double[] x;
        final double[] y;
        final double[] out;
        final double[] prev;
        final double[] res;
        final double[] scale;
        final double[] prevRes;
        final double[] prevScale;
        final double[] jy;
        final double[] jx;
        final double[] g;
        final double[] gx;
        final double[] lambda;
        final double[] unit;
        final byte[] status = new byte[CHUNK];
        final boolean[] refined = new boolean[CHUNK];

        private Workspace(Projection o) {
            ProjectionKernel k = o.kernel;
            owner = o;
            eval = k.evaluator.newWorkspace();
            factor = k.newFactor();
            x = new double[CHUNK * k.nIn];
            y = new double[CHUNK * k.p];
            out = new double[CHUNK * k.p];
            prev = new double[CHUNK * k.p];
            res = new double[CHUNK * k.n];
            scale = new double[CHUNK * k.n];
            prevRes = new double[CHUNK * k.n];
            prevScale = new double[CHUNK * k.n];
            jy = new double[CHUNK * k.nnzY];
            jx = new double[CHUNK * k.nnzX];
            g = new double[CHUNK * k.p];
            gx = new double[CHUNK * k.nIn];
            lambda = new double[k.n];
            unit = new double[k.p];
        }
    }

    /** Configures a projection: its metric and its bad-sample policy. */
    public static final class Builder {
        private final LawSet laws;
        private double[] weights;
        private OnBadSample policy = OnBadSample.THROW;
        private double[] xRef;
        private double[] yRef;

        private Builder(LawSet laws) {
            this.laws = Objects.requireNonNull(laws, "laws");
        }

        /**
         * Sets the metric W = diag(w): the projection minimises Σ_j w_j (y_out_j − y_j)², so a larger weight
         * moves output j less. Default: every weight 1 (orthogonal projection).
         *
         * @param w one weight per output element in declaration order (copied), each positive and finite, in
         *          1/(declared unit)²; checked by {@link #build()}
         * @return this builder
         */
        public Builder weights(double[] w) {
            this.weights = w.clone();
            return this;
        }

        /**
         * Sets the metric from typical output magnitudes, w_j = 1/scale_j², so each output moves in proportion to
         * its scale (the unit-aware projection).
         *
         * @param scales one typical magnitude per output element, in its declared unit, each positive and finite
         * @return this builder
         * @throws IllegalArgumentException when a scale is not positive and finite
         */
        public Builder scales(double[] scales) {
            double[] w = new double[scales.length];
            for (int j = 0; j < w.length; j++) {
                if (!(scales[j] > 0) || scales[j] == Double.POSITIVE_INFINITY) {
                    throw new IllegalArgumentException("scale of output element " + j + " must be positive and"
                            + " finite, found " + scales[j]);
                }
                w[j] = 1 / (scales[j] * scales[j]);
            }
            this.weights = w;
            return this;
        }

        /**
         * @param policy what a sample that cannot be projected does (default {@link OnBadSample#THROW})
         * @return this builder
         */
        public Builder onBadSample(OnBadSample policy) {
            this.policy = Objects.requireNonNull(policy, "policy");
            return this;
        }

        /**
         * The point (inputs, outputs in declared units) where the laws are checked for independence. Default:
         * {@link ReferencePoint#generic(LawSet)}, the point {@link Completion} uses.
         *
         * @param x inputs, {@code inputWidth} values (copied)
         * @param y outputs, {@code outputWidth} values (copied)
         * @return this builder
         */
        public Builder referencePoint(double[] x, double[] y) {
            this.xRef = x.clone();
            this.yRef = y.clone();
            return this;
        }

        /**
         * @return the projection
         * @throws IllegalArgumentException when the weights are not one positive finite value per output element
         * @throws dev.lawful.algebra.LawException when a law is nonlinear in the outputs, or laws are linearly
         *         dependent at the reference point
         */
        public Projection build() {
            return new Projection(this);
        }
    }

    /**
     * @param laws a law set affine in its outputs
     * @return a builder for a projection onto {@code laws}
     */
    public static Builder builder(LawSet laws) {
        return new Builder(laws);
    }

    /**
     * @param laws a law set affine in its outputs
     * @return the orthogonal projection (W = I) with {@link OnBadSample#THROW}
     * @throws dev.lawful.algebra.LawException when a law is nonlinear in the outputs, or laws are linearly
     *         dependent at the reference point
     */
    public static Projection of(LawSet laws) {
        return builder(laws).build();
    }

    private Projection(Builder b) {
        this.laws = b.laws;
        this.policy = b.policy;
        this.nIn = laws.inputWidth();
        this.p = laws.outputWidth();
        this.weights = new double[p];
        if (b.weights == null) {
            Arrays.fill(weights, 1.0);
        } else {
            if (b.weights.length != p) {
                throw new IllegalArgumentException("weights must hold one value per output element (" + p
                        + "), found " + b.weights.length);
            }
            for (int j = 0; j < p; j++) {
                double w = b.weights[j];
                if (!(w > 0) || w == Double.POSITIVE_INFINITY) {
                    throw new IllegalArgumentException("weight of output '" + laws.outputNames().get(j)
                            + "' must be positive and finite, found " + w);
                }
                weights[j] = w;
            }
        }
        ExpandedLaws e = laws.expand();
        ProjectionChecks.requireAffine(laws);
        this.inputGradientRefusal = ProjectionChecks.inputGradientRefusal(e);
        ReferencePoint point = b.xRef == null ? ReferencePoint.generic(laws) : ReferencePoint.of(laws, b.xRef, b.yRef);
        this.kernel = new ProjectionKernel(e, laws.evaluator(), weights, policy, inputGradientRefusal == null, point);
    }

    // ---- description -----------------------------------------------------------------------------------------

    /** @return the law set projected onto */
    public LawSet laws() {
        return laws;
    }

    /** @return the metric weights w_j, one per output element (a copy) */
    public double[] weights() {
        return weights.clone();
    }

    /** @return what a sample that cannot be projected does */
    public OnBadSample onBadSample() {
        return policy;
    }

    /**
     * @return whether {@link #backward} can compute the gradient with respect to the inputs and {@link #jacobian}
     *         dy_out/dx: true when every output coefficient of every law is a constant
     */
    public boolean supportsInputGradient() {
        return inputGradientRefusal == null;
    }

    /**
     * The guaranteed residual level of the double entry points, (d_i + 3)·2⁻⁵³·s_i.
     *
     * @param law          scalar law index (as in {@link LawEvaluator#lawName(int)})
     * @param naturalScale s_i, the law's natural scale at the projected outputs (SI, as the evaluator reports it)
     * @return the bound on |C_i| in the coherent SI unit of the law
     */
    public double residualBound(int law, double naturalScale) {
        return kernel.bound(law, naturalScale);
    }

    /**
     * The guaranteed residual level of the float entry points, (2⁻²⁴ + (2d_i + 4)·2⁻⁵³)·s_i, for the residual
     * evaluated in double at the float outputs.
     *
     * @param law          scalar law index
     * @param naturalScale s_i at the projected float outputs (SI)
     * @return the bound on |C_i| in the coherent SI unit of the law
     */
    public double residualBoundFloat(int law, double naturalScale) {
        return HALF_EPS_FLOAT * naturalScale + (2 * kernel.boundUnits[law] - 2) * HALF_EPS * naturalScale;
    }

    /** @return fresh work arrays for one thread */
    public Workspace newWorkspace() {
        return new Workspace(this);
    }

    // ---- forward ---------------------------------------------------------------------------------------------

    /**
     * Projects every sample, {@code out = y − W⁻¹Aᵀ(AW⁻¹Aᵀ)⁻¹C(x, y)}, refined once where needed, to the bound
     * {@link #residualBound(int, double)}.
     *
     * @param x         inputs, {@code batch * inputWidth} values in declared units (may be null when there are no
     *                  inputs); not modified
     * @param y         incoming outputs, {@code batch * outputWidth} values in declared units; not modified unless
     *                  it is also {@code out}
     * @param batch     number of samples
     * @param out       optional output buffer of {@code batch * outputWidth} values (may be {@code y} itself), or
     *                  null to allocate one
     * @param status    optional mask of {@code batch} bytes receiving each sample's {@link SampleStatus}, or null
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return {@code out} (or the allocated array) holding the projected outputs in declared units; NaN rows for
     *         bad samples under {@link OnBadSample#MASK}
     * @throws EnforcementException under {@link OnBadSample#THROW}, for the first bad sample
     * @throws IllegalArgumentException when an array is shorter than the batch needs, or the workspace belongs to
     *         another projection
     */
    public double[] forward(double[] x, double[] y, int batch, double[] out, byte[] status, Workspace workspace) {
        checkBatch(batch, length(x, -1), length(y, -1), status);
        need("out", length(out, -2), (long) batch * p);
        double[] result = out != null ? out : new double[batch * p];
        forwardChunks(x, y, batch, result, status, workspace);
        return result;

    }

    /**
     * {@link #forward(double[], double[], int, double[], byte[], Workspace)} with a new result array and work
     * arrays, and no status mask.
     *
     * @param x     inputs in declared units (may be null when there are none); not modified
     * @param y     incoming outputs in declared units; not modified
     * @param batch number of samples
     * @return the projected outputs
     * @throws EnforcementException under {@link OnBadSample#THROW}, for the first bad sample
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public double[] forward(double[] x, double[] y, int batch) {
        return forward(x, y, batch, null, null, null);
    }

    /**
     * The float entry point of {@link #forward(double[], double[], int, double[], byte[], Workspace)}: values are
     * widened to double, projected in double and rounded once, to the bound
     * {@link #residualBoundFloat(int, double)}.
     *
     * @param x         inputs in declared units (may be null when there are none); not modified
     * @param y         incoming outputs in declared units; not modified unless it is also {@code out}
     * @param batch     number of samples
     * @param out       optional output buffer of {@code batch * outputWidth} values (may be {@code y}), or null
     * @param status    optional mask of {@code batch} bytes receiving each sample's {@link SampleStatus}, or null
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return {@code out} (or the allocated array); NaN rows for bad samples under {@link OnBadSample#MASK}
     * @throws EnforcementException under {@link OnBadSample#THROW}, for the first bad sample
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public float[] forward(float[] x, float[] y, int batch, float[] out, byte[] status, Workspace workspace) {
        checkBatch(batch, length(x, -1), length(y, -1), status);
        need("out", length(out, -2), (long) batch * p);
        float[] result = out != null ? out : new float[batch * p];
        forwardChunks(x, y, batch, result, status, workspace);
        return result;

    }

    // ---- backward --------------------------------------------------------------------------------------------

    /**
     * Vector-Jacobian product of {@link #forward}: {@code gradY = Pᵀ ḡ = ḡ − Aᵀ S⁻¹ A W⁻¹ ḡ} and, when asked,
     * {@code gradX = −(∂C/∂x)ᵀ S⁻¹ A W⁻¹ ḡ}, with S = A W⁻¹ Aᵀ at each sample. Exact (the projection is affine in
     * y), with no state kept from the forward call.
     *
     * @param x         the inputs given to {@code forward} (declared units); not modified
     * @param y         the outputs given to {@code forward}; only checked for finiteness, since A does not depend
     *                  on them; not modified
     * @param batch     number of samples
     * @param gradOut   ḡ = ∂L/∂y_out, {@code batch * outputWidth} values (per declared unit of each output); not
     *                  modified unless it is also {@code gradY}
     * @param gradY     optional output buffer for ∂L/∂y, {@code batch * outputWidth} values (may be
     *                  {@code gradOut}), or null to allocate one
     * @param gradX     optional output buffer for ∂L/∂x, {@code batch * inputWidth} values, or null to skip the
     *                  input gradient
     * @param status    optional mask of {@code batch} bytes receiving each sample's {@link SampleStatus}, or null
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return {@code gradY} (or the allocated array); NaN rows in both gradients for bad samples under
     *         {@link OnBadSample#MASK}
     * @throws UnsupportedOperationException when {@code gradX} is given and {@link #supportsInputGradient()} is
     *         false; the message says why and what to do instead
     * @throws EnforcementException under {@link OnBadSample#THROW}, for the first bad sample
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public double[] backward(double[] x, double[] y, int batch, double[] gradOut, double[] gradY, double[] gradX,
                             byte[] status, Workspace workspace) {
        checkBackward(batch, length(x, -1), length(y, -1), length(gradOut, -1), length(gradY, -2),
                length(gradX, -2), status);
        double[] result = gradY != null ? gradY : new double[batch * p];
        backwardChunks(x, y, batch, gradOut, result, gradX, gradX != null, status, workspace);
        return result;

    }

    /**
     * The float entry point of
     * {@link #backward(double[], double[], int, double[], double[], double[], byte[], Workspace)}: computed in
     * double, rounded once.
     *
     * @param x         the inputs given to {@code forward}; not modified
     * @param y         the outputs given to {@code forward} (only checked for finiteness); not modified
     * @param batch     number of samples
     * @param gradOut   ḡ = ∂L/∂y_out, {@code batch * outputWidth} values; not modified unless it is {@code gradY}
     * @param gradY     optional output buffer for ∂L/∂y (may be {@code gradOut}), or null to allocate one
     * @param gradX     optional output buffer for ∂L/∂x, or null to skip the input gradient
     * @param status    optional mask of {@code batch} bytes receiving each sample's {@link SampleStatus}, or null
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return {@code gradY} (or the allocated array)
     * @throws UnsupportedOperationException when {@code gradX} is given and {@link #supportsInputGradient()} is
     *         false
     * @throws EnforcementException under {@link OnBadSample#THROW}, for the first bad sample
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public float[] backward(float[] x, float[] y, int batch, float[] gradOut, float[] gradY, float[] gradX,
                            byte[] status, Workspace workspace) {
        checkBackward(batch, length(x, -1), length(y, -1), length(gradOut, -1), length(gradY, -2),
                length(gradX, -2), status);
        float[] result = gradY != null ? gradY : new float[batch * p];
        backwardChunks(x, y, batch, gradOut, result, gradX, gradX != null, status, workspace);
        return result;

    }

    // ---- Jacobians -------------------------------------------------------------------------------------------

    /**
     * The full per-sample Jacobians of {@link #forward}, per declared unit: {@code dyOut[s*p*p + j*p + k] =
     * ∂y_out_j/∂y_k} (the matrix P = I − W⁻¹AᵀS⁻¹A, p = outputWidth) and, when asked,
     * {@code dxOut[s*p*nIn + j*nIn + c] = ∂y_out_j/∂x_c} (the matrix −W⁻¹AᵀS⁻¹ ∂C/∂x). Costs p vector-Jacobian
     * products per sample.
     *
     * @param x         inputs (declared units); not modified
     * @param y         incoming outputs (only checked for finiteness); not modified
     * @param batch     number of samples
     * @param dyOut     output buffer of {@code batch * p * p} values, or null to skip it
     * @param dxOut     output buffer of {@code batch * p * inputWidth} values, or null to skip it
     * @param status    optional mask of {@code batch} bytes receiving each sample's {@link SampleStatus}, or null
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @throws UnsupportedOperationException when {@code dxOut} is given and {@link #supportsInputGradient()} is
     *         false
     * @throws EnforcementException under {@link OnBadSample#THROW}, for the first bad sample (NaN blocks under
     *         {@link OnBadSample#MASK})
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public void jacobian(double[] x, double[] y, int batch, double[] dyOut, double[] dxOut, byte[] status,
                         Workspace workspace) {
        checkBatch(batch, length(x, -1), length(y, -1), status);
        need("dyOut", length(dyOut, -2), (long) batch * p * p);
        need("dxOut", length(dxOut, -2), (long) batch * p * nIn);
        if (dxOut != null) {
            refuseInputGradient();
        }
        Workspace ws = mine(workspace);
        for (int s0 = 0; s0 < batch; s0 += CHUNK) {
            int m = Math.min(CHUNK, batch - s0);
            load(x, s0 * nIn, ws.x, m * nIn);
            load(y, s0 * p, ws.y, m * p);
            kernel.jacobian(ws, s0, m, dyOut, dxOut);
            storeStatus(ws, status, s0, m);
        }
    }

    // ---- plumbing --------------------------------------------------------------------------------------------

    /** The forward chunk loop for both entry points ({@code double[]} or {@code float[]} arrays, checked). */
    private void forwardChunks(Object x, Object y, int batch, Object result, byte[] status, Workspace workspace) {
        Workspace ws = mine(workspace);
        for (int s0 = 0; s0 < batch; s0 += CHUNK) {
            int m = Math.min(CHUNK, batch - s0);
            load(x, s0 * nIn, ws.x, m * nIn);
            load(y, s0 * p, ws.y, m * p);
            kernel.forward(ws, s0, m);
            store(ws.out, result, s0 * p, m * p);
            storeStatus(ws, status, s0, m);
        }
    }

    /** The backward chunk loop for both entry points; {@code result} may be {@code gradOut} itself. */
    private void backwardChunks(Object x, Object y, int batch, Object gradOut, Object result, Object gradX,
                                boolean withX, byte[] status, Workspace workspace) {
        Workspace ws = mine(workspace);
        for (int s0 = 0; s0 < batch; s0 += CHUNK) {
            int m = Math.min(CHUNK, batch - s0);
            load(x, s0 * nIn, ws.x, m * nIn);
            load(y, s0 * p, ws.y, m * p);
            load(gradOut, s0 * p, ws.g, m * p);
            kernel.backward(ws, s0, m, withX);
            store(ws.out, result, s0 * p, m * p);
            if (withX) {
                store(ws.gx, gradX, s0 * nIn, m * nIn);
            }
            storeStatus(ws, status, s0, m);
        }
    }

    private Workspace mine(Workspace ws) {
        if (ws == null) {
            return newWorkspace();
        }
        if (ws.owner != this) {
            throw new IllegalArgumentException("workspace belongs to another projection; use this projection's"
                    + " newWorkspace()");
        }
        return ws;
    }

    private void refuseInputGradient() {
        if (inputGradientRefusal != null) {
            throw new UnsupportedOperationException(inputGradientRefusal);
        }
    }

    private void checkBatch(int batch, int xLength, int yLength, byte[] status) {
        if (batch < 0) {
            throw new IllegalArgumentException("batch must be >= 0, found " + batch);
        }
        need("x (inputs)", xLength, (long) batch * nIn);
        need("y (outputs)", yLength, (long) batch * p);
        need("status", status == null ? -2 : status.length, batch);
    }

    private void checkBackward(int batch, int xLength, int yLength, int gLength, int gyLength, int gxLength,
                               byte[] status) {
        checkBatch(batch, xLength, yLength, status);
        need("gradOut", gLength, (long) batch * p);
        need("gradY", gyLength, (long) batch * p);
        need("gradX", gxLength, (long) batch * nIn);
        if (gxLength != -2) {
            refuseInputGradient();
        }
    }

    /** @return the array's length, or {@code ifNull} (-1 for a required array, -2 for an optional one) */
    private static int length(Object array, int ifNull) {
        if (array == null) {
            return ifNull;
        }
        return array instanceof double[] d ? d.length : ((float[]) array).length;
    }

    private static void need(String what, int length, long n) {
        if (length == -2 || n == 0) {
            return;
        }
        if (length < n) {
            throw new IllegalArgumentException(what + " must hold at least " + n + " values for this batch, found "
                    + (length < 0 ? "null" : length));
        }
    }


    private static void storeStatus(Workspace ws, byte[] status, int s0, int m) {
        if (status != null) {
            System.arraycopy(ws.status, 0, status, s0, m);
        }
    }
}
