package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.analysis.UnivariateVectorFunction;
import org.apache.commons.math3.analysis.differentiation.DerivativeStructure;
import org.apache.commons.math3.analysis.differentiation.FiniteDifferencesDifferentiator;
import org.apache.commons.math3.analysis.differentiation.UnivariateDifferentiableVectorFunction;
import org.junit.jupiter.api.Test;

/**
 * Gradients through active limits, against finite differences of the forward map taken by Commons Math's
 * {@link FiniteDifferencesDifferentiator} (an independent reference: it knows nothing of the limits, only the
 * outputs as a function of one free output or input at a time). A sample is compared only where two step sizes
 * agree, i.e. away from a switch between active sets, where the map is not differentiable.
 */
class CompletionLimitsGradientTest {

    /**
     * A two-layer column: precipitation closes the water budget, each layer's humidity after one step of length dt
     * must stay non-negative (an expression limit with an input term). Constant-affine when the column mass is a
     * constant, affine when it is an input.
     */
    private static String column(boolean massIsInput) {
        return String.join("\n",
                "input  E     kg/(m2 s)",
                "input  q[2]  kg/kg",
                massIsInput ? "input  m     kg/m2" : "const  m = 5000 kg/m2",
                "const  dt = 900 s",
                "output dqdt[2] 1/s",
                "output P     kg/(m2 s)",
                "law water: P = E - m * (dqdt[0] + dqdt[1])",
                "complete P",
                "limit rain: P >= 0",
                "limit dry:  q + dt * dqdt >= 0",
                "");
    }

    @Test
    void nonNegativeOutletFlowsHaveTheGradientOfTheForwardMapInFreeOutputsAndInputs() {
        Completion c = Completion.of(LawSet.parse("<reformer>", LimitLaws.REFORMER));
        assertTrue(comparedReformers(c, 3, 200) >= 40, "too few samples on a limit away from a switch");
    }

    @Test
    void outputsOfUnequalSizesKeepTheGradientOfTheForwardMap() {
        // the metric Σ ((y* − y)/size)² with sizes far from one another, as a folded normalizer gives
        Completion c = Completion.builder(LawSet.parse("<reformer>", LimitLaws.REFORMER))
                .limitScales(0.3, 2, 1, 0.05, 4, 1).build();
        assertTrue(comparedReformers(c, 4, 400) >= 40, "too few samples on a limit away from a switch");
        Completion column = Completion.builder(LawSet.parse("<column>", column(false)))
                .limitScales(1e-6, 3e-6, 1e-4).build();
        assertEquals(20, comparedColumns(column, 4, true));
    }

    @Test
    void aColumnThatWouldDryOrRainNegativeHasTheGradientOfTheForwardMap() {
        Completion c = Completion.of(LawSet.parse("<column>", column(false)));
        assertEquals(Tier.CONSTANT_AFFINE, c.tier());
        assertEquals(20, comparedColumns(c, 4, true));
    }

    @Test
    void withTheColumnMassAnInputTheFreeOutputGradientStaysExact() {
        Completion c = Completion.of(LawSet.parse("<column>", column(true)));
        assertEquals(Tier.AFFINE, c.tier());
        // the input gradient leaves out the change of the metric and the limits' rows with the mass (documented);
        // the free outputs' gradient is exact
        assertEquals(20, comparedColumns(c, 5, false));
    }

    /** @return how many random reformer samples (up to 40, of {@code trials}) on a limit away from a switch were compared */
    private static int comparedReformers(Completion c, long seed, int trials) {
        SplittableRandom r = new SplittableRandom(seed);
        int compared = 0;
        for (int trial = 0; trial < trials && compared < 40; trial++) {
            double[] feed = new double[6];
            for (int i = 0; i < 6; i++) {
                feed[i] = 0.05 + r.nextDouble();
            }
            double[] z = {r.nextDouble() * 2, r.nextDouble() * 2};
            compared += compare(c, feed, z, true) ? 1 : 0;
        }
        return compared;
    }

    /** @return how many of 20 column samples on a limit (and away from a switch) were compared */
    private static int comparedColumns(Completion c, int inputs, boolean withInputs) {
        SplittableRandom r = new SplittableRandom(5);
        int compared = 0;
        for (int trial = 0; trial < 2000 && compared < 20; trial++) {
            double[] x = new double[inputs];
            x[0] = 1e-5 * r.nextDouble();
            x[1] = 1e-3 * r.nextDouble();
            x[2] = 1e-2 * r.nextDouble();
            if (inputs == 5) {
                x[3] = 2000 + 6000 * r.nextDouble();
            }
            double[] z = {-2e-6 * r.nextDouble() + 1e-9, 1e-8 * (r.nextDouble() - 0.3)};
            if (compare(c, x, z, withInputs)) {
                compared++;
            }
        }
        return compared;
    }

    /**
     * Compares the completion's Jacobians at one sample that a limit moved with finite differences of the forward map.
     *
     * @return false when the sample was inside every limit or near a switch (two step sizes disagree)
     */
    private static boolean compare(Completion c, double[] x, double[] z, boolean withInputs) {
        int p = c.outputWidth();
        int k = c.freeWidth();
        int nIn = c.inputWidth();
        double[] y = forward(c, x, z);
        double[] free = new double[k];
        for (int f = 0; f < k; f++) {
            free[f] = y[c.freeOutputs()[f]];
        }
        if (Arrays.equals(free, z)) {
            return false;
        }
        double[] dz = new double[p * k];
        double[] dx = new double[p * nIn];
        c.jacobians(x, y, 1, dz, dx, null);
        double[][] fdz = new double[k][];
        double[][] fdx = new double[nIn][];
        for (int f = 0; f < k; f++) {
            double h = 1e-5 * Math.max(1e-3, Math.abs(z[f]));
            fdz[f] = difference(c, x, z, false, f, h);
            double[] half = difference(c, x, z, false, f, h / 4);
            if (!close(fdz[f], half, 1e-7)) {
                return false;
            }
        }
        for (int i = 0; withInputs && i < nIn; i++) {
            double h = 1e-5 * Math.max(1e-6, Math.abs(x[i]));
            fdx[i] = difference(c, x, z, true, i, h);
            if (!close(fdx[i], difference(c, x, z, true, i, h / 4), 1e-7)) {
                return false;
            }
        }
        for (int o = 0; o < p; o++) {
            for (int f = 0; f < k; f++) {
                assertEquals(fdz[f][o], dz[o * k + f], 1e-6 * largest(fdz[f]), "∂y" + o + "/∂z" + f);
            }
            for (int i = 0; withInputs && i < nIn; i++) {
                assertEquals(fdx[i][o], dx[o * nIn + i], 1e-6 * largest(fdx[i]), "∂y" + o + "/∂x" + i);
            }
        }
        return true;
    }

    /** ∂y/∂(z_f or x_i) by Commons Math's five-point finite differences of the forward map. */
    private static double[] difference(Completion c, double[] x, double[] z, boolean input, int index, double h) {
        UnivariateVectorFunction along = t -> {
            double[] xs = x.clone();
            double[] zs = z.clone();
            if (input) {
                xs[index] += t;
            } else {
                zs[index] += t;
            }
            return forward(c, xs, zs);
        };
        UnivariateDifferentiableVectorFunction d = new FiniteDifferencesDifferentiator(5, h).differentiate(along);
        DerivativeStructure[] v = d.value(new DerivativeStructure(1, 1, 0, 0.0));
        double[] out = new double[v.length];
        for (int o = 0; o < v.length; o++) {
            out[o] = v[o].getPartialDerivative(1);
        }
        return out;
    }

    private static double[] forward(Completion c, double[] x, double[] z) {
        double[] y = new double[c.outputWidth()];
        c.forward(x, z, 1, y, null, null);
        return y;
    }

    /** @return the largest magnitude of a column of derivatives (one free output's or input's), at least 1e-300 */
    private static double largest(double[] a) {
        double m = 1e-300;
        for (double v : a) {
            m = Math.max(m, Math.abs(v));
        }
        return m;
    }

    private static boolean close(double[] a, double[] b, double rel) {
        double scale = largest(a) + largest(b);
        for (int i = 0; i < a.length; i++) {
            if (Math.abs(a[i] - b[i]) > rel * scale) {
                return false;
            }
        }
        return true;
    }
}
