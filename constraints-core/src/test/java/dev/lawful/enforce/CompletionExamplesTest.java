package dev.lawful.enforce;

import static dev.lawful.enforce.CompletionModelsTest.U;
import static dev.lawful.enforce.CompletionModelsTest.plus;
import static dev.lawful.enforce.CompletionModelsTest.times;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static dev.lawful.enforce.CompletionModelsTest.uniform;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.CollisionLaws;
import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/** Worked examples whose completed outputs have closed forms or a consequence that can be checked independently. */
class CompletionExamplesTest {

    // ---- a two-body elastic collision in a plane ---------------------------------------------------------------

    /** The collision laws (see {@link CollisionLaws#TEXT}). */
    private static final String COLLISION = CollisionLaws.TEXT;

    /** Starts Newton at the exchange of the normal relative velocity (exact for equal masses): the far root. */
    private static final String EXCHANGE_GUESS = "guess v1 = u1 - dot(u1 - u2, n)*n\nguess v2 = u2 + dot(u1 - u2, n)*n\n";

    /** Starts Newton a little way from v = u on the side away from the collision root. */
    private static final String NEAR_TRIVIAL_GUESS =
            "guess v1 = u1 + 0.1*dot(u1 - u2, n)*n\nguess v2 = u2 - 0.1*dot(u1 - u2, n)*n\n";

    /** Random collisions: masses e^[-2, 2) kg, velocity components in [-5, 5) m/s, a random direction n. */
    private static double[] collisions(SplittableRandom r, int batch) {
        double[] x = new double[batch * 8];
        for (int s = 0; s < batch; s++) {
            double w;
            do {
                double angle = uniform(r, 0, 2 * Math.PI);
                double[] row = {Math.exp(uniform(r, -2, 2)), Math.exp(uniform(r, -2, 2)), uniform(r, -5, 5),
                    uniform(r, -5, 5), uniform(r, -5, 5), uniform(r, -5, 5), Math.cos(angle), Math.sin(angle)};
                System.arraycopy(row, 0, x, s * 8, 8);
                w = (row[2] - row[4]) * row[6] + (row[3] - row[5]) * row[7];
                // keep the two roots apart: a grazing contact (u1 − u2)·n ≈ 0 makes them coincide
            } while (Math.abs(w) < 0.1);
        }
        return x;
    }

    @Test
    void elasticCollisionMatchesTheTextbookClosedForm() {
        LawSet laws = LawSet.parse("<collision>", COLLISION + EXCHANGE_GUESS);
        Completion c = Completion.of(laws);
        assertEquals(Tier.NONLINEAR, c.tier());
        assertEquals(List.of(), c.warnings(), "every completed output has a guess");
        trials("elastic collision", 0xC011L, 20, r -> {
            int batch = 1 + r.nextInt(100);
            double[] x = collisions(r, batch);
            double[] y = new double[batch * 4];
            c.forward(x, new double[0], batch, y, null, c.newWorkspace());
            for (int s = 0; s < batch; s++) {
                double m1 = x[s * 8];
                double m2 = x[s * 8 + 1];
                double[] u1 = {x[s * 8 + 2], x[s * 8 + 3]};
                double[] u2 = {x[s * 8 + 4], x[s * 8 + 5]};
                double[] n = {x[s * 8 + 6], x[s * 8 + 7]};
                double w = (u1[0] - u2[0]) * n[0] + (u1[1] - u2[1]) * n[1];
                double speed = Math.abs(u1[0]) + Math.abs(u1[1]) + Math.abs(u2[0]) + Math.abs(u2[1]);
                for (int k = 0; k < 2; k++) {
                    // Source: standard elastic-collision result (common practice, textbook mechanics):
                    // v1 = u1 − 2 m2/(m1+m2) ((u1−u2)·n) n, v2 = u2 + 2 m1/(m1+m2) ((u1−u2)·n) n
                    double v1 = u1[k] - 2 * m2 / (m1 + m2) * w * n[k];
                    double v2 = u2[k] + 2 * m1 / (m1 + m2) * w * n[k];
                    assertEquals(v1, y[s * 4 + k], 1e-12 * speed, "v1[" + k + "] of sample " + s);
                    assertEquals(v2, y[s * 4 + 2 + k], 1e-12 * speed, "v2[" + k + "] of sample " + s);
                }
            }
        });
    }

    @Test
    void aGuessNearTheTrivialRootFindsTheTrivialRoot() {
        // the docs: Newton starts from the guess, so the guess picks the root
        LawSet laws = LawSet.parse("<collision>", COLLISION + NEAR_TRIVIAL_GUESS);
        Completion c = Completion.of(laws);
        SplittableRandom r = new SplittableRandom(0xC012L);
        int batch = 200;
        double[] x = collisions(r, batch);
        double[] y = new double[batch * 4];
        c.forward(x, new double[0], batch, y, null, c.newWorkspace());
        for (int s = 0; s < batch; s++) {
            for (int k = 0; k < 4; k++) {
                // v = u satisfies every law exactly: no collision
                double u = x[s * 8 + 2 + k];
                assertEquals(u, y[s * 4 + k], 1e-12 * (1 + Math.abs(u)), "v = u at sample " + s);
            }
        }
    }

    @Test
    void withoutAGuessNewtonStillFindsARootOfTheCollisionLaws() {
        // the docs: without a guess Newton starts each completed output at a fixed value between 0.5 and 1.5, different
        // per output, so it never starts at v1 = v2 where the energy row is a combination of the momentum rows; which
        // root it finds is not specified, but every sample it accepts satisfies every law
        LawSet laws = LawSet.parse("<collision>", COLLISION);
        Completion c = Completion.builder(laws).onBadSample(OnBadSample.MASK).build();
        assertEquals(List.of("nonlinear laws: Newton starts v1[0], v1[1], v2[0], v2[1] at fixed values between 0.5 and"
                + " 1.5 (in the declared unit); add a 'guess' statement to pick the root and speed convergence"),
                c.warnings());
        SplittableRandom r = new SplittableRandom(0xC013L);
        int batch = 50;
        double[] x = collisions(r, batch);
        double[] y = new double[batch * 4];
        byte[] status = new byte[batch];
        c.forward(x, new double[0], batch, y, status, c.newWorkspace());
        double[] residuals = new double[batch * 4];
        double[] scales = new double[batch * 4];
        laws.evaluator().residuals(x, y, batch, residuals, scales);
        int ok = 0;
        for (int s = 0; s < batch; s++) {
            if (status[s] == SampleStatus.OK) {
                ok++;
                for (int i = 0; i < 4; i++) {
                    assertTrue(Math.abs(residuals[s * 4 + i]) <= 8 * 0x1p-53 * scales[s * 4 + i],
                            "sample " + s + " law " + i + ": " + residuals[s * 4 + i]);
                }
            } else {
                assertTrue(Double.isNaN(y[s * 4]), "a refused sample is NaN, sample " + s);
            }
        }
        assertTrue(ok >= batch * 9 / 10, "Newton from the generic start should converge on most samples: " + ok);
    }

    @Test
    void aSingularNewtonStartIsReportedAsSuchAndSuggestsAGuess() {
        // The sample is regular (at both roots the completed block is invertible); only Newton's starting point is
        // degenerate, here because the guesses put both bodies at the same velocity. The message must not say the
        // laws are singular at this sample, and should point to the fix.
        LawSet laws = LawSet.parse("<collision>", COLLISION + "guess v1 = u1\nguess v2 = u1\n");
        Completion c = Completion.of(laws);
        double[] x = {1, 2, 3, 0.5, -1, 0.25, 0.6, 0.8};
        EnforcementException e = assertThrows(EnforcementException.class,
                () -> c.forward(x, new double[0], 1, new double[4], null, c.newWorkspace()));
        assertEquals(0, e.sample());
        assertTrue(e.getMessage().contains("guess"), () -> "message does not suggest a guess:\n" + e.getMessage());
    }

    // ---- element balances of a reacting mixture ----------------------------------------------------------------

    @Test
    void steamReformerConservesTotalMassToRounding() throws IOException {
        LawSet laws = LawSet.read(Path.of("../examples/laws/steam-reformer.law"));
        Completion c = Completion.of(laws);
        assertEquals(Tier.CONSTANT_AFFINE, c.tier());
        assertEquals(List.of("out[2]", "out[4]", "out[1]", "out[5]"), c.completedNames());
        assertEquals(List.of("out[0]", "out[3]"), c.freeNames());
        // Source: IUPAC CIAAW standard atomic weights 2021, abridged values
        double hydrogen = 1.008;
        double carbon = 12.011;
        double nitrogen = 14.007;
        double oxygen = 15.999;
        double[] element = {carbon, hydrogen, oxygen, nitrogen};
        // atoms per molecule of CH4, H2O, CO, CO2, H2, N2 (the species order of the law file)
        int[][] atoms = {{1, 0, 1, 1, 0, 0}, {4, 2, 0, 0, 2, 0}, {0, 1, 1, 2, 0, 0}, {0, 0, 0, 0, 0, 2}};
        ExpandedLaws expanded = laws.expand();
        LawEvaluator ev = laws.evaluator();
        int[] depth = new int[4];
        for (int e = 0; e < 4; e++) {
            depth[e] = expanded.roundingDepth(e);
            // one product (count × flow) per addend, none where the count is 1
            assertTrue(depth[e] <= 1, "an element balance has rounding depth at most 1");
        }
        trials("steam reformer mass", 0x57EAL, 30, r -> {
            int batch = 1 + r.nextInt(200);
            double[] x = new double[batch * 7];
            double[] z = new double[batch * 2];
            for (int s = 0; s < batch; s++) {
                double scale = Math.pow(10, uniform(r, -3, 3));
                for (int k = 0; k < 6; k++) {
                    x[s * 7 + k] = scale * uniform(r, 0, 10);
                }
                x[s * 7 + 6] = uniform(r, 700, 1200);
                z[s * 2] = scale * uniform(r, 0, 3);
                z[s * 2 + 1] = scale * uniform(r, 0, 3);
            }
            double[] y = new double[batch * 6];
            c.forward(x, z, batch, y, null, c.newWorkspace());
            double[] scales = new double[batch * 4];
            ev.residuals(x, y, batch, null, scales);
            for (int s = 0; s < batch; s++) {
                // total mass out − in = Σ_k M_k (out_k − feed_k), M_k = Σ_e atoms_ek A_e, in double-double
                double[] difference = {0, 0};
                double massIn = 0;
                for (int k = 0; k < 6; k++) {
                    double[] molar = {0, 0};
                    for (int e = 0; e < 4; e++) {
                        molar = plus(molar, times(atoms[e][k], element[e]));
                    }
                    difference = plus(difference, times(molar, y[s * 6 + k]));
                    difference = plus(difference, times(molar, -x[s * 7 + k]));
                    massIn += (molar[0] + molar[1]) * x[s * 7 + k];
                }
                // each element balance holds to (d + 3)·2⁻⁵³ of its natural scale, so the mass to the weighted sum
                double tolerance = 0;
                for (int e = 0; e < 4; e++) {
                    tolerance += element[e] * (depth[e] + 3) * U * scales[s * 4 + e];
                }
                double dm = difference[0] + difference[1];
                final int sample = s;
                final double in = massIn;
                final double tol = tolerance * (1 + 1e-9);
                assertTrue(Math.abs(dm) <= tol, () -> "sample " + sample + ": mass out − in = " + dm
                        + " g/s, more than " + tol + " (mass in " + in + ")");
            }
        });
    }

    // ---- units and roots -------------------------------------------------------------------------------------

    @Test
    void freeFallSpeedInKilometresPerHourMatchesTheClosedForm() {
        // v² = 2 g h with v declared in km/h; the guess (in SI, converted by the library) picks the sign
        String text = String.join("\n",
                "input height m",
                "output v km/h",
                "const g = 9.80665 m s-2",
                "const start = 1 m/s",
                "law energy: v^2 = 2*g*height",
                "");
        Completion down = Completion.of(LawSet.parse("<fall>", text + "guess v = start\n"));
        Completion up = Completion.of(LawSet.parse("<fall>", text + "guess v = -start\n"));
        double[] heights = {0.5, 1, 12.5, 100, 3000};
        double[] vDown = new double[heights.length];
        double[] vUp = new double[heights.length];
        down.forward(heights, new double[0], heights.length, vDown, null, down.newWorkspace());
        up.forward(heights, new double[0], heights.length, vUp, null, up.newWorkspace());
        for (int s = 0; s < heights.length; s++) {
            // Source: free fall from rest, v = sqrt(2 g h) (common practice, textbook mechanics); standard gravity
            // g = 9.80665 m/s² and 1 km/h = 1000 m / 3600 s (BIPM SI Brochure, 9th edition (2019))
            double want = Math.sqrt(2 * 9.80665 * heights[s]) * 3600 / 1000;
            assertEquals(want, vDown[s], 4 * Math.ulp(want), "downward root at h = " + heights[s]);
            assertEquals(-want, vUp[s], 4 * Math.ulp(want), "upward root at h = " + heights[s]);
        }
    }

    @Test
    void aGuessIsTakenInSiAndConvertedToTheDeclaredUnit() {
        // roots v = u and v = 2u (SI); v is declared in km/h, u in m/s. The guess 1.9·u is an SI value: converted
        // to km/h it lies past the midpoint 1.5·u, so Newton must reach 2u = 7.2·u km/h; read as km/h it would be
        // 0.53·u m/s and lead to u instead
        LawSet laws = LawSet.parse("<roots>", String.join("\n",
                "input u m/s",
                "output v km/h",
                "law roots: (v - u)*(v - 2*u) = 0",
                "guess v = 1.9*u",
                ""));
        Completion c = Completion.of(laws);
        double[] u = {0.5, 1, 3, 20};
        double[] v = new double[u.length];
        c.forward(u, new double[0], u.length, v, null, c.newWorkspace());
        for (int s = 0; s < u.length; s++) {
            // Source: 1 km/h = 1000 m / 3600 s (BIPM SI Brochure, 9th edition (2019))
            double want = 2 * u[s] * 3600 / 1000;
            assertEquals(want, v[s], 8 * Math.ulp(want), "root for u = " + u[s]);
        }
    }

    @Test
    void newtonReachesTheOnlyRootFromAGuessOnTheFarSideOfIt() {
        // c³ = x has one real root for every x, and undamped Newton reaches it from any start but 0. From c = 10 with
        // x = −8 the first steps keep c > 0, where both addends (c³ and −x) are positive: |C| falls by a factor of
        // about three per step while |C|/s stays exactly 1, so a step test on |C|/s must not be what rejects them.
        LawSet laws = LawSet.parse("<cube>", "input x\ninput g\noutput c\nlaw cube: c^3 = x\nguess c = g\n");
        Completion c = Completion.of(laws);
        double[] x = {-8, 10, -8, 3, 8, -10, 27, 0.5, -0.001, 4};
        double[] y = new double[5];
        c.forward(x, new double[0], 5, y, null, c.newWorkspace());
        for (int s = 0; s < 5; s++) {
            // Source: java.lang.Math.cbrt (JDK 17; within 1 ulp of the exact cube root)
            double want = Math.cbrt(x[2 * s]);
            assertEquals(want, y[s], 2 * Math.ulp(want), "cube root of " + x[2 * s] + " from " + x[2 * s + 1]);
        }
    }
}
