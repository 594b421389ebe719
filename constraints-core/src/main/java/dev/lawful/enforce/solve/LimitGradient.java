package dev.lawful.enforce.solve;

import dev.lawful.enforce.linear.DenseLu;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.LimitPlan;
import java.util.Arrays;

/**
 * The gradient of a completion with limits at samples that lie on a limit. There the free outputs z* are the
 * projection of the network's z onto the active limits in the metric W ({@link LimitStep}): on the active set A,
 * with rows G_A of the active limits in the free outputs and r_A(x, u) their values,
 * <pre>  z* = z − W⁻¹G_Aᵀ M⁻¹ (G_A z − h_A(x)),   M = G_A W⁻¹ G_Aᵀ,</pre>
 * so the vector-Jacobian product maps the completion's own gradient ḡ_u on the free outputs (the implicit
 * function theorem at z*) to ḡ_z = ḡ_u − G_Aᵀ μ with μ = M⁻¹ G_A W⁻¹ ḡ_u: the projection of ḡ_u onto the null
 * space of the active limits in the W metric. The inputs gain −(∂r_A/∂x)ᵀ μ, where ∂r_A/∂x at fixed free outputs
 * includes the completed outputs' dependence on x (one more transposed solve with A).
 *
 * <p>This is exact when W and G_A do not depend on x and z: the constant-affine tier with limits whose
 * coefficients on the outputs are constants (the usual case: signs, budgets, bounds whose values may depend on the
 * inputs). For the free outputs it stays exact in the affine tier, whose W and G_A depend on the inputs only; the
 * input gradient then leaves out the terms proportional to the Lagrange multipliers that come from W and G_A
 * changing with x, and in the nonlinear tier both gradients are those of the projection linearised at the
 * solution. A sample counts as on a limit when the limit holds within 10⁻⁹ of its natural scale (a sample that
 * ends there by chance is treated as moved: the documented one-sided choice at a switch between active sets).
 * Active limits whose rows depend on the others are dropped (their multipliers are not unique; the projection is
 * the same). Not thread-safe: one per workspace.
 */
final class LimitGradient {
    /** Relative distance to a limit within which a sample counts as on it. */
    static final double ON_LIMIT = 1e-9;
    /** Relative pivot below which an active limit's row is taken as dependent on the earlier ones. */
    private static final double DEPENDENT = 1e-10;

    private final LimitPlan limits;
    private final LimitLinearisation lin;
    private final int[] inEntryLaw;
    private final int[] inEntryColumn;
    private final int[] single;
    private final double[] bound;
    /** Per limit of one output by a constant: the distance from the bound within which the output is on it. */
    private final double[] near;
    private final int n;
    private final int k;
    private final int m;
    private final int p;
    private final int nIn;
    private final double[] xs;
    private final double[] ys;
    private final double[] wlu;
    private final int[] wpiv;
    private final int[] on;
    private final double[] t;
    private final double[] mm;
    private final double[] chol;
    private final boolean[] kept;
    private final double[] v;
    private final double[] mu;
    private final double[] lambda;

    LimitGradient(CompletionPlan plan, LimitLinearisation lin) {
        this.limits = plan.limits();
        this.lin = lin;
        this.inEntryLaw = plan.entries().inEntryLaw();
        this.inEntryColumn = plan.entries().inEntryColumn();
        this.single = limits.singleOutput();
        this.bound = limits.bound();
        this.n = plan.lawCount();
        double[] size = limits.scales();
        this.near = new double[limits.count()];
        for (int j = 0; j < near.length; j++) {
            near[j] = single[j] >= 0 ? ON_LIMIT * (Math.abs(bound[j]) + size[single[j]]) : 0;
        }
        this.k = plan.freeWidth();
        this.m = limits.count();
        this.p = plan.outputWidth();
        this.nIn = plan.inputWidth();
        this.xs = new double[nIn];
        this.ys = new double[p];
        this.wlu = new double[k * k];
        this.wpiv = new int[Math.max(1, k)];
        this.on = new int[m];
        this.t = new double[m * k];
        this.mm = new double[m * m];
        this.chol = new double[m * m];
        this.kept = new boolean[m];
        this.v = new double[Math.max(1, k)];
        this.mu = new double[m];
        this.lambda = new double[Math.max(1, n)];
    }

    /**
     * Corrects the completion's gradients of every sample of a batch that lies on a limit.
     *
     * @param x    inputs; read only
     * @param full the full rows of the forward call, declared order; read only
     * @param gz   modified: on entry the completion's ḡ on the free outputs, on return the gradient through the limits
     * @param gx   optional, modified the same way for the inputs
     */
    void correct(double[] x, int batch, double[] full, double[] gz, double[] gx) {
        if (k == 0) {
            return;
        }
        for (int s = 0; s < batch; s++) {
            if (!Double.isFinite(gz[s * k])) {
                continue;
            }
            int a = onLimits(x, full, s);
            if (a == 0) {
                continue;
            }
            if (!lin.linearise(xs, ys, gx != null) || !factorMetric()) {
                ImplicitGradient.nanRow(s, k, nIn, gz, gx);
                continue;
            }
            project(a, gz, s * k);
            if (gx != null) {
                inputs(a, gx, s * nIn);
            }
        }
    }

    /**
     * @return the number of limits row {@code s} lies on, listed in {@code on}; when there is one, the row is in
     *         {@code xs} and {@code ys} (a row on no limit of one output by a constant is read in place)
     */
    private int onLimits(double[] x, double[] full, int s) {
        int ro = s * p;
        boolean copied = false;
        int a = 0;
        for (int j = 0; j < m; j++) {
            int o = single[j];
            boolean at;
            if (o >= 0) {
                at = Math.abs(full[ro + o] - bound[j]) <= near[j];
            } else {
                if (!copied) {
                    copyRow(x, full, s);
                    lin.values(xs, ys);
                    copied = true;
                }
                at = Math.abs(lin.g[j]) <= ON_LIMIT * lin.gScale[j];
            }
            if (at) {
                on[a++] = j;
            }
        }
        if (a > 0 && !copied) {
            copyRow(x, full, s);
        }
        return a;
    }

    /** Row {@code s}'s inputs into {@code xs} and its full outputs into {@code ys}. */
    private void copyRow(double[] x, double[] full, int s) {
        if (nIn > 0) {
            System.arraycopy(x, s * nIn, xs, 0, nIn);
        }
        System.arraycopy(full, s * p, ys, 0, p);
    }

    /** Factors this sample's metric W into {@code wlu}; false when it is singular. */
    private boolean factorMetric() {
        System.arraycopy(lin.w, 0, wlu, 0, k * k);
        return DenseLu.factor(wlu, k, wpiv);
    }

    /**
     * ḡ_z ← ḡ_z − G_Aᵀ μ with M μ = G_A W⁻¹ ḡ_z, over the active rows that are independent of the earlier ones.
     */
    private void project(int a, double[] gz, int go) {
        double[] rows = lin.rows;
        for (int i = 0; i < a; i++) {
            System.arraycopy(rows, on[i] * k, t, i * k, k);
            DenseLu.solve(wlu, k, wpiv, t, i * k);
        }
        for (int i = 0; i < a; i++) {
            for (int j = 0; j < a; j++) {
                mm[i * a + j] = dot(rows, on[i] * k, t, j * k);
            }
        }
        System.arraycopy(gz, go, v, 0, k);
        DenseLu.solve(wlu, k, wpiv, v, 0);
        for (int i = 0; i < a; i++) {
            mu[i] = dot(rows, on[i] * k, v, 0);
        }
        choleskySolve(a);
        for (int i = 0; i < a; i++) {
            for (int f = 0; f < k; f++) {
                gz[go + f] -= mu[i] * rows[on[i] * k + f];
            }
        }
    }

    /**
     * Solves M μ = μ (right-hand side in {@code mu}) by a Cholesky factorisation that skips rows whose pivot
     * vanishes relative to their diagonal (dependent active limits); their μ is zero.
     */
    private void choleskySolve(int a) {
        Arrays.fill(chol, 0, a * a, 0.0);
        for (int i = 0; i < a; i++) {
            double d = mm[i * a + i];
            for (int r = 0; r < i; r++) {
                if (!kept[r]) {
                    continue;
                }
                double l = mm[i * a + r];
                for (int q = 0; q < r; q++) {
                    l -= chol[i * a + q] * chol[r * a + q];
                }
                l /= chol[r * a + r];
                chol[i * a + r] = l;
                d -= l * l;
            }
            kept[i] = d > DEPENDENT * mm[i * a + i];
            chol[i * a + i] = kept[i] ? Math.sqrt(d) : 0;
        }
        for (int i = 0; i < a; i++) {
            if (!kept[i]) {
                mu[i] = 0;
                continue;
            }
            double b = mu[i];
            for (int q = 0; q < i; q++) {
                b -= chol[i * a + q] * mu[q];
            }
            mu[i] = b / chol[i * a + i];
        }
        for (int i = a - 1; i >= 0; i--) {
            if (!kept[i]) {
                continue;
            }
            double b = mu[i];
            for (int q = i + 1; q < a; q++) {
                b -= chol[q * a + i] * mu[q];
            }
            mu[i] = b / chol[i * a + i];
        }
    }

    /** ḡ_x ← ḡ_x − (∂g_A/∂x)ᵀμ + (∂C/∂x)ᵀλ with Aᵀλ = (∂g_A/∂y_c)ᵀμ. */
    private void inputs(int a, double[] gx, int xo) {
        Arrays.fill(lambda, 0.0);
        int[] role = lin.role;
        for (int i = 0; i < a; i++) {
            int j = on[i];
            if (mu[i] == 0) {
                continue;
            }
            int[] cols = lin.evaluator.outputColumns(j);
            int off = lin.evaluator.outputOffset(j);
            for (int q = 0; q < cols.length; q++) {
                int c = role[cols[q]];
                if (c >= 0) {
                    lambda[c] += lin.gy[off + q] * mu[i];
                }
            }
            int[] xcols = lin.evaluator.inputColumns(j);
            int xoff = lin.evaluator.inputOffset(j);
            for (int q = 0; q < xcols.length; q++) {
                gx[xo + xcols[q]] -= lin.gx[xoff + q] * mu[i];
            }
        }
        lin.gradient.solveWholeTransposed(0, lin.check, lambda);
        for (int e = 0; e < inEntryLaw.length; e++) {
            gx[xo + inEntryColumn[e]] += lin.check.jx[e] * lambda[inEntryLaw[e]];
        }
    }

    private static double dot(double[] a, int ao, double[] b, int bo, int len) {
        double s = 0;
        for (int i = 0; i < len; i++) {
            s += a[ao + i] * b[bo + i];
        }
        return s;
    }

    private double dot(double[] a, int ao, double[] b, int bo) {
        return dot(a, ao, b, bo, k);
    }
}
