package dev.lawful.enforce;

import static dev.lawful.enforce.CompletionModelsTest.U;
import static dev.lawful.enforce.CompletionModelsTest.block;
import static dev.lawful.enforce.CompletionModelsTest.exactCheck;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import java.util.SplittableRandom;
import java.util.function.Function;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;

/**
 * {@link BoundCheck#SKIP}: the same solve as the certified call without its final evaluation. A sample the
 * certified call did not have to refine comes back with the same bits; one it refined keeps the solve's own
 * rounding. Bad samples are reported under both.
 */
class CompletionBoundCheckTest {

    /**
     * Runs one random model both ways. The exact residual (double-double, {@link CompletionModelsTest#exactCheck})
     * of every certified sample is within the documented bound. A skipped sample is the solve's result alone: its
     * residual is within the documented bound plus the solve's own rounding, at most 8·m·2⁻⁵³·κ∞(A)·(largest
     * scale of the sample's laws), with m the number of variables and κ∞(A) the condition number of the completed
     * block by Commons Math.
     *
     * @return {samples, samples that differ}
     */
    private static int[] compare(CompletionModelsTest.Model model, SplittableRandom r) {
        LawSet laws = model.lawSet();
        Completion c = Completion.of(laws);
        int batch = 1 + r.nextInt(60);
        double[][] drawn = model.batch(r, batch);
        double[] certified = new double[batch * model.p];
        double[] skipped = new double[batch * model.p];
        Completion.Workspace ws = c.newWorkspace();
        c.forward(drawn[0], drawn[1], batch, certified, null, ws, BoundCheck.EVERY_SAMPLE);
        c.forward(drawn[0], drawn[1], batch, skipped, null, ws, BoundCheck.SKIP);
        int differ = 0;
        int n = model.laws.size();
        double[] v = new double[model.q + model.p];
        for (int s = 0; s < batch; s++) {
            boolean same = true;
            for (int o = 0; o < model.p; o++) {
                same &= Double.doubleToRawLongBits(certified[s * model.p + o])
                        == Double.doubleToRawLongBits(skipped[s * model.p + o]);
            }
            if (!same) {
                differ++;
            }
            System.arraycopy(drawn[0], s * model.q, v, 0, model.q);
            System.arraycopy(skipped, s * model.p, v, model.q, model.p);
            // Source: Apache Commons Math 3.6.1 LUDecomposition (inverse for the condition number)
            RealMatrix a = new Array2DRowRealMatrix(block(model, v));
            double kappa = a.getNorm() * new LUDecomposition(a).getSolver().getInverse().getNorm();
            double[][] skip = new double[n][];
            double largest = 0;
            for (int i = 0; i < n; i++) {
                skip[i] = exactCheck(model.laws.get(i), v, laws.expand().roundingDepth(i));
                largest = Math.max(largest, skip[i][1]);
            }
            System.arraycopy(certified, s * model.p, v, model.q, model.p);
            for (int i = 0; i < n; i++) {
                double[] cert = exactCheck(model.laws.get(i), v, laws.expand().roundingDepth(i));
                assertTrue(Math.abs(cert[0]) <= cert[2], "certified sample " + s + " law " + i + ": |r| = "
                        + Math.abs(cert[0]) + " > " + cert[2] + "\n" + model.text());
                double allowed = skip[i][2] + 8 * (model.q + model.p) * U * kappa * largest;
                assertTrue(Math.abs(skip[i][0]) <= allowed, "skipped sample " + s + " law " + i + ": |r| = "
                        + Math.abs(skip[i][0]) + " > " + allowed + " (κ = " + kappa + ")\n" + model.text());
            }
        }
        return new int[] {batch, differ};
    }

    private static void allTrials(String name, long seed, Function<SplittableRandom, CompletionModelsTest.Model> gen,
            boolean mustBeIdentical) {
        int[] total = new int[2];
        trials(name, seed, 150, r -> {
            int[] one = compare(gen.apply(r), r);
            total[0] += one[0];
            total[1] += one[1];
        });
        assertTrue(total[0] > 1000, "enough samples were drawn: " + total[0]);
        if (mustBeIdentical) {
            assertEquals(0, total[1], "Newton's outputs do not depend on the final check");
        } else {
            // the refinement is the exception: most samples need none
            assertTrue(total[1] * 10 < total[0], total[1] + " of " + total[0] + " samples were refined");
        }
    }

    @Test
    void constantAffineSkipMatchesTheCertifiedSolve() {
        allTrials("constant-affine SKIP", 0xB0C1L, CompletionModelsTest::constantAffine, false);
    }

    @Test
    void affineSkipMatchesTheCertifiedSolve() {
        allTrials("affine SKIP", 0xB0C2L, CompletionModelsTest::inputAffine, false);
    }

    @Test
    void newtonSkipGivesTheSameBits() {
        allTrials("nonlinear SKIP", 0xB0C3L, CompletionModelsTest::nonlinear, true);
    }

    @Test
    void skippedSolveAgreesWithCommonsMath() {
        // y0 + 2 y1 + y2 = x0, 3 y1 − y2 = x1, y2 + 0.5 y0 = x2 with y0 free: a coupled 2×2 block in y1, y2
        LawSet laws = LawSet.parse("<coupled>", String.join("\n",
                "input x[2]",
                "output y[3]",
                "law a: y[0] + 2*y[1] + y[2] = x[0]",
                "law b: 3*y[1] - y[2] = x[1]",
                "complete y[1:3]",
                ""));
        Completion c = Completion.of(laws);
        assertEquals(Tier.CONSTANT_AFFINE, c.tier());
        SplittableRandom r = new SplittableRandom(7);
        int batch = 200;
        double[] x = new double[batch * 2];
        double[] z = new double[batch];
        for (int i = 0; i < x.length; i++) {
            x[i] = r.nextDouble(-10, 10);
        }
        for (int s = 0; s < batch; s++) {
            z[s] = r.nextDouble(-10, 10);
        }
        double[] y = new double[batch * 3];
        c.forward(x, z, batch, y, null, c.newWorkspace(), BoundCheck.SKIP);
        Array2DRowRealMatrix a = new Array2DRowRealMatrix(new double[][] {{2, 1}, {3, -1}});
        for (int s = 0; s < batch; s++) {
            // Source: Apache Commons Math 3.6.1 LUDecomposition
            RealVector ref = new LUDecomposition(a).getSolver().solve(new ArrayRealVector(
                    new double[] {x[s * 2] - z[s], x[s * 2 + 1]}));
            for (int k = 0; k < 2; k++) {
                double scale = Math.abs(x[s * 2]) + Math.abs(z[s]) + Math.abs(x[s * 2 + 1]);
                assertEquals(ref.getEntry(k), y[s * 3 + 1 + k], 16 * U * scale, "sample " + s + " y[" + (k + 1) + "]");
            }
            assertEquals(z[s], y[s * 3], 0.0, "the free output passes through");
        }
    }

    @Test
    void badSamplesAreReportedWithoutTheCheck() {
        LawSet constant = CompletionBadSampleTest.CONSTANT;
        Completion c = Completion.builder(constant).onBadSample(OnBadSample.MASK).build();
        // a NaN input, and values so large that the completed output (x0 + x1 − y0)/2 overflows to +∞
        double max = Double.MAX_VALUE;
        double[] x = {1, Double.NaN, 1, 2, max, max};
        double[] z = {0, 1, -max};
        double[] y = new double[6];
        byte[] status = new byte[3];
        c.forward(x, z, 3, y, status, c.newWorkspace(), BoundCheck.SKIP);
        assertArrayEquals(new byte[] {SampleStatus.NOT_FINITE, SampleStatus.OK, SampleStatus.NOT_CONVERGED}, status);
        assertTrue(Double.isNaN(y[0]) && Double.isNaN(y[1]) && Double.isNaN(y[4]) && Double.isNaN(y[5]));
        assertEquals(1.0, y[3], 0.0);
        Completion throwing = Completion.of(constant);
        EnforcementException e = assertThrows(EnforcementException.class, () -> throwing.forward(x, z, 3, y, null,
                throwing.newWorkspace(), BoundCheck.SKIP));
        assertEquals(0, e.sample());
        assertEquals(SampleStatus.NOT_FINITE, e.status());
        // the same overflow is not converged with the check too
        byte[] certified = new byte[1];
        c.forward(new double[] {max, max}, new double[] {-max}, 1, new double[2], certified,
                c.newWorkspace(), BoundCheck.EVERY_SAMPLE);
        assertEquals(SampleStatus.NOT_CONVERGED, certified[0]);
        IllegalArgumentException none = assertThrows(IllegalArgumentException.class, () -> c.forward(x, z, 3, y,
                status, c.newWorkspace(), null));
        assertEquals("check must be BoundCheck.EVERY_SAMPLE or BoundCheck.SKIP, not null", none.getMessage());
    }

    @Test
    void newtonThatCannotConvergeIsReportedWithoutTheCheck() {
        LawSet nonlinear = CompletionBadSampleTest.NONLINEAR;
        Completion c = Completion.builder(nonlinear).onBadSample(OnBadSample.MASK).build();
        // x − f = 3 has the root √3; x − f = −3 has none
        byte[] status = new byte[2];
        double[] y = new double[4];
        c.forward(new double[] {4, 1, -2, 1}, new double[] {1, 1}, 2, y, status, c.newWorkspace(), BoundCheck.SKIP);
        assertArrayEquals(new byte[] {SampleStatus.OK, SampleStatus.NOT_CONVERGED}, status);
        assertEquals(Math.sqrt(3), y[0], 2 * Math.ulp(Math.sqrt(3)));
        assertTrue(Double.isNaN(y[2]));
    }
}
