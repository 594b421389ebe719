package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * Samples that cannot be enforced (NaN or infinite inputs or free outputs, a singular system, a Newton that cannot
 * converge) under both policies: THROW names the first bad sample and the laws, MASK gives NaN rows and status codes
 * and leaves the good rows exactly as they are when computed alone.
 */
class CompletionBadSampleTest {
    private static final String SUFFIX = " (use OnBadSample.MASK to get NaN rows and a status mask instead)";

    /** Constant-affine: y[1] = (x0 + x1 − y0)/2. */
    static final LawSet CONSTANT = LawSet.parse("<constant>", String.join("\n",
            "input x[2]",
            "output y[2]",
            "law s: y[0] + 2*y[1] = x[0] + x[1]",
            "complete y[1]",
            ""));

    /** Affine: c = (b − z)/w, singular where w = 0. */
    private static final LawSet AFFINE = LawSet.parse("<affine>", String.join("\n",
            "input w",
            "input b",
            "output c",
            "output z",
            "law lin: w*c + z = b",
            "complete c",
            ""));

    /** Nonlinear: v² = x − f has no real root where x < f. */
    static final LawSet NONLINEAR = LawSet.parse("<nonlinear>", String.join("\n",
            "input x",
            "input g",
            "output v",
            "output f",
            "law sq: v^2 + f = x",
            "guess v = g",
            "complete v",
            ""));

    private static Completion masked(LawSet laws) {
        return Completion.builder(laws).onBadSample(OnBadSample.MASK).build();
    }

    private static double[] rows(double[] a, int width, int... which) {
        double[] out = new double[which.length * width];
        for (int i = 0; i < which.length; i++) {
            System.arraycopy(a, which[i] * width, out, i * width, width);
        }
        return out;
    }

    /**
     * Runs a batch with bad samples under MASK: the bad rows are NaN in every column with their status codes, the good
     * rows are bit for bit what a batch of only the good samples gives, in double and in float, and so are the good
     * rows' gradients.
     */
    private static void checkMask(LawSet laws, double[] x, double[] z, byte[] expected) {
        Completion c = masked(laws);
        int batch = expected.length;
        int q = c.inputWidth();
        int f = c.freeWidth();
        int p = c.outputWidth();
        double[] y = new double[batch * p];
        byte[] status = new byte[batch];
        Completion.Workspace ws = c.newWorkspace();
        c.forward(x, z, batch, y, status, ws);
        assertArrayEquals(expected, status, "status codes");
        int[] good = java.util.stream.IntStream.range(0, batch).filter(s -> expected[s] == SampleStatus.OK).toArray();
        double[] yGood = new double[good.length * p];
        byte[] statusGood = new byte[good.length];
        c.forward(rows(x, q, good), rows(z, f, good), good.length, yGood, statusGood, c.newWorkspace());
        assertArrayEquals(new byte[good.length], statusGood);
        assertArrayEquals(yGood, rows(y, p, good), 0.0, "good rows are unaffected by the bad ones");
        for (int s = 0; s < batch; s++) {
            for (int o = 0; o < p; o++) {
                if (expected[s] != SampleStatus.OK) {
                    assertTrue(Double.isNaN(y[s * p + o]), "NaN in column " + o + " of bad sample " + s);
                }
            }
        }
        // float entry point: the same codes and NaN rows
        float[] xf = new float[x.length];
        float[] zf = new float[z.length];
        for (int i = 0; i < x.length; i++) {
            xf[i] = (float) x[i];
        }
        for (int i = 0; i < z.length; i++) {
            zf[i] = (float) z[i];
        }
        float[] yf = new float[y.length];
        byte[] statusF = new byte[batch];
        c.forward(xf, zf, batch, yf, statusF, ws);
        assertArrayEquals(expected, statusF, "status codes, float");
        for (int s = 0; s < batch; s++) {
            if (expected[s] != SampleStatus.OK) {
                assertTrue(Float.isNaN(yf[s * p]), "NaN row in float, sample " + s);
            }
        }
        // backward at the masked outputs: NaN gradients on the bad rows, the good rows as computed alone
        double[] gy = new double[batch * p];
        java.util.Arrays.fill(gy, 1.0);
        double[] gz = new double[batch * f];
        double[] gx = new double[batch * q];
        c.backward(x, y, gy, batch, gz, gx, ws);
        double[] gzGood = new double[good.length * f];
        double[] gxGood = new double[good.length * q];
        c.backward(rows(x, q, good), yGood, rows(gy, p, good), good.length, gzGood, gxGood, c.newWorkspace());
        assertArrayEquals(gzGood, rows(gz, f, good), 0.0, "good rows' ḡz");
        assertArrayEquals(gxGood, rows(gx, q, good), 0.0, "good rows' ḡx");
    }

    /** Backward at the outputs of a masked forward: every gradient of a masked sample is NaN. */
    private static void checkMaskedGradients(LawSet laws, double[] x, double[] z, int batch) {
        Completion c = masked(laws);
        int q = c.inputWidth();
        int f = c.freeWidth();
        int p = c.outputWidth();
        double[] y = new double[batch * p];
        byte[] status = new byte[batch];
        Completion.Workspace ws = c.newWorkspace();
        c.forward(x, z, batch, y, status, ws);
        double[] gy = new double[batch * p];
        java.util.Arrays.fill(gy, 1.0);
        double[] gz = new double[batch * f];
        double[] gx = new double[batch * q];
        c.backward(x, y, gy, batch, gz, gx, ws);
        for (int s = 0; s < batch; s++) {
            if (status[s] == SampleStatus.OK) {
                continue;
            }
            for (int k = 0; k < f; k++) {
                final int sample = s;
                final double g = gz[s * f + k];
                assertTrue(Double.isNaN(g), () -> "ḡz of masked sample " + sample + " (" + c.tier().label()
                        + ", status " + SampleStatus.describe(status[sample]) + ") is " + g + ", not NaN");
            }
            for (int k = 0; k < q; k++) {
                final int sample = s;
                final double g = gx[s * q + k];
                assertTrue(Double.isNaN(g), () -> "ḡx of masked sample " + sample + " (" + c.tier().label()
                        + ", status " + SampleStatus.describe(status[sample]) + ") is " + g + ", not NaN");
            }
        }
    }

    // OnBadSample.MASK: "Fill the bad sample's outputs (and gradients) with NaN"

    @Test
    void backwardGivesNanGradientsOnMaskedNonlinearSamples() {
        checkMaskedGradients(NONLINEAR, new double[] {4, 1, -2.3, 1}, new double[] {0, 0}, 2);
        checkMaskedGradients(NONLINEAR, new double[] {4, 1, Double.NaN, 1}, new double[] {0, 0}, 2);
    }

    @Test
    void backwardGivesNanGradientsOnMaskedAffineSamples() {
        checkMaskedGradients(AFFINE, new double[] {2, 1, 0, 1}, new double[] {1, 1}, 2);
        checkMaskedGradients(AFFINE, new double[] {2, 1, 3, Double.NaN}, new double[] {1, 1}, 2);
    }

    @Test
    void backwardGivesNanGradientsOnMaskedConstantAffineSamples() {
        checkMaskedGradients(CONSTANT, new double[] {1, 2, Double.NaN, 4}, new double[] {1, 2}, 2);
    }

    private static EnforcementException thrown(LawSet laws, double[] x, double[] z, int batch) {
        Completion c = Completion.of(laws);
        assertEquals(OnBadSample.THROW, c.onBadSample(), "THROW is the default");
        return assertThrows(EnforcementException.class,
                () -> c.forward(x, z, batch, new double[batch * c.outputWidth()], null, c.newWorkspace()));
    }

    // ---- non-finite inputs and free outputs ------------------------------------------------------------------

    @Test
    void nonFiniteInputsAndFreeOutputsThrowNamingTheFirstBadSample() {
        double nan = Double.NaN;
        double inf = Double.POSITIVE_INFINITY;
        EnforcementException e = thrown(CONSTANT, new double[] {1, 2, 3, 4, nan, 1, 5, 6}, new double[] {1, inf, 2, 3},
                4);
        assertEquals(1, e.sample(), "the infinite free output of sample 1 comes first");
        assertEquals(SampleStatus.NOT_FINITE, e.status());
        assertEquals(List.of("s"), e.laws());
        assertEquals("sample 1: an input or free output is NaN or infinite" + SUFFIX, e.getMessage());
        EnforcementException a = thrown(AFFINE, new double[] {2, 1, 1, -inf}, new double[] {0.5, 0.5}, 2);
        assertEquals(1, a.sample());
        assertEquals(List.of("lin"), a.laws());
        EnforcementException n = thrown(NONLINEAR, new double[] {4, 1, 5, nan}, new double[] {1, 1}, 2);
        assertEquals(1, n.sample());
        assertEquals("sample 1: an input or free output is NaN or infinite" + SUFFIX, n.getMessage());
    }

    @Test
    void nonFiniteSamplesAreMaskedInEveryTier() {
        double nan = Double.NaN;
        double inf = Double.NEGATIVE_INFINITY;
        byte ok = SampleStatus.OK;
        byte bad = SampleStatus.NOT_FINITE;
        checkMask(CONSTANT, new double[] {1, 2, nan, 4, 1, 1, 5, 6}, new double[] {1, 2, 3, inf},
                new byte[] {ok, bad, ok, bad});
        checkMask(AFFINE, new double[] {2, 1, 3, nan, 1.5, 2}, new double[] {0.5, 0.5, inf},
                new byte[] {ok, bad, bad});
        checkMask(NONLINEAR, new double[] {4, 1, inf, 1, 9, 2}, new double[] {1, 1, nan},
                new byte[] {ok, bad, bad});
        // u[1..3] are read by no law (the fold holds N sparse): NaN or infinite there is still a non-finite input
        checkMask(ONE_OF_FOUR_INPUTS, new double[] {5, 0, 0, 0, 5, 0, 0, nan, 5, -inf, 0, 0, 7, 1, 2, 3},
                new double[] {1, 1, 1, 3}, new byte[] {ok, bad, bad, ok});
    }

    /** Constant-affine, reading one of its four inputs: y[1] = (u[0] − y[0])/2, the fold's N held sparse. */
    private static final LawSet ONE_OF_FOUR_INPUTS = LawSet.parse("<one of four inputs>", String.join("\n",
            "input u[4]",
            "output y[2]",
            "law s: y[0] + 2*y[1] = u[0]",
            "complete y[1]",
            ""));

    @Test
    void aLawReadingOneOfFourInputsGivesTheValuesAndGradientsWorkedByHand() {
        // by hand: y[1] = (u[0] − y[0])/2, so dy[1]/du[0] = 1/2, dy[1]/dy[0] = −1/2, the other inputs 0
        Completion c = masked(ONE_OF_FOUR_INPUTS);
        double[] x = {5, 0, 0, 0, 7, 1, 2, 3};
        double[] y = new double[4];
        byte[] status = new byte[2];
        Completion.Workspace ws = c.newWorkspace();
        c.forward(x, new double[] {1, 3}, 2, y, status, ws);
        assertArrayEquals(new double[] {1, 2, 3, 2}, y, 0.0);
        double[] gz = new double[2];
        double[] gx = new double[8];
        c.backward(x, y, new double[] {0, 1, 0, 1}, 2, gz, gx, ws);
        assertArrayEquals(new double[] {-0.5, -0.5}, gz, 0.0);
        assertArrayEquals(new double[] {0.5, 0, 0, 0, 0.5, 0, 0, 0}, gx, 0.0);
    }

    // ---- singular systems ------------------------------------------------------------------------------------

    @Test
    void aSingularSampleThrowsNamingTheLawsAndTheCompletedOutputs() {
        EnforcementException e = thrown(AFFINE, new double[] {2, 1, 0, 1, 3, 3}, new double[] {1, 1, 1}, 3);
        assertEquals(1, e.sample());
        assertEquals(SampleStatus.SINGULAR, e.status());
        assertEquals(List.of("lin"), e.laws());
        assertEquals("sample 1: the laws 'lin' are singular in the completed outputs c at this sample (their Jacobian"
                + " block has no inverse)" + SUFFIX, e.getMessage());
        // backward at a singular sample fails the same way under THROW
        Completion c = Completion.of(AFFINE);
        EnforcementException b = assertThrows(EnforcementException.class, () -> c.backward(new double[] {2, 1, 0, 1},
                new double[] {0.5, 0, 1, 0}, new double[] {1, 1, 1, 1}, 2, new double[2], null, c.newWorkspace()));
        assertEquals(1, b.sample());
        assertEquals(SampleStatus.SINGULAR, b.status());
    }

    @Test
    void singularSamplesAreMasked() {
        byte ok = SampleStatus.OK;
        byte singular = SampleStatus.SINGULAR;
        checkMask(AFFINE, new double[] {2, 1, 0, 1, 3, 3, -0.0, 2}, new double[] {1, 1, 1, 0.25},
                new byte[] {ok, singular, ok, singular});
    }

    // ---- Newton that cannot converge -------------------------------------------------------------------------

    @Test
    void aSampleWithNoRealRootThrowsAfterTheIterationCap() {
        EnforcementException e = thrown(NONLINEAR, new double[] {4, 1, -2.3, 1, 9, 2}, new double[] {0, 0, 0}, 3);
        assertEquals(1, e.sample());
        assertEquals(SampleStatus.NOT_CONVERGED, e.status());
        assertEquals(List.of("sq"), e.laws());
        assertEquals("sample 1: the residuals of 'sq' did not reach rounding level within 50 Newton iterations; give a"
                + " 'guess' for the completed outputs or check the inputs" + SUFFIX, e.getMessage());
        Completion capped = Completion.builder(NONLINEAR).maxIterations(7).build();
        EnforcementException c = assertThrows(EnforcementException.class, () -> capped.forward(
                new double[] {4, 1, -2.3, 1}, new double[] {0, 0}, 2, new double[4], null, capped.newWorkspace()));
        assertEquals("sample 1: the residuals of 'sq' did not reach rounding level within 7 Newton iterations; give a"
                + " 'guess' for the completed outputs or check the inputs" + SUFFIX, c.getMessage());
        IllegalArgumentException bad = assertThrows(IllegalArgumentException.class,
                () -> Completion.builder(NONLINEAR).maxIterations(0));
        assertEquals("maxIterations must be at least 1, found 0", bad.getMessage());
    }

    @Test
    void samplesWithNoRealRootAreMasked() {
        byte ok = SampleStatus.OK;
        byte stuck = SampleStatus.NOT_CONVERGED;
        // v² = x − f: roots for x − f ≥ 0 only (starting values chosen so no iterate lands exactly on v = 0)
        checkMask(NONLINEAR, new double[] {4, 1, -2.3, 1, 9, 2, 1, -1.3, 0.5, 3}, new double[] {0, 0, 0, 2, 1},
                new byte[] {ok, stuck, ok, stuck, stuck});
    }

    @Test
    void mixedFailuresInOneBatchEachGetTheirCode() {
        byte ok = SampleStatus.OK;
        checkMask(AFFINE, new double[] {2, 1, 0, 1, Double.NaN, 1, 4, 2}, new double[] {1, 1, 1, 1},
                new byte[] {ok, SampleStatus.SINGULAR, SampleStatus.NOT_FINITE, ok});
        // a NaN guess input is a NaN input like any other
        checkMask(NONLINEAR, new double[] {4, 1, -1.7, 1, 4, Double.NaN, 16, 3}, new double[] {0, 0, 0, 0},
                new byte[] {ok, SampleStatus.NOT_CONVERGED, SampleStatus.NOT_FINITE, ok});
    }

    // ---- shapes ----------------------------------------------------------------------------------------------

    @Test
    void anEmptyBatchIsANoOpInEveryEntryPoint() {
        for (LawSet laws : List.of(CONSTANT, AFFINE, NONLINEAR)) {
            Completion c = Completion.of(laws);
            // a fresh workspace each time: an empty batch is the first thing it sees
            c.forward(new double[0], new double[0], 0, new double[0], new byte[0], c.newWorkspace());
            c.forward(new float[0], new float[0], 0, new float[0], null, c.newWorkspace());
            c.backward(new double[0], new double[0], new double[0], 0, new double[0], new double[0],
                    c.newWorkspace());
            c.jacobians(new double[0], new double[0], 0, new double[0], new double[0], c.newWorkspace());
        }
    }

    @Test
    void shortArraysAreRefusedWithTheirName() {
        Completion c = Completion.of(CONSTANT);
        Completion.Workspace ws = c.newWorkspace();
        assertEquals("x must hold at least 4 values for this batch, found 2", assertThrows(
                IllegalArgumentException.class, () -> c.forward(new double[2], new double[2], 2, new double[4], null,
                        ws)).getMessage());
        assertEquals("z must hold at least 2 values for this batch, found 1", assertThrows(
                IllegalArgumentException.class, () -> c.forward(new double[4], new double[1], 2, new double[4], null,
                        ws)).getMessage());
        assertEquals("y must hold at least 4 values for this batch, found 3", assertThrows(
                IllegalArgumentException.class, () -> c.forward(new float[4], new float[2], 2, new float[3], null,
                        ws)).getMessage());
        assertEquals("status must hold at least 2 bytes, found 1", assertThrows(
                IllegalArgumentException.class, () -> c.forward(new double[4], new double[2], 2, new double[4],
                        new byte[1], ws)).getMessage());
        // the upstream gradient is named as its parameter, gradOut, in Completion and Projection alike
        assertEquals("gradOut must hold at least 4 values for this batch, found 2", assertThrows(
                IllegalArgumentException.class, () -> c.backward(new double[4], new double[4], new double[2], 2,
                        new double[2], null, ws)).getMessage());
        // the float backward checks its output buffers too, before any work
        assertEquals("gradZ must hold at least 2 values for this batch, found 1", assertThrows(
                IllegalArgumentException.class, () -> c.backward(new float[4], new float[4], new float[4], 2,
                        new float[1], null, ws)).getMessage());
        assertEquals("gradX must hold at least 4 values for this batch, found 3", assertThrows(
                IllegalArgumentException.class, () -> c.backward(new float[4], new float[4], new float[4], 2,
                        new float[2], new float[3], ws)).getMessage());
    }

    @Test
    void aForeignWorkspaceIsRefusedAndNoneAllocatesOne() {
        Completion c = Completion.of(CONSTANT);
        Completion other = Completion.of(CONSTANT);
        double[] x = {1, 2, 3, 4};
        double[] z = {0.5, 0.25};
        IllegalArgumentException foreign = assertThrows(IllegalArgumentException.class,
                () -> c.forward(x, z, 2, new double[4], null, other.newWorkspace()));
        assertEquals("the workspace belongs to another completion; use this completion's newWorkspace() (one per"
                + " thread)", foreign.getMessage());
        assertThrows(IllegalArgumentException.class, () -> c.backward(x, new double[4], new double[4], 2,
                new double[2], null, other.newWorkspace()));
        double[] withNone = new double[4];
        double[] withOwn = new double[4];
        c.forward(x, z, 2, withNone, null, null);
        c.forward(x, z, 2, withOwn, null, c.newWorkspace());
        assertArrayEquals(withOwn, withNone, 0.0, "a null workspace computes the same outputs");
    }
}
