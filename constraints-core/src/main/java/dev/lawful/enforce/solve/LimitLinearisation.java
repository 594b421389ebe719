package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.plan.CompletionPlan;
import dev.lawful.enforce.plan.LimitPlan;
import java.util.Arrays;

/**
 * The limits of one sample linearised in its free outputs at a completed row, shared by the limit step and its
 * gradient: J = dy_c/dz = −A⁻¹ ∂C/∂z (the implicit function theorem), the rows G_f + G_c J of every limit in the
 * free outputs, and the metric W = S_f + Jᵀ S_c J (S = diag(1/size²)) in which the free outputs move. Not
 * thread-safe: one per workspace.
 */
final class LimitLinearisation {
    final LimitPlan limits;
    final LawEvaluator evaluator;
    final ImplicitGradient gradient;
    /** The laws' Jacobians and block factors of the current row. */
    final SolveWork check;
    /** Per declared output: its completed index c ≥ 0, or −(f+1) for free index f. */
    final int[] role;
    final int n;
    final int k;
    final int m;
    /** The current row's limit values, natural scales, dg/dy entries and dg/dx entries. */
    final double[] g;
    final double[] gScale;
    final double[] gy;
    final double[] gx;
    /** J (n×k, row-major), the limits' rows in the free outputs (m×k) and the metric W (k×k). */
    final double[] jz;
    final double[] rows;
    final double[] w;
    private final LawEvaluator laws;
    private final LawEvaluator.Workspace limitWork;
    private final int[] entryLaw;
    private final int[] entryRole;
    private final int[] free;
    private final int[] completed;
    private final double[] rhs;

    LimitLinearisation(CompletionPlan plan) {
        this.limits = plan.limits();
        this.evaluator = limits.evaluator();
        this.laws = plan.evaluator();
        this.gradient = new ImplicitGradient(plan);
        this.check = new SolveWork(plan, true);
        check.ensure(1);
        this.limitWork = evaluator.newWorkspace();
        this.role = plan.roles().role();
        this.entryLaw = plan.entries().entryLaw();
        this.entryRole = plan.entries().entryRole();
        this.free = plan.free();
        this.completed = plan.completed();
        this.n = plan.lawCount();
        this.k = plan.freeWidth();
        this.m = limits.count();
        this.g = new double[m];
        this.gScale = new double[m];
        this.gy = new double[evaluator.outputNonzeros()];
        this.gx = new double[evaluator.inputNonzeros()];
        this.jz = new double[n * k];
        this.rows = new double[m * k];
        this.w = new double[k * k];
        this.rhs = new double[n];
    }

    /**
     * Linearises the laws and the limits at one full row: J, the limits' values and derivatives, their rows and W.
     *
     * @param x       the sample's inputs; read only
     * @param y       the sample's full row, declared order; read only
     * @param inputs  whether the laws' and limits' derivatives in the inputs are wanted too (for an input gradient)
     * @return false when A is singular at the row
     */
    boolean linearise(double[] x, double[] y, boolean inputs) {
        laws.evaluate(x, y, 1, null, null, check.jy, inputs ? check.jx : null, check.evaluation);
        if (!gradient.factorWhole(0, check)) {
            return false;
        }
        Arrays.fill(jz, 0.0);
        for (int e = 0; e < entryLaw.length; e++) {
            int r = entryRole[e];
            if (r < 0) {
                jz[entryLaw[e] * k + (-r - 1)] = -check.jy[e];
            }
        }
        for (int f = 0; f < k; f++) {
            for (int i = 0; i < n; i++) {
                rhs[i] = jz[i * k + f];
            }
            gradient.solveWhole(0, check, rhs);
            for (int c = 0; c < n; c++) {
                jz[c * k + f] = rhs[c];
            }
        }
        evaluator.evaluate(x, y, 1, g, gScale, gy, inputs ? gx : null, limitWork);
        rows();
        metric();
        return true;
    }

    /** Evaluates only the limits' values and scales at a full row. */
    void values(double[] x, double[] y) {
        evaluator.residuals(x, y, 1, g, gScale, limitWork);
    }

    /** Row j of the limits in the free outputs: dg_j/dy_f directly, dg_j/dy_c through J. */
    private void rows() {
        Arrays.fill(rows, 0.0);
        for (int j = 0; j < m; j++) {
            int[] cols = evaluator.outputColumns(j);
            int off = evaluator.outputOffset(j);
            for (int q = 0; q < cols.length; q++) {
                int r = role[cols[q]];
                double d = gy[off + q];
                if (r < 0) {
                    rows[j * k + (-r - 1)] += d;
                } else {
                    for (int f = 0; f < k; f++) {
                        rows[j * k + f] += d * jz[r * k + f];
                    }
                }
            }
        }
    }

    /** W = S_f + Jᵀ S_c J. */
    private void metric() {
        double[] size = limits.scales();
        Arrays.fill(w, 0.0);
        for (int f = 0; f < k; f++) {
            w[f * k + f] = 1 / (size[free[f]] * size[free[f]]);
        }
        for (int c = 0; c < n; c++) {
            double sc = 1 / (size[completed[c]] * size[completed[c]]);
            for (int f = 0; f < k; f++) {
                double jf = jz[c * k + f] * sc;
                for (int h = 0; h < k; h++) {
                    w[f * k + h] += jf * jz[c * k + h];
                }
            }
        }
    }
}
