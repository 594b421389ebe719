package dev.lawful.enforce.linear;

import static dev.lawful.enforce.CompletionModelsTest.U;
import static dev.lawful.enforce.CompletionModelsTest.signed;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static dev.lawful.enforce.CompletionModelsTest.uniform;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;

/**
 * {@link DenseQp} on random feasible instances against ojAlgo's convex QP solver, with the KKT certificate checked on
 * every solution, and on worked examples with a closed form (one half-space, a box, the nonnegative orthant).
 */
class DenseQpTest {
    /**
     * Stationarity and complementary slackness, relative ({@link KktCheck}): backward errors, so a small multiple of
     * k·2⁻⁵³ for a backward-stable method; the largest seen over these generators was 1.6e-14 (cond(W) up to 1e8).
     */
    static final double KKT_BOUND = 1e-12;
    /** Primal feasibility: inactive constraints may sit up to τ outside (DenseQp's class comment), active ones ulps. */
    static final double PRIMAL_BOUND = 2 * DenseQp.DEFAULT_FEASIBILITY_TOLERANCE;

    /** Asserts the solve succeeded and its KKT violations are within the bounds; returns the solution. */
    static QpInstance.Solution assertCertified(QpInstance p, QpInstance.Solution s) {
        assertTrue(s.code() >= 0, () -> "solve code " + s.code() + " for a feasible instance " + describe(p));
        double[] v = p.kkt(s.u(), s.lambda());
        String what = "KKT [stationarity, primal, dual, complementarity] = " + Arrays.toString(v) + " for "
                + describe(p);
        assertTrue(v[KktCheck.STATIONARITY] <= KKT_BOUND, what);
        assertTrue(v[KktCheck.PRIMAL] <= PRIMAL_BOUND, what);
        // the multipliers are clamped at zero, so no rounding can make one negative
        assertEquals(0.0, v[KktCheck.DUAL], what);
        assertTrue(v[KktCheck.COMPLEMENTARITY] <= KKT_BOUND, what);
        return s;
    }

    static String describe(QpInstance p) {
        return "k = " + p.k() + ", m = " + p.m() + ", W = " + Arrays.deepToString(p.w()) + ", A = "
                + Arrays.deepToString(p.a()) + ", b = " + Arrays.toString(p.b()) + ", z = " + Arrays.toString(p.z());
    }

    private static double maxAbs(double[] x) {
        double s = 0;
        for (double v : x) {
            s = Math.max(s, Math.abs(v));
        }
        return s;
    }

    /** ‖u − ref‖∞ ≤ tolerance·(1 + ‖ref‖∞). */
    private static void assertNear(double[] ref, double[] u, double tolerance, String what) {
        double diff = 0;
        for (int j = 0; j < u.length; j++) {
            diff = Math.max(diff, Math.abs(u[j] - ref[j]));
        }
        double error = diff / (1 + maxAbs(ref));
        assertTrue(error <= tolerance, () -> what + ": relative distance " + error + " > " + tolerance + "; u = "
                + Arrays.toString(u) + ", reference " + Arrays.toString(ref));
    }

    private static void checkAgainstOjAlgo(SplittableRandom r, int maxK, int maxM, double condition, double tol) {
        QpInstance p = QpInstance.random(r, maxK, maxM, condition);
        DenseQp qp = new DenseQp(maxK, maxM);
        // W factored once; then several z (and shifted b, still feasible at u0) reuse the factor
        QpInstance.Solution s = assertCertified(p, p.solveWith(qp));
        for (int round = 0; round < 3; round++) {
            QpOjAlgo.Reference ref = QpOjAlgo.solve(p.w(), p.a(), p.b(), p.z(), p.u0());
            assertTrue(ref.state().isOptimal() && Arrays.stream(ref.u()).allMatch(Double::isFinite),
                    () -> "ojAlgo state " + ref.state() + ", u " + Arrays.toString(ref.u()));
            assertNear(ref.u(), s.u(), tol, "u against ojAlgo, " + describe(p));
            double[] z = new double[p.k()];
            double spread = uniform(r, 0.1, 5);
            for (int j = 0; j < z.length; j++) {
                z[j] = p.u0()[j] + spread * signed(r, 0, 1);
            }
            p = p.withZ(z);
            s = assertCertified(p, p.solveFactored(qp));
        }
    }

    @Test
    void agreesWithOjAlgoOnRandomFeasibleInstances() {
        // largest distance seen 1.3e-14 over 1000 instances: 1e-10 leaves room for ojAlgo's own stopping rule
        trials("DenseQp vs ojAlgo", 0x0A1L, 150, r -> checkAgainstOjAlgo(r, 20, 30, 100, 1e-10));
    }

    @Test
    void agreesWithOjAlgoUpToSixtyFourFreeOutputs() {
        // largest distance seen 3.5e-13 (cond(W) ≤ 1e4)
        trials("DenseQp vs ojAlgo, k ≤ 64", 0x0A2L, 25, r -> checkAgainstOjAlgo(r, 64, 32, 1e4, 1e-9));
    }

    @Test
    void illConditionedWIsAtLeastAsGoodAsOjAlgo() {
        // with cond(W) up to 1e8 ojAlgo's answers were up to 6e-6 away from ours, and always with a higher objective
        // while ours was certified: the check here is the certificate and the objective, not the distance
        trials("DenseQp vs ojAlgo, cond(W) ≤ 1e8", 0x0A3L, 150, r -> {
            QpInstance p = QpInstance.random(r, 20, 30, 1e8);
            QpInstance.Solution s = assertCertified(p, p.solveWith(new DenseQp(20, 30)));
            QpOjAlgo.Reference ref = QpOjAlgo.solve(p.w(), p.a(), p.b(), p.z(), p.u0());
            assertTrue(ref.state().isOptimal() && Arrays.stream(ref.u()).allMatch(Double::isFinite),
                    () -> "ojAlgo state " + ref.state() + ", u " + Arrays.toString(ref.u()));
            double ours = p.objective(s.u());
            double theirs = p.objective(ref.u());
            assertTrue(ours <= theirs * (1 + 1e-9) + 1e-300, () -> "objective " + ours + " > ojAlgo's " + theirs);
            assertNear(ref.u(), s.u(), 1e-4, "u against ojAlgo (loosely), " + describe(p));
        });
    }

    @Test
    void oneViolatedHalfSpaceIsTheClosedFormProjection() {
        trials("half-space projection", 0x0A4L, 200, r -> {
            int k = 1 + r.nextInt(12);
            double[][] w = QpInstance.spd(r, k, 100);
            double[] a = new double[k];
            double[] z = new double[k];
            for (int j = 0; j < k; j++) {
                a[j] = signed(r, 0.1, 2);
                z[j] = signed(r, 0, 3);
            }
            double az = 0;
            for (int j = 0; j < k; j++) {
                az += a[j] * z[j];
            }
            double gap = uniform(r, 0.01, 5);
            QpInstance p = new QpInstance(w, new double[][] {a}, new double[] {az + gap}, z, null);
            QpInstance.Solution s = assertCertified(p, p.solveWith(new DenseQp(k, 1)));
            // Source: common practice (Lagrange condition of one active constraint): u = z + μ W⁻¹a,
            // μ = (b − aᵀz) / (aᵀW⁻¹a); W⁻¹a by Apache Commons Math 3.6.1 LUDecomposition
            RealVector winva = new LUDecomposition(new Array2DRowRealMatrix(w)).getSolver()
                    .solve(new ArrayRealVector(a));
            double mu = gap / winva.dotProduct(new ArrayRealVector(a));
            double[] want = new double[k];
            for (int j = 0; j < k; j++) {
                want[j] = z[j] + mu * winva.getEntry(j);
            }
            assertEquals(1, s.code(), "one active constraint");
            assertNear(want, s.u(), 1e-13, "projection onto the half-space");
            assertEquals(mu, s.lambda()[0], 1e-13 * mu, "multiplier μ");
        });
    }

    @Test
    void boxWithDiagonalWIsClamping() {
        trials("box, diagonal W", 0x0A5L, 200, r -> {
            int k = 1 + r.nextInt(10);
            double[][] w = new double[k][k];
            double[] lo = new double[k];
            double[] hi = new double[k];
            double[] z = new double[k];
            double[][] a = new double[2 * k][k];
            double[] b = new double[2 * k];
            for (int j = 0; j < k; j++) {
                w[j][j] = Math.pow(10, uniform(r, -3, 3));
                lo[j] = signed(r, 0, 2);
                hi[j] = lo[j] + uniform(r, 0.01, 2);
                z[j] = signed(r, 0, 4);
                a[2 * j][j] = 1;
                b[2 * j] = lo[j];
                a[2 * j + 1][j] = -1;
                b[2 * j + 1] = -hi[j];
            }
            QpInstance p = new QpInstance(w, a, b, z, null);
            QpInstance.Solution s = assertCertified(p, p.solveWith(new DenseQp(k, 2 * k)));
            for (int j = 0; j < k; j++) {
                // Source: common practice (a separable objective over a box: each coordinate is clamped, and the
                // multiplier of a bound that holds is w_jj times the distance clamped away)
                double want = Math.min(hi[j], Math.max(lo[j], z[j]));
                double tol = 8 * U * (Math.abs(z[j]) + Math.abs(want));
                assertEquals(want, s.u()[j], tol, "clamped coordinate " + j);
                assertEquals(w[j][j] * Math.max(0, lo[j] - z[j]), s.lambda()[2 * j], w[j][j] * tol,
                        "lower-bound multiplier " + j);
                assertEquals(w[j][j] * Math.max(0, z[j] - hi[j]), s.lambda()[2 * j + 1], w[j][j] * tol,
                        "upper-bound multiplier " + j);
            }
        });
    }

    @Test
    void nonnegativeOrthantWithIdentityIsExactlyThePositivePart() {
        trials("orthant, W = I", 0x0A6L, 200, r -> {
            int k = 1 + r.nextInt(16);
            double[][] w = new double[k][k];
            double[][] a = new double[k][k];
            double[] z = new double[k];
            for (int j = 0; j < k; j++) {
                w[j][j] = 1;
                a[j][j] = 1;
                z[j] = r.nextInt(5) == 0 ? 0 : signed(r, 0, 10);
            }
            QpInstance p = new QpInstance(w, a, new double[k], z, null);
            QpInstance.Solution s = assertCertified(p, p.solveWith(new DenseQp(k, k)));
            double[] want = new double[k];
            double[] wantLambda = new double[k];
            for (int j = 0; j < k; j++) {
                // Source: common practice (Euclidean projection onto the nonnegative orthant is the positive part)
                want[j] = Math.max(0, z[j]);
                wantLambda[j] = Math.max(0, -z[j]);
            }
            // exact: with W = I every rotation swaps unit vectors (cosine 0, sine 1), so no product rounds
            assertArrayEquals(want, s.u(), 0.0, "u = max(z, 0)");
            assertArrayEquals(wantLambda, s.lambda(), 0.0, "λ = max(−z, 0)");
        });
    }
}
