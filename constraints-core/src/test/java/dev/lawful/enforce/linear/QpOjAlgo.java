package dev.lawful.enforce.linear;

import org.ojalgo.matrix.store.R064Store;
import org.ojalgo.optimisation.Optimisation;
import org.ojalgo.optimisation.convex.ConvexSolver;

/**
 * The independent reference for {@link DenseQp}'s tests: the same problem handed to ojAlgo's convex QP solver.
 * ojAlgo minimises ½ xᵀQx − Cᵀx subject to A_I x ≤ b_I; ½ (u − z)ᵀW(u − z) is ½ uᵀWu − (Wz)ᵀu plus a constant, and
 * A u ≥ b is −A u ≤ −b.
 */
final class QpOjAlgo {
    static {
        // ojAlgo prints a note about hardware profiles on first use unless told not to; tests do not write to stdout
        System.setProperty("shut.up.ojAlgo", "true");
    }

    private QpOjAlgo() {
    }

    /** The result of one reference solve: its state and, when optimal, the minimiser. */
    record Reference(Optimisation.State state, double[] u) {
    }

    /**
     * @param start a feasible point, or null: ojAlgo otherwise finds one by a simplex phase, which on some degenerate
     *              instances here did not finish in minutes
     */
    static Reference solve(double[][] w, double[][] a, double[] b, double[] z, double[] start) {
        int k = z.length;
        R064Store q = R064Store.FACTORY.make(k, k);
        R064Store c = R064Store.FACTORY.make(k, 1);
        for (int i = 0; i < k; i++) {
            double wz = 0;
            for (int j = 0; j < k; j++) {
                q.set(i, j, w[i][j]);
                wz += w[i][j] * z[j];
            }
            c.set(i, 0, wz);
        }
        ConvexSolver.Builder builder = ConvexSolver.newBuilder().objective(q, c);
        // ojAlgo 55.0.1 answered NaN when A had a zero row; such a row is 0 ≥ b_i, which the caller's feasible
        // instances meet (b_i ≤ 0), so it is left out of the reference problem
        int rows = 0;
        for (double[] row : a) {
            rows += isZero(row) ? 0 : 1;
        }
        if (rows > 0) {
            R064Store ai = R064Store.FACTORY.make(rows, k);
            R064Store bi = R064Store.FACTORY.make(rows, 1);
            int at = 0;
            for (int i = 0; i < a.length; i++) {
                if (isZero(a[i])) {
                    continue;
                }
                for (int j = 0; j < k; j++) {
                    ai.set(at, j, -a[i][j]);
                }
                bi.set(at, 0, -b[i]);
                at++;
            }
            builder.inequalities(ai, bi);
        }
        Optimisation.Options options = new Optimisation.Options();
        options.iterations_abort = 10_000;
        ConvexSolver solver = builder.build(options);
        Optimisation.Result result = start == null ? solver.solve()
                : solver.solve(Optimisation.Result.of(Optimisation.State.FEASIBLE, start));
        double[] u = new double[k];
        for (int i = 0; i < k; i++) {
            u[i] = result.doubleValue(i);
        }
        return new Reference(result.getState(), u);
    }

    private static boolean isZero(double[] row) {
        for (double v : row) {
            if (v != 0) {
                return false;
            }
        }
        return true;
    }
}
