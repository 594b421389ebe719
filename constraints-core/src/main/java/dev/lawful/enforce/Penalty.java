package dev.lawful.enforce;

import static dev.lawful.enforce.Batches.load;
import static dev.lawful.enforce.Batches.store;

import java.util.Arrays;
import java.util.Objects;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;

/**
 * The soft alternative to enforcement, for honest comparison: a loss term that makes violations small on
 * average instead of removing them. Per sample
 * <pre>
 *   P = Σ_i w_i (r_i / u_i)²  +  Σ_j (min(0, g_j) / u_j)²
 * </pre>
 * over the scalar laws i, where r_i = C_i(x, y) is the residual in coherent SI units (from {@link LawEvaluator}),
 * u_i the SI factor of the unit the law reports residuals in ({@link LawSet#lawUnit(String)}, so r_i / u_i is the
 * residual in that unit, for example kmol/h) and w_i a per-law weight (default 1). P is dimensionless once the
 * weights are: a weight is in 1/(law unit)². The batch value is the sum (not the mean) of the per-sample values.
 * Its gradient is dP/dy = Σ_i 2 w_i (r_i / u_i²) ∂C_i/∂y, and the same with ∂C_i/∂x for the inputs. When the
 * law set declares limits g_j ≥ 0, each scalar limit adds its squared violation in its own unit u_j (weight 1, so
 * the soft comparison is penalised for leaving a limit as the exact layer is kept inside it); a limit that holds
 * adds nothing.
 *
 * <p>Works for any law set, affine or not. There is no bad-sample policy: as for any loss, a non-finite input or
 * output gives a non-finite value. Batches are flat row-major arrays in declared units, processed in chunks of
 * {@value LawEvaluator#BLOCK} samples. Immutable and thread-safe; each thread passes its own {@link Workspace}, and
 * then a call allocates nothing.
 */
public final class Penalty {
    private static final int CHUNK = LawEvaluator.BLOCK;

    private final LawSet laws;
    private final LawEvaluator evaluator;
    private final int nIn;
    private final int p;
    private final int n;
    private final double[] weights;
    private final PenaltyTerms lawTerms;
    /** The limits' violations, or null when the law set has none. */
    private final PenaltyTerms limitTerms;
    private final int terms;

    /** Work arrays for one thread; get one from {@link #newWorkspace()}. Not thread-safe. */
    public static final class Workspace {
        private final Penalty owner;
        private final LawEvaluator.Workspace eval;
        private final double[] x;
        private final double[] y;
        private final double[] res;
        private final double[] jy;
        private final double[] jx;
        private final LawEvaluator.Workspace limitEval;
        private final double[] limitRes;
        private final double[] limitJy;
        private final double[] limitJx;
        private final double[] values = new double[CHUNK];
        private final double[] sum = new double[2];
        private final double[] gy;
        private final double[] gx;

        private Workspace(Penalty o) {
            owner = o;
            eval = o.evaluator.newWorkspace();
            x = new double[CHUNK * o.nIn];
            y = new double[CHUNK * o.p];
            res = new double[CHUNK * o.n];
            jy = new double[CHUNK * o.lawTerms.nnzY];
            jx = new double[CHUNK * o.lawTerms.nnzX];
            PenaltyTerms l = o.limitTerms;
            limitEval = l == null ? null : l.evaluator.newWorkspace();
            limitRes = l == null ? null : new double[CHUNK * l.count];
            limitJy = l == null ? null : new double[CHUNK * l.nnzY];
            limitJx = l == null ? null : new double[CHUNK * l.nnzX];
            gy = new double[CHUNK * o.p];
            gx = new double[CHUNK * o.nIn];
        }
    }

    private Penalty(LawSet laws, double[] w) {
        this.laws = Objects.requireNonNull(laws, "laws");
        ExpandedLaws e = laws.expand();
        this.evaluator = laws.evaluator();
        this.nIn = laws.inputWidth();
        this.p = laws.outputWidth();
        this.n = evaluator.lawCount();
        if (w != null && w.length != n) {
            throw new IllegalArgumentException("law weights must hold one value per scalar law (" + n + "), found "
                    + w.length);
        }
        this.weights = new double[n];
        double[] units = new double[n];
        for (int i = 0; i < n; i++) {
            double wi = w == null ? 1.0 : w[i];
            if (!(wi >= 0) || wi == Double.POSITIVE_INFINITY) {
                throw new IllegalArgumentException("weight of law '" + e.name(i) + "' must be finite and not"
                        + " negative, found " + wi);
            }
            weights[i] = wi;
            units[i] = laws.lawUnit(e.law(i).name()).factor();
        }
        this.lawTerms = new PenaltyTerms(evaluator, weights, units, false);
        int m = e.limitCount();
        if (m == 0) {
            this.limitTerms = null;
        } else {
            double[] ones = new double[m];
            double[] limitUnits = new double[m];
            for (int j = 0; j < m; j++) {
                ones[j] = 1;
                limitUnits[j] = e.limit(j).unit().factor();
            }
            this.limitTerms = new PenaltyTerms(e.limitEvaluator(), ones, limitUnits, true);
        }
        this.terms = n + m;
    }

    /**
     * @param laws any law set
     * @return the penalty with every law weight 1
     */
    public static Penalty of(LawSet laws) {
        return new Penalty(laws, null);
    }

    /**
     * @param laws       any law set
     * @param lawWeights w_i, one per scalar law in {@link LawEvaluator#lawName(int)} order (copied), each finite
     *                   and not negative, in 1/(law unit)²
     * @return the weighted penalty
     * @throws IllegalArgumentException when the weights do not fit the law set
     */
    public static Penalty of(LawSet laws, double[] lawWeights) {
        return new Penalty(laws, lawWeights.clone());
    }

    /** @return the law set */
    public LawSet laws() {
        return laws;
    }

    /** @return the weights w_i, one per scalar law (a copy) */
    public double[] lawWeights() {
        return weights.clone();
    }

    /** @return fresh work arrays for one thread */
    public Workspace newWorkspace() {
        return new Workspace(this);
    }

    // ---- value -----------------------------------------------------------------------------------------------

    /**
     * The penalty of every sample and of the batch.
     *
     * @param x         inputs, {@code batch * inputWidth} values in declared units (may be null when there are no
     *                  inputs); not modified
     * @param y         outputs, {@code batch * outputWidth} values in declared units; not modified
     * @param batch     number of samples
     * @param perSample optional output buffer of {@code batch} values receiving each sample's P, or null
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return Σ over the batch of P (compensated sum)
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public double value(double[] x, double[] y, int batch, double[] perSample, Workspace workspace) {
        check(batch, length(x), length(y), perSample == null ? -2 : perSample.length, -2, -2);
        return run(x, y, batch, perSample, null, null, workspace);

    }

    /**
     * {@link #value(double[], double[], int, double[], Workspace)} with work arrays allocated for this call.
     *
     * @param x         inputs in declared units (may be null when there are none); not modified
     * @param y         outputs in declared units; not modified
     * @param batch     number of samples
     * @param perSample optional output buffer of {@code batch} values receiving each sample's P, or null
     * @return Σ over the batch of P
     */
    public double value(double[] x, double[] y, int batch, double[] perSample) {
        return value(x, y, batch, perSample, null);
    }

    /**
     * The float entry point of {@link #value(double[], double[], int, double[], Workspace)}: computed in double,
     * per-sample values rounded once.
     *
     * @param x         inputs in declared units (may be null when there are none); not modified
     * @param y         outputs in declared units; not modified
     * @param batch     number of samples
     * @param perSample optional output buffer of {@code batch} values, or null
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return Σ over the batch of P, in double
     */
    public double value(float[] x, float[] y, int batch, float[] perSample, Workspace workspace) {
        check(batch, length(x), length(y), perSample == null ? -2 : perSample.length, -2, -2);
        return run(x, y, batch, perSample, null, null, workspace);

    }

    // ---- gradient --------------------------------------------------------------------------------------------

    /**
     * The gradient of the batch penalty: {@code gy = ∂P/∂y = Σ_i 2 w_i (r_i / u_i²) ∂C_i/∂y} per sample (and the
     * same with ∂C_i/∂x into {@code gx}), per declared unit of each variable.
     *
     * @param x         inputs (declared units, may be null when there are none); not modified
     * @param y         outputs (declared units); not modified
     * @param batch     number of samples
     * @param gy        output buffer of {@code batch * outputWidth} values for ∂P/∂y, or null to skip it
     * @param gx        output buffer of {@code batch * inputWidth} values for ∂P/∂x, or null to skip it
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return Σ over the batch of P, as {@link #value} returns it
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public double gradient(double[] x, double[] y, int batch, double[] gy, double[] gx, Workspace workspace) {
        check(batch, length(x), length(y), -2, gy == null ? -2 : gy.length, gx == null ? -2 : gx.length);
        return run(x, y, batch, null, gy, gx, workspace);

    }

    /**
     * {@link #gradient(double[], double[], int, double[], double[], Workspace)} with work arrays allocated for this
     * call.
     *
     * @param x         inputs in declared units (may be null when there are none); not modified
     * @param y         outputs in declared units; not modified
     * @param batch     number of samples
     * @param gy        output buffer of {@code batch * outputWidth} values for ∂P/∂y, or null to skip it
     * @param gxOrNull  output buffer of {@code batch * inputWidth} values for ∂P/∂x, or null to skip it
     * @return Σ over the batch of P
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public double gradient(double[] x, double[] y, int batch, double[] gy, double[] gxOrNull) {
        return gradient(x, y, batch, gy, gxOrNull, null);
    }

    /**
     * The float entry point of {@link #gradient(double[], double[], int, double[], double[], Workspace)}: computed
     * in double, gradients rounded once.
     *
     * @param x         inputs in declared units (may be null when there are none); not modified
     * @param y         outputs in declared units; not modified
     * @param batch     number of samples
     * @param gy        output buffer of {@code batch * outputWidth} values for ∂P/∂y, or null to skip it
     * @param gx        output buffer of {@code batch * inputWidth} values for ∂P/∂x, or null to skip it
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @return Σ over the batch of P, in double
     */
    public double gradient(float[] x, float[] y, int batch, float[] gy, float[] gx, Workspace workspace) {
        check(batch, length(x), length(y), -2, gy == null ? -2 : gy.length, gx == null ? -2 : gx.length);
        return run(x, y, batch, null, gy, gx, workspace);

    }

    // ---- weighted residuals ------------------------------------------------------------------------------------

    /** @return the number of scalar laws */
    public int lawCount() {
        return n;
    }

    /**
     * @return the width of {@link #weightedResiduals} per sample: one term per scalar law, then one per scalar limit
     *         of the law set ({@link dev.lawful.algebra.ExpandedLaws#limit(int)} order)
     */
    public int termCount() {
        return terms;
    }

    /**
     * The weighted terms whose squares add up to the penalty: {@code ρ_i = √w_i · r_i / u_i} per sample and scalar
     * law, then {@code ρ_j = min(0, g_j) / u_j} per scalar limit g_j ≥ 0 (its violation in its unit), so that P =
     * Σ ρ². A network can emit ρ as an extra output trained towards 0 with a sum-of-squares loss, which adds exactly
     * P to its score.
     *
     * @param x         inputs in declared units (may be null when there are none); not modified
     * @param y         outputs in declared units; not modified
     * @param batch     number of samples
     * @param rho       output buffer of {@code batch * termCount()} values, row-major (modified)
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public void weightedResiduals(double[] x, double[] y, int batch, double[] rho, Workspace workspace) {
        check(batch, length(x), length(y), -2, -2, -2);
        need("rho", length(rho), (long) batch * terms);
        Workspace ws = mine(workspace);
        for (int s0 = 0; s0 < batch; s0 += CHUNK) {
            int m = Math.min(CHUNK, batch - s0);
            load(x, s0 * nIn, ws.x, m * nIn);
            load(y, s0 * p, ws.y, m * p);
            evaluator.residuals(ws.x, ws.y, m, ws.res, null, ws.eval);
            if (limitTerms != null) {
                limitTerms.evaluator.residuals(ws.x, ws.y, m, ws.limitRes, null, ws.limitEval);
            }
            for (int j = 0; j < m; j++) {
                lawTerms.rho(j, ws.res, rho, (s0 + j) * terms);
                if (limitTerms != null) {
                    limitTerms.rho(j, ws.limitRes, rho, (s0 + j) * terms + n);
                }
            }
        }
    }

    /**
     * The vector-Jacobian product of {@link #weightedResiduals}: given upstream gradients ḡ on ρ, per sample
     * {@code gy = Σ_i ḡ_i ∂ρ_i/∂y} and the same with ∂/∂x into {@code gx} (a limit's term has slope zero where it
     * holds, the one-sided choice at g = 0 included).
     *
     * @param x         inputs in declared units (may be null when there are none); not modified
     * @param y         outputs in declared units; not modified
     * @param gRho      upstream gradients, {@code batch * termCount()} values; not modified
     * @param batch     number of samples
     * @param gy        output buffer of {@code batch * outputWidth} values (overwritten), or null to skip it
     * @param gx        output buffer of {@code batch * inputWidth} values (overwritten), or null to skip it
     * @param workspace this thread's work arrays, or null to allocate them for this call
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public void weightedResidualsBackward(double[] x, double[] y, double[] gRho, int batch, double[] gy, double[] gx,
            Workspace workspace) {
        check(batch, length(x), length(y), -2, gy == null ? -2 : gy.length, gx == null ? -2 : gx.length);
        need("gRho", length(gRho), (long) batch * terms);
        Workspace ws = mine(workspace);
        for (int s0 = 0; s0 < batch; s0 += CHUNK) {
            int m = Math.min(CHUNK, batch - s0);
            load(x, s0 * nIn, ws.x, m * nIn);
            load(y, s0 * p, ws.y, m * p);
            evaluator.evaluate(ws.x, ws.y, m, null, null, gy != null ? ws.jy : null, gx != null ? ws.jx : null,
                    ws.eval);
            if (limitTerms != null) {
                limitTerms.evaluator.evaluate(ws.x, ws.y, m, ws.limitRes, null, gy != null ? ws.limitJy : null,
                        gx != null ? ws.limitJx : null, ws.limitEval);
            }
            if (gy != null) {
                Arrays.fill(gy, s0 * p, (s0 + m) * p, 0.0);
            }
            if (gx != null) {
                Arrays.fill(gx, s0 * nIn, (s0 + m) * nIn, 0.0);
            }
            for (int j = 0; j < m; j++) {
                int s = s0 + j;
                lawTerms.rhoBackward(j, null, gRho, s * terms, ws.jy, ws.jx, gy, p, gx, nIn, s);
                if (limitTerms != null) {
                    limitTerms.rhoBackward(j, ws.limitRes, gRho, s * terms + n, ws.limitJy, ws.limitJx, gy, p, gx,
                            nIn, s);
                }
            }
        }
    }

    // ---- kernel ----------------------------------------------------------------------------------------------

    /**
     * The one chunk loop behind every entry point: the arrays are {@code double[]} or {@code float[]} (checked by
     * the caller), computation is in double, results are copied or rounded once.
     */
    private double run(Object x, Object y, int batch, Object perSample, Object gy, Object gx, Workspace workspace) {
        Workspace ws = mine(workspace);
        double[] sum = ws.sum;
        sum[0] = 0;
        sum[1] = 0;
        for (int s0 = 0; s0 < batch; s0 += CHUNK) {
            int m = Math.min(CHUNK, batch - s0);
            load(x, s0 * nIn, ws.x, m * nIn);
            load(y, s0 * p, ws.y, m * p);
            chunk(ws, m, gy != null, gx != null);
            accumulate(ws.values, m, sum);
            if (perSample != null) {
                store(ws.values, perSample, s0, m);
            }
            if (gy != null) {
                store(ws.gy, gy, s0 * p, m * p);
            }
            if (gx != null) {
                store(ws.gx, gx, s0 * nIn, m * nIn);
            }
        }
        return sum[0] + sum[1];
    }

    /** Per-sample values into {@code ws.values}, and the gradients asked for into {@code ws.gy}, {@code ws.gx}. */
    private void chunk(Workspace ws, int m, boolean withY, boolean withX) {
        evaluator.evaluate(ws.x, ws.y, m, ws.res, null, withY ? ws.jy : null, withX ? ws.jx : null, ws.eval);
        if (limitTerms != null) {
            limitTerms.evaluator.evaluate(ws.x, ws.y, m, ws.limitRes, null, withY ? ws.limitJy : null,
                    withX ? ws.limitJx : null, ws.limitEval);
        }
        if (withY) {
            Arrays.fill(ws.gy, 0, m * p, 0.0);
        }
        if (withX) {
            Arrays.fill(ws.gx, 0, m * nIn, 0.0);
        }
        double[] gy = withY ? ws.gy : null;
        double[] gx = withX ? ws.gx : null;
        Arrays.fill(ws.values, 0, m, 0.0);
        for (int j = 0; j < m; j++) {
            lawTerms.add(j, ws.res, ws.jy, ws.jx, ws.values, gy, p, gx, nIn);
            if (limitTerms != null) {
                limitTerms.add(j, ws.limitRes, ws.limitJy, ws.limitJx, ws.values, gy, p, gx, nIn);
            }
        }
    }

    /** Neumaier-compensated running sum: {@code sum[0]} the sum, {@code sum[1]} the carried correction. */
    private static void accumulate(double[] values, int m, double[] sum) {
        double s = sum[0];
        double c = sum[1];
        for (int j = 0; j < m; j++) {
            double v = values[j];
            double t = s + v;
            double z = t - s;
            c += (s - (t - z)) + (v - z);
            s = t;
        }
        sum[0] = s;
        sum[1] = c;
    }

    private Workspace mine(Workspace ws) {
        if (ws == null) {
            return newWorkspace();
        }
        if (ws.owner != this) {
            throw new IllegalArgumentException("workspace belongs to another penalty; use this penalty's"
                    + " newWorkspace()");
        }
        return ws;
    }

    /** Lengths: -1 for a required array that is null, -2 for an optional one that is. */
    private void check(int batch, int xLength, int yLength, int perSampleLength, int gyLength, int gxLength) {
        if (batch < 0) {
            throw new IllegalArgumentException("batch must be >= 0, found " + batch);
        }
        need("x (inputs)", xLength, (long) batch * nIn);
        need("y (outputs)", yLength, (long) batch * p);
        need("perSample", perSampleLength, batch);
        need("gy", gyLength, (long) batch * p);
        need("gx", gxLength, (long) batch * nIn);
    }

    private static int length(Object array) {
        if (array == null) {
            return -1;
        }
        return array instanceof double[] d ? d.length : ((float[]) array).length;
    }

    private static void need(String what, int length, long count) {
        if (length == -2 || count == 0) {
            return;
        }
        if (length < count) {
            throw new IllegalArgumentException(what + " must hold at least " + count + " values for this batch,"
                    + " found " + (length < 0 ? "null" : length));
        }
    }

}
