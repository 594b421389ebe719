package dev.lawful.enforce;

import org.ojalgo.matrix.store.R064Store;
import org.ojalgo.optimisation.Optimisation;
import org.ojalgo.optimisation.convex.ConvexSolver;

/** Independent references for limits, from ojAlgo's convex QP solver. */
final class LimitReference {
    static {
        // ojAlgo prints a note about hardware profiles on first use unless told not to; tests do not write to stdout
        System.setProperty("shut.up.ojAlgo", "true");
    }

    private LimitReference() {
    }

    /**
     * @param atoms per element, its count in each species (the balances atoms·out = atoms·feed)
     * @param feed  inlet flows
     * @param y0    the point to stay nearest to
     * @param start a feasible point (balanced and non-negative)
     * @return argmin ½‖y − y0‖² subject to atoms·y = atoms·feed and y ≥ 0
     */
    static double[] nearestBalanced(double[][] atoms, double[] feed, double[] y0, double[] start) {
        int p = y0.length;
        R064Store q = R064Store.FACTORY.make(p, p);
        R064Store c = R064Store.FACTORY.make(p, 1);
        for (int i = 0; i < p; i++) {
            q.set(i, i, 1);
            c.set(i, 0, y0[i]);
        }
        R064Store ae = R064Store.FACTORY.make(atoms.length, p);
        R064Store be = R064Store.FACTORY.make(atoms.length, 1);
        for (int e = 0; e < atoms.length; e++) {
            double rhs = 0;
            for (int j = 0; j < p; j++) {
                ae.set(e, j, atoms[e][j]);
                rhs += atoms[e][j] * feed[j];
            }
            be.set(e, 0, rhs);
        }
        R064Store ai = R064Store.FACTORY.make(p, p);
        R064Store bi = R064Store.FACTORY.make(p, 1);
        for (int i = 0; i < p; i++) {
            ai.set(i, i, -1);
        }
        ConvexSolver solver = ConvexSolver.newBuilder().objective(q, c).equalities(ae, be).inequalities(ai, bi)
                .build(new Optimisation.Options());
        Optimisation.Result result = solver.solve(Optimisation.Result.of(Optimisation.State.FEASIBLE, start));
        if (!result.getState().isOptimal()) {
            throw new AssertionError("the reference solver did not finish: " + result.getState());
        }
        double[] y = new double[p];
        for (int i = 0; i < p; i++) {
            y[i] = result.doubleValue(i);
        }
        return y;
    }
}
