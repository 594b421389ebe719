package dev.lawful.enforce;

import java.util.Arrays;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.plan.ReferencePoint;

/**
 * The per-chunk kernels of {@link Projection} in double: forward with refinement and verification, the
 * vector-Jacobian product and the full Jacobians, with the per-sample checks of the bad-sample policy. The entry
 * points of {@link Projection} only move values in and out of the {@link Projection.Workspace} chunk arrays, so the
 * double and float variants share every line of arithmetic.
 */
final class ProjectionKernel {
    private static final double HALF_EPS = 0x1p-53;

    final LawEvaluator evaluator;
    final int nIn;
    final int p;
    final int n;
    final int nnzY;
    final int nnzX;
    private final int[] yStart;
    private final int[] yColumns;
    private final int[] xStart;
    private final int[] xColumns;
    private final double[] sqrtW;
    private final double[] invSqrtW;
    /** d_i + 3: the guaranteed level in units of 2⁻⁵³·s_i. */
    final double[] boundUnits;
    /** d_i + 1: the accuracy of evaluating the residual, above which a sample is refined. */
    private final double[] roundingUnits;
    private final OnBadSample policy;
    private final ProjectionFailures failures;
    /** With constant output coefficients, the one factorisation every sample shares; otherwise null. */
    private final ProjectionFactor shared;

    /**
     * @param constant whether every output coefficient is a constant: then A is factored once, here
     * @throws dev.lawful.algebra.LawException when the laws are dependent at the reference point
     */
    ProjectionKernel(ExpandedLaws e, LawEvaluator evaluator, double[] weights, OnBadSample policy, boolean constant,
            ReferencePoint point) {
        this.evaluator = evaluator;
        this.policy = policy;
        this.nIn = e.inputWidth();
        this.p = e.outputWidth();
        this.n = evaluator.lawCount();
        this.nnzY = evaluator.outputNonzeros();
        this.nnzX = evaluator.inputNonzeros();
        this.sqrtW = new double[p];
        this.invSqrtW = new double[p];
        for (int j = 0; j < p; j++) {
            sqrtW[j] = Math.sqrt(weights[j]);
            invSqrtW[j] = 1 / sqrtW[j];
        }
        this.yStart = new int[n + 1];
        this.xStart = new int[n + 1];
        this.yColumns = new int[nnzY];
        this.xColumns = new int[nnzX];
        this.boundUnits = new double[n];
        this.roundingUnits = new double[n];
        for (int i = 0; i < n; i++) {
            int[] oc = evaluator.outputColumns(i);
            System.arraycopy(oc, 0, yColumns, evaluator.outputOffset(i), oc.length);
            yStart[i + 1] = evaluator.outputOffset(i) + oc.length;
            int[] ic = evaluator.inputColumns(i);
            System.arraycopy(ic, 0, xColumns, evaluator.inputOffset(i), ic.length);
            xStart[i + 1] = evaluator.inputOffset(i) + ic.length;
            int depth = e.roundingDepth(i);
            boundUnits[i] = depth + 3;
            roundingUnits[i] = depth + 1;
        }
        this.failures = new ProjectionFailures(e);
        ProjectionFactor reference = ProjectionChecks.requireIndependent(e.lawSet(), evaluator, point, yStart, yColumns,
                invSqrtW, Projection.RANK_TOLERANCE);
        this.shared = constant ? reference : null;
    }

    /** @return a factorisation for one workspace: a copy of the shared one, or an empty one to fill per sample */
    ProjectionFactor newFactor() {
        return shared != null ? shared.copy() : new ProjectionFactor(n, p);
    }

    double bound(int law, double scale) {
        return boundUnits[law] * HALF_EPS * scale;
    }

    // ---- forward ---------------------------------------------------------------------------------------------

    /** Projects samples {@code s0 .. s0+m-1} from {@code ws.x, ws.y} into {@code ws.out}, statuses in {@code ws.status}. */
    void forward(Projection.Workspace ws, int s0, int m) {
        evaluator.evaluate(ws.x, ws.y, m, ws.res, ws.scale, shared == null ? ws.jy : null, null, ws.eval);
        for (int j = 0; j < m; j++) {
            int sample = s0 + j;
            byte st = finiteRows(ws, j, sample);
            if (st == SampleStatus.OK) {
                st = finiteResiduals(ws, j, sample);
            }
            if (st == SampleStatus.OK) {
                st = factor(ws, j, sample);
            }
            System.arraycopy(ws.y, j * p, ws.out, j * p, p);
            if (st == SampleStatus.OK) {
                ws.factor.subtractCorrection(ws.res, j * n, invSqrtW, ws.out, j * p);
                if (!finite(ws.out, j * p, p)) {
                    if (policy == OnBadSample.THROW) {
                        throw failures.overflow(sample);
                    }
                    st = SampleStatus.SINGULAR;
                }
            }
            ws.status[j] = st;
            if (st != SampleStatus.OK) {
                Arrays.fill(ws.out, j * p, j * p + p, Double.NaN);
            }
        }
        if (n > 0) {
            refine(ws, s0, m);
        }
    }

    /**
     * One refinement step for every sample with a law above rounding level, then the check of the bound on the
     * refined samples (keeping the better of the two steps).
     */
    private void refine(Projection.Workspace ws, int s0, int m) {
        evaluator.residuals(ws.x, ws.out, m, ws.res, ws.scale, ws.eval);
        boolean any = false;
        for (int j = 0; j < m; j++) {
            ws.refined[j] = false;
            if (ws.status[j] != SampleStatus.OK || worst(ws.res, ws.scale, j, roundingUnits) <= 1) {
                continue;
            }
            System.arraycopy(ws.out, j * p, ws.prev, j * p, p);
            System.arraycopy(ws.res, j * n, ws.prevRes, j * n, n);
            System.arraycopy(ws.scale, j * n, ws.prevScale, j * n, n);
            factor(ws, j, s0 + j); // the same coefficients as before: it succeeds again
            ws.factor.subtractCorrection(ws.res, j * n, invSqrtW, ws.out, j * p);
            ws.refined[j] = true;
            any = true;
        }
        if (!any) {
            return;
        }
        evaluator.residuals(ws.x, ws.out, m, ws.res, ws.scale, ws.eval);
        for (int j = 0; j < m; j++) {
            if (!ws.refined[j]) {
                continue;
            }
            double after = worst(ws.res, ws.scale, j, boundUnits);
            double before = worst(ws.prevRes, ws.prevScale, j, boundUnits);
            if (!(after <= before)) {
                System.arraycopy(ws.prev, j * p, ws.out, j * p, p);
                System.arraycopy(ws.prevRes, j * n, ws.res, j * n, n);
                System.arraycopy(ws.prevScale, j * n, ws.scale, j * n, n);
                after = before;
            }
            if (!(after <= 1)) {
                if (policy == OnBadSample.THROW) {
                    int law = worstLaw(ws.res, ws.scale, j);
                    throw failures.imprecise(s0 + j, law, ws.res[j * n + law], bound(law, ws.scale[j * n + law]));
                }
                ws.status[j] = SampleStatus.SINGULAR;
                Arrays.fill(ws.out, j * p, j * p + p, Double.NaN);
            }
        }
    }

    /** @return max_i |r_i| / (units_i · 2⁻⁵³ · s_i) over sample j's laws; 0/0 counts as 0, NaN propagates */
    private double worst(double[] res, double[] scale, int j, double[] units) {
        double worst = 0;
        for (int i = 0; i < n; i++) {
            double r = Math.abs(res[j * n + i]);
            double q = r == 0 ? 0 : r / (units[i] * HALF_EPS * scale[j * n + i]);
            if (!(q <= worst)) {
                worst = q;
            }
        }
        return worst;
    }

    private int worstLaw(double[] res, double[] scale, int j) {
        int law = 0;
        double worst = -1;
        for (int i = 0; i < n; i++) {
            double r = Math.abs(res[j * n + i]);
            double q = r == 0 ? 0 : r / bound(i, scale[j * n + i]);
            if (!(q <= worst)) {
                worst = q;
                law = i;
            }
        }
        return law;
    }

    // ---- backward --------------------------------------------------------------------------------------------

    /**
     * ḡ_y = Pᵀ ḡ into {@code ws.out} and, when {@code withX}, ḡ_x into {@code ws.gx}, from {@code ws.x, ws.y, ws.g}.
     */
    void backward(Projection.Workspace ws, int s0, int m, boolean withX) {
        jacobians(ws, m, withX);
        for (int j = 0; j < m; j++) {
            int sample = s0 + j;
            byte st = finiteRows(ws, j, sample);
            if (st == SampleStatus.OK) {
                st = finiteGradient(ws, j, sample);
            }
            if (st == SampleStatus.OK && withX) {
                st = finiteInputJacobian(ws, j, sample);
            }
            if (st == SampleStatus.OK) {
                st = factor(ws, j, sample);
            }
            ws.status[j] = st;
            if (st != SampleStatus.OK) {
                Arrays.fill(ws.out, j * p, j * p + p, Double.NaN);
                Arrays.fill(ws.gx, j * nIn, j * nIn + nIn, Double.NaN);
                continue;
            }
            ws.factor.adjoint(ws.g, j * p, sqrtW, invSqrtW, ws.out, j * p, withX ? ws.lambda : null);
            if (withX) {
                inputAdjoint(ws.jx, j * nnzX, ws.lambda, ws.gx, j * nIn);
            }
        }
    }

    /**
     * Rows of dy_out/dy (P) and, when {@code dxOut} is not null, of dy_out/dx for samples {@code s0 .. s0+m-1},
     * written straight into the caller's arrays (NaN blocks for bad samples).
     */
    void jacobian(Projection.Workspace ws, int s0, int m, double[] dyOut, double[] dxOut) {
        boolean withX = dxOut != null;
        jacobians(ws, m, withX);
        for (int j = 0; j < m; j++) {
            int sample = s0 + j;
            byte st = finiteRows(ws, j, sample);
            if (st == SampleStatus.OK && withX) {
                st = finiteInputJacobian(ws, j, sample);
            }
            if (st == SampleStatus.OK) {
                st = factor(ws, j, sample);
            }
            ws.status[j] = st;
            int dy = sample * p * p;
            int dx = sample * p * nIn;
            if (st != SampleStatus.OK) {
                if (dyOut != null) {
                    Arrays.fill(dyOut, dy, dy + p * p, Double.NaN);
                }
                if (withX) {
                    Arrays.fill(dxOut, dx, dx + p * nIn, Double.NaN);
                }
                continue;
            }
            // row r of P is Pᵀ e_r; row r of dy_out/dx is −(∂C/∂x)ᵀ S⁻¹ A W⁻¹ e_r
            for (int r = 0; r < p; r++) {
                Arrays.fill(ws.unit, 0.0);
                ws.unit[r] = 1;
                ws.factor.adjoint(ws.unit, 0, sqrtW, invSqrtW, ws.out, 0, withX ? ws.lambda : null);
                if (dyOut != null) {
                    System.arraycopy(ws.out, 0, dyOut, dy + r * p, p);
                }
                if (withX) {
                    inputAdjoint(ws.jx, j * nnzX, ws.lambda, dxOut, dx + r * nIn);
                }
            }
        }
    }

    /** Evaluates the Jacobian blocks a chunk needs: dC/dy unless it is shared, dC/dx when asked. */
    private void jacobians(Projection.Workspace ws, int m, boolean withX) {
        if (shared == null || withX) {
            evaluator.evaluate(ws.x, ws.y, m, null, null, shared == null ? ws.jy : null, withX ? ws.jx : null,
                    ws.eval);
        }
    }

    /** gx = −(∂C/∂x)ᵀ λ from the sparse entries of one sample. */
    private void inputAdjoint(double[] jx, int base, double[] lambda, double[] gx, int off) {
        Arrays.fill(gx, off, off + nIn, 0.0);
        for (int k = 0; k < n; k++) {
            double l = lambda[k];
            for (int e = xStart[k]; e < xStart[k + 1]; e++) {
                gx[off + xColumns[e]] -= jx[base + e] * l;
            }
        }
    }

    // ---- per-sample checks: OK, or the status code under MASK; under THROW the exception ------------------------

    private byte finiteRows(Projection.Workspace ws, int j, int sample) {
        for (int v = 0; v < nIn; v++) {
            double a = ws.x[j * nIn + v];
            if (!Double.isFinite(a)) {
                if (policy == OnBadSample.THROW) {
                    throw failures.input(sample, v, a);
                }
                return SampleStatus.NOT_FINITE;
            }
        }
        for (int k = 0; k < p; k++) {
            double a = ws.y[j * p + k];
            if (!Double.isFinite(a)) {
                if (policy == OnBadSample.THROW) {
                    throw failures.output(sample, k, a);
                }
                return SampleStatus.NOT_FINITE;
            }
        }
        return SampleStatus.OK;
    }

    private byte finiteResiduals(Projection.Workspace ws, int j, int sample) {
        for (int i = 0; i < n; i++) {
            double r = ws.res[j * n + i];
            if (!Double.isFinite(r)) {
                if (policy == OnBadSample.THROW) {
                    throw failures.residual(sample, i, r);
                }
                return SampleStatus.NOT_FINITE;
            }
        }
        return SampleStatus.OK;
    }

    private byte finiteGradient(Projection.Workspace ws, int j, int sample) {
        for (int k = 0; k < p; k++) {
            double a = ws.g[j * p + k];
            if (!Double.isFinite(a)) {
                if (policy == OnBadSample.THROW) {
                    throw failures.gradient(sample, k, a);
                }
                return SampleStatus.NOT_FINITE;
            }
        }
        return SampleStatus.OK;
    }

    private byte finiteInputJacobian(Projection.Workspace ws, int j, int sample) {
        for (int i = 0; i < n; i++) {
            for (int e = xStart[i]; e < xStart[i + 1]; e++) {
                if (!Double.isFinite(ws.jx[j * nnzX + e])) {
                    if (policy == OnBadSample.THROW) {
                        throw failures.inputCoefficient(sample, i);
                    }
                    return SampleStatus.NOT_FINITE;
                }
            }
        }
        return SampleStatus.OK;
    }

    /**
     * Loads sample j's output coefficients into the workspace's factor and factors them (nothing to do when they
     * are constants: the workspace holds their factorisation, checked at build time).
     */
    private byte factor(Projection.Workspace ws, int j, int sample) {
        if (shared != null) {
            return SampleStatus.OK;
        }
        ProjectionFactor f = ws.factor;
        int law = f.load(ws.jy, j * nnzY, yStart, yColumns, invSqrtW);
        if (law >= 0) {
            if (policy == OnBadSample.THROW) {
                throw failures.coefficient(sample, law);
            }
            return SampleStatus.NOT_FINITE;
        }
        law = f.factor(Projection.RANK_TOLERANCE);
        if (law >= 0) {
            if (policy == OnBadSample.THROW) {
                throw failures.dependent(sample, f, law);
            }
            return SampleStatus.SINGULAR;
        }
        return SampleStatus.OK;
    }

    private static boolean finite(double[] a, int from, int count) {
        for (int i = from; i < from + count; i++) {
            if (!Double.isFinite(a[i])) {
                return false;
            }
        }
        return true;
    }
}
