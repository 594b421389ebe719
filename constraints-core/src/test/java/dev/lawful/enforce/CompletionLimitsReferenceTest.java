package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;
import org.ojalgo.matrix.store.R064Store;
import org.ojalgo.optimisation.Optimisation;
import org.ojalgo.optimisation.convex.ConvexSolver;

/**
 * Completion with limits against independent references, on random well-conditioned instances of the constant-affine
 * and the affine tier: the nearest point over all outputs (metric Σ ((y − y0)/size)², y0 the plain completion)
 * that keeps the laws and the limits, from ojAlgo's convex QP solver; and, on every sample, the Karush–Kuhn–Tucker
 * conditions of that problem in the outputs, with the multipliers recovered by a Commons Math least-squares solve
 * (stationarity S(y − y0) = Jᵀν + G_Aᵀλ, primal feasibility, λ ≥ 0, complementary slackness by construction: λ = 0
 * off the active set). The nonlinear tier is left out: its answer is the sequential linearised projection (documented),
 * not the nearest point, and its laws and limits are checked in {@link CompletionLimitsTest}.
 */
class CompletionLimitsReferenceTest {
    static {
        System.setProperty("shut.up.ojAlgo", "true");
    }


    /** Water budget of three layers with input-dependent masses (affine tier), rain and drying limits. */
    private static final String BUDGET = String.join("\n",
            "input  E     kg/(m2 s)",
            "input  m[3]  kg/m2",
            "input  q[3]  kg/kg",
            "const  dt = 1 s",
            "output dq[3] 1/s",
            "output P     kg/(m2 s)",
            "law water: dot(m, dq) = E - P",
            "complete P",
            "limit rain: P >= 0",
            "limit dry:  q + dq * dt >= 0",
            "");

    @Test
    void nonNegativeOutletFlowsAreTheNearestPointAndSatisfyKkt() {
        SplittableRandom r = new SplittableRandom(21);
        double[] sizes = {0.5, 2, 1, 0.8, 3, 1};
        Completion c = Completion.builder(LawSet.parse("<reformer>", LimitLaws.REFORMER)).limitScales(sizes).build();
        assertEquals(Tier.CONSTANT_AFFINE, c.tier());
        int moved = 0;
        for (int trial = 0; trial < 150; trial++) {
            double[] feed = new double[6];
            for (int i = 0; i < 6; i++) {
                feed[i] = 0.05 + r.nextDouble();
            }
            moved += compare(c, sizes, feed, new double[] {r.nextDouble() * 2, r.nextDouble() * 2}) ? 1 : 0;
        }
        assertTrue(moved > 30, "only " + moved + " of 150 samples were moved");
    }

    @Test
    void aBudgetWithInputDependentMassesIsTheNearestPointAndSatisfiesKkt() {
        SplittableRandom r = new SplittableRandom(22);
        double[] sizes = {0.3, 0.5, 1, 2};
        Completion c = Completion.builder(LawSet.parse("<budget>", BUDGET)).limitScales(sizes).build();
        assertEquals(Tier.AFFINE, c.tier());
        int moved = 0;
        for (int trial = 0; trial < 150; trial++) {
            double[] x = new double[7];
            x[0] = r.nextDouble();
            for (int k = 0; k < 3; k++) {
                x[1 + k] = 0.5 + r.nextDouble();
                x[4 + k] = 0.2 + r.nextDouble();
            }
            double[] z = new double[3];
            for (int k = 0; k < 3; k++) {
                z[k] = 2 * r.nextDouble() - 0.6;
            }
            moved += compare(c, sizes, x, z) ? 1 : 0;
        }
        assertTrue(moved > 30, "only " + moved + " of 150 samples were moved");
    }

    /** @return whether the sample was moved (and then compared) */
    private static boolean compare(Completion c, double[] sizes, double[] x, double[] z) {
        LawSet laws = c.laws();
        int p = c.outputWidth();
        Completion plain = Completion.of(LawSet.parse("<plain>", laws.toString().replaceAll("(?m)^limit.*$", "")));
        double[] y0 = new double[p];
        plain.forward(x, z, 1, y0, null, null);
        double[] y = new double[p];
        c.forward(x, z, 1, y, null, null);
        if (Arrays.equals(y, y0)) {
            return false;
        }
        // the laws and the limits are affine in the outputs at fixed inputs: C(y) = C(y0) + J (y − y0), same for g
        Linear laws0 = Linear.at(laws.evaluator(), x, y0, p);
        Linear limits0 = Linear.at(laws.expand().limitEvaluator(), x, y0, p);
        double[] reference = nearest(laws0, limits0, y0, sizes);
        for (int o = 0; o < p; o++) {
            // Source: ojAlgo 55.0.1 ConvexSolver (independent QP solver)
            assertEquals(reference[o], y[o], 1e-7 * (1 + Math.abs(reference[o])), "output " + o);
        }
        kkt(laws0, limits0, y0, y, sizes);
        return true;
    }

    /** An affine map v(y) = v0 + J (y − y0), from an evaluator's values and Jacobian at y0. */
    private record Linear(double[] v0, double[][] j) {
        static Linear at(LawEvaluator ev, double[] x, double[] y0, int p) {
            int n = ev.lawCount();
            double[] v = new double[n];
            double[] jy = new double[ev.outputNonzeros()];
            ev.evaluate(x, y0, 1, v, new double[n], jy, null);
            double[][] j = new double[n][p];
            for (int i = 0; i < n; i++) {
                int[] cols = ev.outputColumns(i);
                for (int q = 0; q < cols.length; q++) {
                    j[i][cols[q]] = jy[ev.outputOffset(i) + q];
                }
            }
            return new Linear(v, j);
        }

        double value(int i, double[] y, double[] y0) {
            double s = v0[i];
            for (int o = 0; o < y.length; o++) {
                s += j[i][o] * (y[o] - y0[o]);
            }
            return s;
        }
    }

    /** argmin Σ ((y − y0)/size)² with the laws' linearisation = 0 and the limits' ≥ 0, by ojAlgo. */
    private static double[] nearest(Linear laws, Linear limits, double[] y0, double[] sizes) {
        int p = y0.length;
        R064Store q = R064Store.FACTORY.make(p, p);
        R064Store c = R064Store.FACTORY.make(p, 1);
        for (int o = 0; o < p; o++) {
            double w = 1 / (sizes[o] * sizes[o]);
            q.set(o, o, w);
            c.set(o, 0, w * y0[o]);
        }
        int n = laws.v0().length;
        R064Store ae = R064Store.FACTORY.make(n, p);
        R064Store be = R064Store.FACTORY.make(n, 1);
        for (int i = 0; i < n; i++) {
            double rhs = -laws.v0()[i];
            for (int o = 0; o < p; o++) {
                ae.set(i, o, laws.j()[i][o]);
                rhs += laws.j()[i][o] * y0[o];
            }
            be.set(i, 0, rhs);
        }
        int m = limits.v0().length;
        R064Store ai = R064Store.FACTORY.make(m, p);
        R064Store bi = R064Store.FACTORY.make(m, 1);
        for (int j = 0; j < m; j++) {
            // g0 + G (y − y0) ≥ 0  ⇔  −G y ≤ g0 − G y0
            double rhs = limits.v0()[j];
            for (int o = 0; o < p; o++) {
                ai.set(j, o, -limits.j()[j][o]);
                rhs -= limits.j()[j][o] * y0[o];
            }
            bi.set(j, 0, rhs);
        }
        ConvexSolver solver = ConvexSolver.newBuilder().objective(q, c).equalities(ae, be).inequalities(ai, bi)
                .build(new Optimisation.Options());
        Optimisation.Result result = solver.solve();
        if (!result.getState().isOptimal()) {
            throw new AssertionError("the reference solver did not finish: " + result.getState());
        }
        double[] y = new double[p];
        for (int o = 0; o < p; o++) {
            y[o] = result.doubleValue(o);
        }
        return y;
    }

    /**
     * The KKT conditions of the nearest-point problem at y: multipliers ν (laws) and λ (active limits) by least squares
     * (Commons Math QR) from stationarity, whose residual must vanish; λ ≥ 0; every limit and law holds.
     */
    private static void kkt(Linear laws, Linear limits, double[] y0, double[] y, double[] sizes) {
        int p = y.length;
        int n = laws.v0().length;
        int m = limits.v0().length;
        double[] g = new double[m];
        int[] active = new int[m];
        int a = 0;
        double gradScale = 0;
        for (int j = 0; j < m; j++) {
            g[j] = limits.value(j, y, y0);
            double rowScale = 0;
            for (int o = 0; o < p; o++) {
                rowScale += Math.abs(limits.j()[j][o] * y[o]);
            }
            assertTrue(g[j] >= -1e-12 * (1 + rowScale), "limit " + j + " = " + g[j]);
            if (g[j] <= 1e-9 * (1 + rowScale)) {
                active[a++] = j;
            }
        }
        for (int i = 0; i < n; i++) {
            double scale = 0;
            for (int o = 0; o < p; o++) {
                scale += Math.abs(laws.j()[i][o] * y[o]);
            }
            assertEquals(0, laws.value(i, y, y0), 1e-12 * (1 + scale), "law " + i);
        }
        double[][] columns = new double[p][n + a];
        double[] lhs = new double[p];
        for (int o = 0; o < p; o++) {
            lhs[o] = (y[o] - y0[o]) / (sizes[o] * sizes[o]);
            gradScale = Math.max(gradScale, Math.abs(lhs[o]));
            for (int i = 0; i < n; i++) {
                columns[o][i] = laws.j()[i][o];
            }
            for (int q = 0; q < a; q++) {
                columns[o][n + q] = limits.j()[active[q]][o];
            }
        }
        Array2DRowRealMatrix matrix = new Array2DRowRealMatrix(columns);
        // Source: Commons Math 3.6.1 QRDecomposition (least-squares solve of the stationarity condition)
        RealVector multipliers = new QRDecomposition(matrix).getSolver().solve(new ArrayRealVector(lhs));
        RealVector residual = matrix.operate(multipliers).subtract(new ArrayRealVector(lhs));
        assertTrue(residual.getLInfNorm() <= 1e-7 * gradScale, "stationarity residual " + residual.getLInfNorm()
                + " against " + gradScale);
        double largest = multipliers.getLInfNorm();
        for (int q = 0; q < a; q++) {
            assertTrue(multipliers.getEntry(n + q) >= -1e-7 * largest, "multiplier of limit " + active[q] + " = "
                    + multipliers.getEntry(n + q));
        }
    }
}
