package dev.lawful.enforce.linear;

import static dev.lawful.enforce.CompletionModelsTest.signed;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static dev.lawful.enforce.CompletionModelsTest.uniform;
import static dev.lawful.enforce.linear.DenseQpTest.assertCertified;
import static dev.lawful.enforce.linear.DenseQpTest.describe;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.util.Arrays;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * {@link DenseQp} where it must not go wrong quietly: z already feasible (returned bit for bit), infeasible
 * constraints (the code names one), duplicate, dependent and zero rows, non-finite data, matrices that are not
 * positive definite, the iteration limit, reuse of one instance and of packed batches; and {@link KktCheck} telling
 * each broken condition apart.
 */
class DenseQpEdgeTest {

    private static void assertFinite(double[] x, String what) {
        for (double v : x) {
            assertTrue(Double.isFinite(v), () -> what + " has a non-finite entry: " + Arrays.toString(x));
        }
    }

    private static void assertBitIdentical(double[] want, double[] got, String what) {
        for (int j = 0; j < want.length; j++) {
            assertEquals(Double.doubleToRawLongBits(want[j]), Double.doubleToRawLongBits(got[j]),
                    what + " entry " + j + ": " + want[j] + " vs " + got[j]);
        }
    }

    @Test
    void feasibleZIsReturnedBitForBitWithNothingActive() {
        trials("feasible z", 0x0B1L, 200, r -> {
            QpInstance p = QpInstance.random(r, 20, 30, 100);
            // z = u0 meets every constraint, some of them exactly (zero slack): nothing may move it
            double[] z = p.u0().clone();
            z[0] = z[0] == 0 ? -0.0 : z[0];
            QpInstance.Solution s = p.withZ(z).solveWith(new DenseQp(20, 30));
            assertEquals(0, s.code(), "no constraint active");
            assertEquals(0, s.iterations(), "no step taken");
            assertBitIdentical(z, s.u(), "u");
            assertArrayEquals(new double[p.m()], s.lambda(), 0.0, "λ = 0");
        });
    }

    @Test
    void solvingInPlaceOverwritesZWithTheSolution() {
        SplittableRandom r = new SplittableRandom(0x0B2L);
        QpInstance p = QpInstance.random(r, 8, 10, 100);
        DenseQp qp = new DenseQp(8, 10);
        QpInstance.Solution apart = p.solveWith(qp);
        double[] zu = p.z().clone();
        double[] lambda = new double[p.m()];
        int[] active = new int[p.m()];
        int code = qp.solve(QpInstance.flat(p.a(), p.k()), p.b(), p.m(), zu, zu, lambda, active);
        assertEquals(apart.code(), code);
        assertBitIdentical(apart.u(), zu, "in place");
        assertBitIdentical(apart.lambda(), lambda, "λ in place");
    }

    @Test
    void contradictoryBoundsNameTheConstraintThatCannotBeAdded() {
        // u ≥ 1 and −u ≥ 0 (u ≤ 0)
        double[] a = {1, -1};
        double[] b = {1, 0};
        DenseQp qp = new DenseQp(1, 2);
        assertTrue(qp.factor(new double[] {2}, 1));
        double[] u = new double[1];
        double[] lambda = new double[2];
        int[] active = new int[1];
        // from z = 0.5 both are 0.5 away; the first enters, the second cannot join it
        int code = qp.solve(a, b, 2, new double[] {0.5}, u, lambda, active);
        assertTrue(DenseQp.isInfeasible(code), "code " + code);
        assertEquals(1, DenseQp.infeasibleConstraint(code));
        assertArrayEquals(new double[] {1}, u, 0.0, "the last iterate meets the active constraint u ≥ 1");
        // from z = 2 only u ≤ 0 is violated: it enters, and then u ≥ 1 cannot
        code = qp.solve(a, b, 2, new double[] {2}, u, lambda, active);
        assertEquals(0, DenseQp.infeasibleConstraint(code));
        assertArrayEquals(new double[] {0}, u, 0.0);
        assertFinite(lambda, "λ");
    }

    @Test
    void infeasibleTriangleIsReportedWithoutNaN() {
        // u1 + u2 ≥ 2, u1 ≤ 0, u2 ≤ 0: every pair is feasible, the three together are not
        double[] a = {1, 1, -1, 0, 0, -1};
        double[] b = {2, 0, 0};
        DenseQp qp = new DenseQp(2, 3);
        assertTrue(qp.factor(new double[] {3, 1, 1, 2}, 2));
        double[] u = new double[2];
        double[] lambda = new double[3];
        int[] active = new int[2];
        for (double[] z : new double[][] {{0, 0}, {5, 5}, {-3, 1}, {1, -7}}) {
            int code = qp.solve(a, b, 3, z, u, lambda, active);
            assertTrue(DenseQp.isInfeasible(code), "z = " + Arrays.toString(z) + ": code " + code);
            int p = DenseQp.infeasibleConstraint(code);
            assertTrue(p >= 0 && p < 3);
            assertFinite(u, "u");
            assertFinite(lambda, "λ");
            assertFalse(DenseQp.isInfeasible(DenseQp.ITERATION_LIMIT));
            assertFalse(DenseQp.isInfeasible(DenseQp.NOT_FINITE));
        }
        assertThrows(IllegalArgumentException.class, () -> DenseQp.infeasibleConstraint(3));
    }

    @Test
    void zeroRowsAreIgnoredOrReportedByTheSignOfB() {
        SplittableRandom r = new SplittableRandom(0x0B3L);
        QpInstance p = QpInstance.random(r, 6, 5, 100);
        int k = p.k();
        QpInstance.Solution plain = p.solveWith(new DenseQp(k, 7));
        double[][] a = Arrays.copyOf(p.a(), p.m() + 2);
        a[p.m()] = new double[k];
        a[p.m() + 1] = new double[k];
        double[] b = Arrays.copyOf(p.b(), p.m() + 2);
        b[p.m()] = 0;
        b[p.m() + 1] = -3;
        // 0 ≥ 0 and 0 ≥ −3 always hold
        QpInstance withZeros = new QpInstance(p.w(), a, b, p.z(), p.u0());
        QpInstance.Solution s = assertCertified(withZeros, withZeros.solveWith(new DenseQp(k, 7)));
        assertBitIdentical(plain.u(), s.u(), "u with always-true zero rows");
        // 0 ≥ 1 never holds: infinitely far away, it is the first one tried, and reported
        b[p.m() + 1] = 1;
        QpInstance never = new QpInstance(p.w(), a, b, p.z(), p.u0());
        QpInstance.Solution bad = never.solveWith(new DenseQp(k, 7));
        assertEquals(p.m() + 1, DenseQp.infeasibleConstraint(bad.code()));
        assertFinite(bad.u(), "u");
        assertFinite(bad.lambda(), "λ");
    }

    @Test
    void duplicateScaledAndImpliedConstraintsChangeNothing() {
        trials("dependent rows", 0x0B4L, 150, r -> {
            QpInstance p = QpInstance.random(r, 10, 12, 100);
            QpInstance.Solution plain = assertCertified(p, p.solveWith(new DenseQp(10, 30)));
            int m = p.m();
            int extra = 1 + r.nextInt(6);
            double[][] a = Arrays.copyOf(p.a(), m + extra);
            double[] b = Arrays.copyOf(p.b(), m + extra);
            for (int e = 0; e < extra; e++) {
                int i = r.nextInt(m);
                int j = r.nextInt(m);
                // an exact copy, a positive multiple, or a nonnegative combination of two rows: all implied
                double ci = r.nextInt(3) == 0 ? 1 : uniform(r, 0.1, 3);
                double cj = r.nextBoolean() ? 0 : uniform(r, 0.1, 3);
                a[m + e] = new double[p.k()];
                for (int c = 0; c < p.k(); c++) {
                    a[m + e][c] = ci * p.a()[i][c] + cj * p.a()[j][c];
                }
                b[m + e] = ci * p.b()[i] + cj * p.b()[j];
            }
            QpInstance more = new QpInstance(p.w(), a, b, p.z(), p.u0());
            QpInstance.Solution s = assertCertified(more, more.solveWith(new DenseQp(10, 30)));
            double size = 1;
            for (double v : plain.u()) {
                size = Math.max(size, Math.abs(v));
            }
            for (int j = 0; j < p.k(); j++) {
                assertEquals(plain.u()[j], s.u()[j], 1e-10 * size, "u_" + j + " with implied rows, " + describe(more));
            }
        });
    }

    @Test
    void scalingRowsOrWChangesNeitherTheSolutionNorTheActiveSet() {
        trials("scale invariance", 0x0B9L, 150, r -> {
            QpInstance p = QpInstance.random(r, 12, 16, 100);
            QpInstance.Solution plain = assertCertified(p, p.solveWith(new DenseQp(12, 16)));
            // each row of A with its b times c_i, W times c_W: the tolerances are relative, so nothing else changes;
            // u is the same point, λ_i becomes c_W λ_i / c_i
            double cw = Math.pow(10, uniform(r, -6, 6));
            double[] c = new double[p.m()];
            double[][] a = new double[p.m()][];
            double[] b = new double[p.m()];
            for (int i = 0; i < p.m(); i++) {
                c[i] = Math.pow(10, uniform(r, -6, 6));
                a[i] = p.a()[i].clone();
                for (int j = 0; j < p.k(); j++) {
                    a[i][j] *= c[i];
                }
                b[i] = p.b()[i] * c[i];
            }
            double[][] w = new double[p.k()][];
            for (int j = 0; j < p.k(); j++) {
                w[j] = p.w()[j].clone();
                for (int l = 0; l < p.k(); l++) {
                    w[j][l] *= cw;
                }
            }
            QpInstance scaled = new QpInstance(w, a, b, p.z(), p.u0());
            QpInstance.Solution s = assertCertified(scaled, scaled.solveWith(new DenseQp(12, 16)));
            assertArrayEquals(plain.activeSet(), s.activeSet(), "active set");
            double size = 1;
            double largest = 0;
            for (int j = 0; j < p.k(); j++) {
                size = Math.max(size, Math.abs(plain.u()[j]));
            }
            for (int i = 0; i < p.m(); i++) {
                largest = Math.max(largest, plain.lambda()[i]);
            }
            for (int j = 0; j < p.k(); j++) {
                assertEquals(plain.u()[j], s.u()[j], 1e-12 * size, "u_" + j);
            }
            for (int i = 0; i < p.m(); i++) {
                assertEquals(plain.lambda()[i], s.lambda()[i] * c[i] / cw, 1e-10 * largest, "λ_" + i);
            }
        });
    }

    @Test
    void nonFiniteSlacksAreReported() {
        DenseQp qp = new DenseQp(2, 2);
        assertTrue(qp.factor(new double[] {1, 0, 0, 1}, 2));
        double[] a = {1, 0, 0, 1};
        double[] u = new double[2];
        double[] lambda = new double[2];
        int[] active = new int[2];
        assertEquals(DenseQp.NOT_FINITE, qp.solve(a, new double[] {0, 0}, 2, new double[] {Double.NaN, 1}, u,
                lambda, active));
        assertEquals(DenseQp.NOT_FINITE, qp.solve(a, new double[] {0, Double.POSITIVE_INFINITY}, 2,
                new double[] {1, 1}, u, lambda, active));
        assertEquals(DenseQp.NOT_FINITE, qp.solve(new double[] {1, Double.NaN, 0, 1}, new double[] {0, 0}, 2,
                new double[] {1, 1}, u, lambda, active));
    }

    @Test
    void matricesThatAreNotPositiveDefiniteAreRefused() {
        DenseQp qp = new DenseQp(3, 1);
        assertFalse(qp.factor(new double[] {0, 0, 0, 0}, 2), "zero");
        assertFalse(qp.factor(new double[] {-1, 0, 0, -1}, 2), "negative definite");
        assertFalse(qp.factor(new double[] {1, 2, 2, 1}, 2), "indefinite");
        assertFalse(qp.factor(new double[] {1, 1, 1, 1}, 2), "semidefinite");
        assertFalse(qp.factor(new double[] {1, 1, 1, 1 + 1e-15}, 2), "pivot 1e-15 of its diagonal");
        assertFalse(qp.factor(new double[] {1, 0, Double.NaN, 1}, 2), "NaN");
        assertFalse(qp.factor(new double[] {Double.POSITIVE_INFINITY}, 1), "infinite");
        double[] u = new double[1];
        // a refused factor leaves nothing to solve with
        assertThrows(IllegalStateException.class, () -> qp.solve(new double[] {1}, new double[] {0}, 1,
                new double[] {1}, u, new double[1], new int[1]));
        assertTrue(qp.factor(new double[] {1, 1, 1, 1 + 1e-12}, 2), "pivot 1e-12 of its diagonal");
        // the test is relative to each diagonal entry: a diagonal W of any spread of scales is well conditioned
        assertTrue(qp.factor(new double[] {1, 0, 0, 1e-200}, 2), "diagonal 1 and 1e-200");
        assertThrows(IllegalArgumentException.class, () -> qp.factor(new double[16], 4), "k > maxK");
        assertThrows(IllegalArgumentException.class, () -> qp.factor(new double[0], 0), "k = 0");
        assertThrows(IllegalArgumentException.class, () -> qp.solve(new double[4], new double[2], 2,
                new double[2], new double[2], new double[2], new int[2]), "m > maxM");
        assertThrows(IndexOutOfBoundsException.class, () -> qp.solve(new double[1], new double[1], 1,
                new double[2], new double[2], new double[1], new int[1]), "A too short");
        assertThrows(IllegalArgumentException.class, () -> new DenseQp(0, 1));
        assertThrows(IllegalArgumentException.class, () -> qp.feasibilityTolerance(-1));
        assertThrows(IllegalArgumentException.class, () -> qp.dependenceTolerance(Double.NaN));
        assertThrows(IllegalArgumentException.class, () -> qp.iterationLimit(-1));
    }

    @Test
    void theIterationLimitIsReported() {
        // the orthant from z < 0 adds one constraint per step: five steps for k = 5
        int k = 5;
        double[] eye = new double[k * k];
        for (int j = 0; j < k; j++) {
            eye[j * k + j] = 1;
        }
        double[] z = {-1, -2, -3, -4, -5};
        DenseQp qp = new DenseQp(k, k).iterationLimit(3);
        assertTrue(qp.factor(eye, k));
        double[] u = new double[k];
        double[] lambda = new double[k];
        int[] active = new int[k];
        assertEquals(DenseQp.ITERATION_LIMIT, qp.solve(eye, new double[k], k, z, u, lambda, active));
        assertFinite(u, "u");
        qp.iterationLimit(0);
        assertEquals(k, qp.solve(eye, new double[k], k, z, u, lambda, active), "the default limit suffices");
        assertEquals(k, qp.iterations());
    }

    @Test
    void oneInstanceSolvesManyProblemsAndRepeatsItself() {
        SplittableRandom r = new SplittableRandom(0x0B5L);
        DenseQp shared = new DenseQp(20, 30);
        QpInstance first = QpInstance.random(r, 20, 30, 100);
        QpInstance.Solution once = first.solveWith(shared);
        for (int t = 0; t < 20; t++) {
            // other sizes and data pass through the same work arrays
            QpInstance other = QpInstance.random(r, 20, 30, 100);
            assertCertified(other, other.solveWith(shared));
        }
        QpInstance.Solution again = first.solveWith(shared);
        QpInstance.Solution fresh = first.solveWith(new DenseQp(20, 30));
        for (QpInstance.Solution s : new QpInstance.Solution[] {again, fresh}) {
            assertEquals(once.code(), s.code());
            assertBitIdentical(once.u(), s.u(), "u");
            assertBitIdentical(once.lambda(), s.lambda(), "λ");
            assertArrayEquals(once.activeSet(), s.activeSet(), "active set");
        }
    }

    @Test
    void solvesAllocateNothing() {
        java.lang.management.ThreadMXBean bean = java.lang.management.ManagementFactory.getThreadMXBean();
        assumeTrue(bean instanceof com.sun.management.ThreadMXBean, "per-thread allocation counts need HotSpot");
        com.sun.management.ThreadMXBean threads = (com.sun.management.ThreadMXBean) bean;
        assumeTrue(threads.isThreadAllocatedMemorySupported() && threads.isThreadAllocatedMemoryEnabled());
        SplittableRandom r = new SplittableRandom(0x0B8L);
        QpInstance p;
        QpInstance.Solution s;
        DenseQp qp = new DenseQp(12, 16);
        do {
            p = QpInstance.random(r, 12, 16, 100);
            s = p.solveWith(qp);
        } while (s.code() < 2);
        double[] a = QpInstance.flat(p.a(), p.k());
        double[] u = new double[p.k()];
        double[] lambda = new double[p.m()];
        int[] active = new int[p.k()];
        long id = Thread.currentThread().getId();
        int solves = 20_000;
        long before = threads.getThreadAllocatedBytes(id);
        int sum = 0;
        for (int t = 0; t < solves; t++) {
            sum += qp.solve(a, p.b(), p.m(), p.z(), u, lambda, active);
        }
        long bytes = threads.getThreadAllocatedBytes(id) - before;
        assertEquals(solves * s.code(), sum, "every repeat gives the same active count");
        assertBitIdentical(s.u(), u, "u after the repeats");
        // less than one byte a solve: room for a one-off allocation by the runtime, none for a per-call array
        assertTrue(bytes < solves, bytes + " bytes allocated over " + solves + " solves");
    }

    @Test
    void offsetsAddressOneSampleOfAPackedBatch() {
        SplittableRandom r = new SplittableRandom(0x0B6L);
        int k = 5;
        int m = 7;
        int batch = 6;
        double[] w = QpInstance.flat(QpInstance.spd(r, k, 100), k);
        double[] a = new double[batch * m * k + 2];
        double[] b = new double[batch * m + 1];
        double[] z = new double[batch * k + 3];
        for (int i = 0; i < a.length; i++) {
            a[i] = signed(r, 0.1, 1);
        }
        for (int i = 0; i < b.length; i++) {
            b[i] = signed(r, 0, 1);
        }
        for (int i = 0; i < z.length; i++) {
            z[i] = signed(r, 0, 2);
        }
        double[] u = new double[batch * k + 1];
        double[] lambda = new double[batch * m + 2];
        int[] active = new int[batch * k + 4];
        DenseQp packed = new DenseQp(k, m);
        DenseQp alone = new DenseQp(k, m);
        assertTrue(packed.factor(w, k) && alone.factor(w, k));
        for (int s = 0; s < batch; s++) {
            int code = packed.solve(a, 2 + s * m * k, b, 1 + s * m, m, z, 3 + s * k, u, 1 + s * k, lambda,
                    2 + s * m, active, 4 + s * k);
            double[] uAlone = new double[k];
            double[] lambdaAlone = new double[m];
            int[] activeAlone = new int[k];
            int codeAlone = alone.solve(Arrays.copyOfRange(a, 2 + s * m * k, 2 + (s + 1) * m * k),
                    Arrays.copyOfRange(b, 1 + s * m, 1 + (s + 1) * m), m,
                    Arrays.copyOfRange(z, 3 + s * k, 3 + (s + 1) * k), uAlone, lambdaAlone, activeAlone);
            assertEquals(codeAlone, code, "sample " + s);
            assertBitIdentical(uAlone, Arrays.copyOfRange(u, 1 + s * k, 1 + (s + 1) * k), "u of sample " + s);
            assertBitIdentical(lambdaAlone, Arrays.copyOfRange(lambda, 2 + s * m, 2 + (s + 1) * m),
                    "λ of sample " + s);
            int q = Math.max(code, 0);
            assertArrayEquals(Arrays.copyOf(activeAlone, q), Arrays.copyOfRange(active, 4 + s * k, 4 + s * k + q));
        }
        // nothing before the first sample's offsets was written
        assertEquals(0.0, u[0]);
        assertEquals(0.0, lambda[0]);
        assertEquals(0.0, lambda[1]);
    }

    /** A constraint with a nonzero row and a slack of at least 1e-3 of its scale at the solution, or −1. */
    private static int clearlyInactive(QpInstance p, QpInstance.Solution s) {
        for (int i = 0; i < p.m(); i++) {
            double slack = -p.b()[i];
            double scale = Math.abs(p.b()[i]);
            double norm = 0;
            for (int j = 0; j < p.k(); j++) {
                slack += p.a()[i][j] * s.u()[j];
                scale += Math.abs(p.a()[i][j] * s.u()[j]);
                norm += Math.abs(p.a()[i][j]);
            }
            if (norm > 0 && slack > 1e-3 * scale) {
                return i;
            }
        }
        return -1;
    }

    @Test
    void theCertificateTellsEachBrokenConditionApart() {
        SplittableRandom r = new SplittableRandom(0x0B7L);
        QpInstance p;
        QpInstance.Solution s;
        int off;
        do {
            p = QpInstance.random(r, 6, 8, 100);
            s = p.solveWith(new DenseQp(6, 8));
            off = clearlyInactive(p, s);
        } while (s.code() < 1 || off < 0);
        assertCertified(p, s);
        int on = s.active()[0];
        // z itself violates a constraint (one was active): primal infeasible, and λ ≠ 0 no longer balances W(u − z)
        double[] v = p.kkt(p.z(), s.lambda());
        assertTrue(v[KktCheck.PRIMAL] > 1e-6, Arrays.toString(v));
        assertTrue(v[KktCheck.STATIONARITY] > 1e-6, Arrays.toString(v));
        // a negative multiplier
        double[] negative = s.lambda().clone();
        negative[on] = -negative[on];
        v = p.kkt(s.u(), negative);
        assertTrue(v[KktCheck.DUAL] > 0.01, Arrays.toString(v));
        // a multiplier on a constraint with slack
        double[] slackWeighted = s.lambda().clone();
        slackWeighted[off] = 1;
        v = p.kkt(s.u(), slackWeighted);
        assertTrue(v[KktCheck.COMPLEMENTARITY] > 1e-8, Arrays.toString(v));
        assertTrue(v[KktCheck.STATIONARITY] > 1e-6, Arrays.toString(v));
        assertEquals(0.0, v[KktCheck.DUAL]);
        // the four in one: the largest is returned, and NaN poisons it
        double[] out = new double[KktCheck.SIZE + 1];
        double[] w = QpInstance.flat(p.w(), p.k());
        double[] a = QpInstance.flat(p.a(), p.k());
        double worst = KktCheck.check(w, 0, p.k(), a, 0, p.b(), 0, p.m(), p.z(), 0, s.u(), 0, negative, 0, out, 1);
        assertEquals(Arrays.stream(out).max().getAsDouble(), worst);
        double[] nan = s.u().clone();
        nan[0] = Double.NaN;
        assertTrue(Double.isNaN(KktCheck.check(w, p.k(), a, p.b(), p.m(), p.z(), nan, s.lambda(), out)));
    }
}
