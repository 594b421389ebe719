package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Completion with limits: outputs obey the laws and stay inside the limits, moved the least when they must move,
 * and untouched (bit for bit) when the completion is already inside.
 */
class CompletionLimitsTest {
    /** A three-way split of a flow x: a and b are predicted, c completes the balance and must not be negative. */
    private static final String SPLIT = String.join("\n",
            "input  x      kg/s",
            "output a      kg/s",
            "output b      kg/s",
            "output c      kg/s",
            "law balance: a + b + c = x",
            "complete c",
            "");

    private static LawSet split(String limits) {
        return LawSet.parse("<split>", SPLIT + limits);
    }

    @Test
    void aCompletedOutputBelowItsLimitIsMovedTheLeastAndLandsOnIt() {
        Completion c = Completion.of(split("limit dry: c >= 0\n"));
        double x = 1.0;
        double a = 0.8;
        double b = 0.7;
        double[] y = new double[3];
        c.forward(new double[] {x}, new double[] {a, b}, 1, y, null, null);
        // the least move of (a, b, c) in Σ Δ² with a + b + c = x and c on its limit 0: a and b share the excess
        // equally, Δa = Δb = (x − a − b)/2 (common practice: least-squares projection onto an affine set)
        double share = (x - a - b) / 2;
        // a completed output is aimed a margin of 4e-12 of the row's size inside its limit, so that its exact
        // completion lands inside rather than a rounding error outside
        assertTrue(y[2] >= 0 && y[2] <= 1e-11, "c on its limit: " + y[2]);
        assertEquals(a + share, y[0], 1e-11);
        assertEquals(b + share, y[1], 1e-11);
        assertEquals(x, y[0] + y[1] + y[2], 4 * Math.ulp(x), "the balance still holds");
    }

    @Test
    void aSampleInsideItsLimitsIsBitIdenticalToTheCompletionWithoutThem() {
        Completion with = Completion.of(split("const top = 5 kg/s\nlimit dry: c >= 0\nlimit cap: a <= top\n"));
        Completion without = Completion.of(split(""));
        SplittableRandom r = new SplittableRandom(7);
        int batch = 200;
        double[] x = new double[batch];
        double[] z = new double[2 * batch];
        for (int s = 0; s < batch; s++) {
            x[s] = 2 + r.nextDouble();
            z[2 * s] = r.nextDouble();
            z[2 * s + 1] = r.nextDouble();
        }
        double[] y1 = new double[3 * batch];
        double[] y2 = new double[3 * batch];
        with.forward(x, z, batch, y1, null, null);
        without.forward(x, z, batch, y2, null, null);
        assertArrayEquals(y2, y1, 0.0);
    }

    @Test
    void aCompletionThatMissesItsLimitByRoundingOnlySitsExactlyOnItAndKeepsItsFreeOutputs() {
        // 0.1 + 0.2 and 0.3 differ in binary floating point (IEEE 754 doubles; common practice), so completing
        // c = x − a − b for a split that has nothing left over gives a rounding-sized negative c
        Completion plain = Completion.of(split(""));
        double[] y0 = new double[3];
        plain.forward(new double[] {0.3}, new double[] {0.1, 0.2}, 1, y0, null, null);
        assertTrue(y0[2] < 0 && y0[2] > -1e-15, "the plain completion's c: " + y0[2]);
        Completion c = Completion.of(split("limit dry: c >= 0\n"));
        double[] y = new double[3];
        c.forward(new double[] {0.3}, new double[] {0.1, 0.2}, 1, y, null, null);
        // the balance holds to its bound with c = 0 exactly, so no free output needs to move
        assertArrayEquals(new double[] {0.1, 0.2, 0.0}, y, 0.0);
        assertEquals(0.0, 1 / y[2] > 0 ? 0.0 : 1.0, "c is +0.0");
    }

    @Test
    void aFreeOutputAboveItsLimitIsSetToItExactly() {
        Completion c = Completion.of(split("const top = 0.25 kg/s\nlimit cap: a <= top\n"));
        double[] y = new double[3];
        c.forward(new double[] {1}, new double[] {0.6, 0.1}, 1, y, null, null);
        assertEquals(0.25, y[0], 0.0);
        // a moves by −0.35 onto its limit; the least Δb² + Δc² with Δb + Δc = 0.35 shares it equally (common
        // practice: least-squares projection onto an affine set)
        assertEquals(0.1 + 0.35 / 2, y[1], 1e-15);
        assertEquals(1 - 0.25 - (0.1 + 0.35 / 2), y[2], 1e-15);
        assertEquals(1.0, y[0] + y[1] + y[2], 4 * Math.ulp(1.0));
    }

    @Test
    void aSampleNoOutputsCanSatisfyIsReportedNeverReturned() {
        String limits = "limit pa: a >= 0\nlimit pb: b >= 0\nlimit pc: c >= 0\n";
        Completion masked = Completion.builder(split(limits)).onBadSample(OnBadSample.MASK).build();
        double[] y = new double[6];
        byte[] status = new byte[2];
        // a negative total flow cannot be split into non-negative parts
        masked.forward(new double[] {-1, 1}, new double[] {0.2, 0.2, 0.2, 0.2}, 2, y, status, null);
        assertEquals(SampleStatus.OUTSIDE_LIMITS, status[0]);
        assertTrue(Double.isNaN(y[0]) && Double.isNaN(y[1]) && Double.isNaN(y[2]));
        assertEquals(SampleStatus.OK, status[1]);
        Completion strict = Completion.of(split(limits));
        EnforcementException e = assertThrows(EnforcementException.class, () -> strict.forward(new double[] {-1},
                new double[] {0.2, 0.2}, 1, new double[3], null, null));
        assertEquals("sample 0: no outputs satisfy both the laws and the limits 'pa', 'pb', 'pc' (the limits conflict,"
                + " given the laws and this sample's inputs) (use OnBadSample.MASK to get NaN rows and a status mask"
                + " instead)", e.getMessage());
    }

    @Test
    void theGradientOnALimitIsTheProjectionsAndInsideItIsThePlainOne() {
        Completion c = Completion.of(split("limit dry: c >= 0\n"));
        double[] y = new double[3];
        c.forward(new double[] {1}, new double[] {0.8, 0.7}, 1, y, null, null);
        // on the limit c = 0 the least move gives a* = (x + a − b)/2, b* = (x − a + b)/2, c* = 0 (the projection
        // onto the line a + b = x in Σ Δ² over a, b, c; common practice), so ∂a*/∂a = 1/2, ∂a*/∂b = −1/2,
        // ∂a*/∂x = 1/2, and c* does not move
        double[] dz = new double[3 * 2];
        double[] dx = new double[3];
        c.jacobians(new double[] {1}, y, 1, dz, dx, null);
        assertArrayEquals(new double[] {0.5, -0.5, -0.5, 0.5, 0, 0}, dz, 1e-12);
        assertArrayEquals(new double[] {0.5, 0.5, 0}, dx, 1e-12);
        double[] inside = new double[3];
        c.forward(new double[] {1}, new double[] {0.2, 0.3}, 1, inside, null, null);
        double[] gz = new double[2];
        c.backward(new double[] {1}, inside, new double[] {0, 0, 1}, 1, gz, null, null);
        // c = x − a − b: ∂c/∂a = ∂c/∂b = −1
        assertArrayEquals(new double[] {-1, -1}, gz, 0.0);
    }

    private static final double[][] ATOMS = {
        {1, 0, 1, 1, 0, 0}, {4, 2, 0, 0, 2, 0}, {0, 1, 1, 2, 0, 0}, {0, 0, 0, 0, 0, 2}};

    @Test
    void nonNegativeOutletFlowsAgreeWithAnIndependentQuadraticProgrammingSolver() {
        LawSet laws = LawSet.parse("<reformer>", LimitLaws.REFORMER);
        Completion limited = Completion.of(laws);
        Completion plain = Completion.of(LawSet.parse("<reformer>", LimitLaws.REFORMER.replace("limit flows:  out >= 0", "")));
        SplittableRandom r = new SplittableRandom(11);
        int moved = 0;
        for (int trial = 0; trial < 200; trial++) {
            double[] feed = new double[6];
            for (int i = 0; i < 6; i++) {
                feed[i] = 0.05 + r.nextDouble();
            }
            double[] z = {r.nextDouble() * 2, r.nextDouble() * 2};
            double[] y = new double[6];
            double[] y0 = new double[6];
            limited.forward(feed, z, 1, y, null, null);
            plain.forward(feed, z, 1, y0, null, null);
            for (int o = 0; o < 6; o++) {
                assertTrue(y[o] >= 0, "trial " + trial + ": out[" + o + "] = " + y[o]);
            }
            if (java.util.Arrays.equals(y, y0)) {
                continue;
            }
            moved++;
            // the least Σ (y − y0)² over outlets that keep every element balance and stay non-negative: the same
            // problem stated over all outputs, which is what the layer solves over the free ones
            // Source: ojAlgo 55.0.1 ConvexSolver (independent QP solver)
            double[] reference = LimitReference.nearestBalanced(ATOMS, feed, y0, feed);
            for (int o = 0; o < 6; o++) {
                assertEquals(reference[o], y[o], 1e-8 * (1 + Math.abs(reference[o])), "trial " + trial + " out[" + o
                        + "]");
            }
            for (double[] row : ATOMS) {
                double in = 0;
                double out = 0;
                double scale = 0;
                for (int j = 0; j < 6; j++) {
                    in += row[j] * feed[j];
                    out += row[j] * y[j];
                    scale += Math.abs(row[j] * feed[j]) + Math.abs(row[j] * y[j]);
                }
                assertTrue(Math.abs(out - in) <= 4 * 0x1p-53 * scale, "trial " + trial + ": balance off by "
                        + (out - in));
            }
        }
        assertTrue(moved > 40, "only " + moved + " of 200 samples were outside a limit");
    }

    @Test
    void aWaterBudgetThatWouldRainNegativeAmountsEndsWithNoRain() {
        // precipitation closes the column's water budget P = E - m*dq (the coefficient m is an input: the affine
        // tier); a moistening dq that leaves P < 0 is reduced to the one that leaves exactly no rain, dq = E/m,
        // the only point with P >= 0 nearest to it (common practice: a budget with zero precipitation)
        LawSet budget = LawSet.parse("<budget>", String.join("\n",
                "input  E   kg/(m2 s)",
                "input  m   kg/m2",
                "output dq  1/s",
                "output P   kg/(m2 s)",
                "law water: P = E - m * dq",
                "complete P",
                "limit rain: P >= 0",
                ""));
        Completion c = Completion.of(budget);
        assertEquals(Tier.AFFINE, c.tier());
        double[] y = new double[2];
        c.forward(new double[] {1, 2}, new double[] {0.8}, 1, y, null, null);
        assertEquals(0.5, y[0], 1e-11);
        assertTrue(y[1] >= 0 && y[1] <= 1e-11, "P = " + y[1]);
    }

    @Test
    void aNonlinearLawKeepsItsLimitAndItsLaw() {
        LawSet cubic = LawSet.parse("<cubic>", String.join("\n",
                "input  x",
                "output a",
                "output v",
                "law shape: v^3 + v = x - a",
                "complete v",
                "guess v = 1",
                "const floor = 0.5",
                "limit low: v >= floor",
                ""));
        Completion c = Completion.of(cubic);
        assertEquals(Tier.NONLINEAR, c.tier());
        double[] y = new double[2];
        // x - a = 0.2 gives v ≈ 0.19 below its limit
        c.forward(new double[] {1}, new double[] {0.8}, 1, y, null, null);
        assertTrue(y[1] >= 0.5 && y[1] <= 0.5 + 1e-9, "v = " + y[1]);
        double residual = y[1] * y[1] * y[1] + y[1] - (1 - y[0]);
        assertTrue(Math.abs(residual) <= 8 * 0x1p-53 * 2, "law residual " + residual);
    }

    @Test
    void sixteenThreadsGiveTheBitsOfOne() throws InterruptedException {
        Completion c = Completion.of(LawSet.parse("<reformer>", LimitLaws.REFORMER));
        SplittableRandom r = new SplittableRandom(5);
        int batch = 64;
        double[] feed = new double[6 * batch];
        double[] z = new double[2 * batch];
        for (int i = 0; i < feed.length; i++) {
            feed[i] = 0.05 + r.nextDouble();
        }
        for (int i = 0; i < z.length; i++) {
            z[i] = 2 * r.nextDouble();
        }
        double[] one = new double[6 * batch];
        c.forward(feed, z, batch, one, null, c.newWorkspace());
        double[][] many = new double[16][6 * batch];
        Thread[] threads = new Thread[16];
        for (int t = 0; t < 16; t++) {
            int id = t;
            threads[t] = new Thread(() -> {
                Completion.Workspace ws = c.newWorkspace();
                for (int round = 0; round < 5; round++) {
                    c.forward(feed, z, batch, many[id], null, ws);
                }
            });
            threads[t].start();
        }
        for (Thread t : threads) {
            t.join();
        }
        for (double[] y : many) {
            assertArrayEquals(one, y, 0.0);
        }
    }
}
