package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;

import dev.lawful.algebra.LawSet;

/**
 * {@link Penalty}: a hand-derived two-law example with mixed units, gradients against central differences on a
 * nonlinear law set, per-sample values, float entry points and argument checks.
 */
class PenaltyTest {

    /** Two laws whose residual units differ from SI: mass in kmol/h (its left side), power in W. */
    private static final LawSet TWO_LAWS = LawSet.parse("two.law", String.join("\n",
            "input feed[2] mol/s",
            "input Q kW",
            "output out[2] kmol/h",
            "output P W",
            "law mass: out[0] + out[1] = feed[0] + feed[1]",
            "law power: P = Q",
            ""));

    @Test
    void twoLawValueAndGradientFollowTheHandDerivedFormula() {
        double w1 = 0.5;
        double w2 = 3;
        Penalty penalty = Penalty.of(TWO_LAWS, new double[] {w1, w2});
        assertArrayEquals(new double[] {w1, w2}, penalty.lawWeights());
        double[] x = {1.25, 2.5, 0.004, 0.5, 1, 0.003};  // two samples: feed[0], feed[1], Q (kW)
        double[] y = {9, 4.5, 3.5, 12, 6, 2.0};          // out[0], out[1] (kmol/h), P (W)
        double[] perSample = new double[2];
        double total = penalty.value(x, y, 2, perSample);
        double[] gy = new double[6];
        double[] gx = new double[6];
        double totalFromGradient = penalty.gradient(x, y, 2, gy, gx);
        // By hand, with u = 1000/3600, 1 kmol/h in mol/s, and 1 kW = 1000 W (Source: BIPM SI Brochure, 9th edition
        // (2019): the prefixes k = 10^3 and the hour h = 3600 s, from memory):
        //   r_mass = u (out0 + out1) − feed0 − feed1 (mol/s), r_power = P − 1000 Q (W)
        //   P = w1 (r_mass / u)² + w2 r_power²
        //   ∂P/∂out_k = 2 w1 r_mass / u,   ∂P/∂P = 2 w2 r_power
        //   ∂P/∂feed_k = −2 w1 r_mass / u², ∂P/∂Q = −2000 w2 r_power
        double u = 1000.0 / 3600.0;
        double expectedTotal = 0;
        for (int s = 0; s < 2; s++) {
            double rMass = u * (y[3 * s] + y[3 * s + 1]) - x[3 * s] - x[3 * s + 1];
            double rPower = y[3 * s + 2] - 1000 * x[3 * s + 2];
            double expected = w1 * (rMass / u) * (rMass / u) + w2 * rPower * rPower;
            expectedTotal += expected;
            assertEquals(expected, perSample[s], 1e-13 * expected, "P of sample " + s);
            assertEquals(2 * w1 * rMass / u, gy[3 * s], 1e-12, "dP/dout[0]");
            assertEquals(2 * w1 * rMass / u, gy[3 * s + 1], 1e-12, "dP/dout[1]");
            assertEquals(2 * w2 * rPower, gy[3 * s + 2], 1e-12, "dP/dP");
            assertEquals(-2 * w1 * rMass / (u * u), gx[3 * s], 1e-12, "dP/dfeed[0]");
            assertEquals(-2 * w1 * rMass / (u * u), gx[3 * s + 1], 1e-12, "dP/dfeed[1]");
            assertEquals(-2000 * w2 * rPower, gx[3 * s + 2], 1e-9, "dP/dQ");
        }
        assertEquals(expectedTotal, total, 1e-13 * expectedTotal);
        assertEquals(total, totalFromGradient);
        assertEquals(perSample[0] + perSample[1], total, 1e-15 * total);
        // default weights are 1
        assertArrayEquals(new double[] {1, 1}, Penalty.of(TWO_LAWS).lawWeights());
    }

    @Test
    void aSatisfiedLawSetHasZeroPenaltyAndGradient() {
        Penalty penalty = Penalty.of(TWO_LAWS);
        // out = 3.6 + 5.4 kmol/h = 2.5 mol/s = feed sum; P = 1000 Q
        double[] x = {1, 1.5, 0.002};
        double[] y = {3.6, 5.4, 2};
        double[] gy = new double[3];
        double value = penalty.gradient(x, y, 1, gy, null);
        assertTrue(value < 1e-28, "value " + value);
        for (double g : gy) {
            assertTrue(Math.abs(g) < 1e-13, "gradient " + Arrays.toString(gy));
        }
    }

    /** Nonlinear laws, a vector law and input-dependent coefficients: the penalty works for any law set. */
    private static final LawSet NONLINEAR = LawSet.parse("nonlinear.law", String.join("\n",
            "input x[3]",
            "output y[3]",
            "output q",
            "law energy: q * q + sin(y[0]) = x[0] * y[1]",
            "law split: y * x = exp(-q) * [1, 2, 3]",
            "law sum: sum(y) / (1 + x[2]^2) = q",
            ""));

    @Test
    void gradientsMatchCentralDifferences() {
        SplittableRandom r = new SplittableRandom(51);
        int laws = NONLINEAR.evaluator().lawCount();
        double[] w = new double[laws];
        for (int i = 0; i < laws; i++) {
            w[i] = 0.5 + r.nextDouble();
        }
        Penalty penalty = Penalty.of(NONLINEAR, w);
        int batch = 5;
        double[] x = new double[batch * 3];
        double[] y = new double[batch * 4];
        for (int i = 0; i < x.length; i++) {
            x[i] = r.nextDouble(-2, 2);
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = r.nextDouble(-2, 2);
        }
        double[] gy = new double[y.length];
        double[] gx = new double[x.length];
        Penalty.Workspace ws = penalty.newWorkspace();
        penalty.gradient(x, y, batch, gy, gx, ws);
        // Source: central difference f'(t) ≈ (f(t + h) − f(t − h)) / 2h, error O(h²) (common practice)
        double h = 1e-5;
        double[] fdY = new double[y.length];
        for (int i = 0; i < y.length; i++) {
            double[] plus = y.clone();
            double[] minus = y.clone();
            plus[i] += h;
            minus[i] -= h;
            fdY[i] = (penalty.value(x, plus, batch, null, ws) - penalty.value(x, minus, batch, null, ws)) / (2 * h);
        }
        double[] fdX = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            double[] plus = x.clone();
            double[] minus = x.clone();
            plus[i] += h;
            minus[i] -= h;
            fdX[i] = (penalty.value(plus, y, batch, null, ws) - penalty.value(minus, y, batch, null, ws)) / (2 * h);
        }
        assertRelative(fdY, gy, 1e-7, "dP/dy");
        assertRelative(fdX, gx, 1e-7, "dP/dx");
    }

    @Test
    void weightedResidualsSquareToThePenaltyAndFollowTheHandDerivedFormula() {
        double w1 = 0.5;
        double w2 = 3;
        Penalty penalty = Penalty.of(TWO_LAWS, new double[] {w1, w2});
        assertEquals(2, penalty.lawCount());
        double[] x = {1.25, 2.5, 0.004, 0.5, 1, 0.003};
        double[] y = {9, 4.5, 3.5, 12, 6, 2.0};
        double[] rho = new double[4];
        penalty.weightedResiduals(x, y, 2, rho, null);
        double[] perSample = new double[2];
        penalty.value(x, y, 2, perSample);
        // By hand as above: ρ_mass = √w1 · r_mass / u, ρ_power = √w2 · r_power (units: BIPM SI Brochure, 9th
        // edition (2019), from memory)
        double u = 1000.0 / 3600.0;
        for (int s = 0; s < 2; s++) {
            double rMass = u * (y[3 * s] + y[3 * s + 1]) - x[3 * s] - x[3 * s + 1];
            double rPower = y[3 * s + 2] - 1000 * x[3 * s + 2];
            assertEquals(Math.sqrt(w1) * rMass / u, rho[2 * s], 1e-12, "rho_mass of sample " + s);
            assertEquals(Math.sqrt(w2) * rPower, rho[2 * s + 1], 1e-12, "rho_power of sample " + s);
            double squares = rho[2 * s] * rho[2 * s] + rho[2 * s + 1] * rho[2 * s + 1];
            assertEquals(perSample[s], squares, 1e-13 * squares, "P = sum of rho squared, sample " + s);
        }
        // the product with upstream gradient g: gy = g_mass √w1/u · u (each out), gx = −g_mass √w1/u (each feed),
        // gy_P = g_power √w2, gx_Q = −1000 g_power √w2
        double[] g = {0.75, -1.5, 2, 0.25};
        double[] gy = new double[6];
        double[] gx = new double[6];
        penalty.weightedResidualsBackward(x, y, g, 2, gy, gx, null);
        for (int s = 0; s < 2; s++) {
            double gm = g[2 * s] * Math.sqrt(w1) / u;
            double gp = g[2 * s + 1] * Math.sqrt(w2);
            assertEquals(gm * u, gy[3 * s], 1e-12);
            assertEquals(gm * u, gy[3 * s + 1], 1e-12);
            assertEquals(gp, gy[3 * s + 2], 1e-12);
            assertEquals(-gm, gx[3 * s], 1e-12);
            assertEquals(-gm, gx[3 * s + 1], 1e-12);
            assertEquals(-1000 * gp, gx[3 * s + 2], 1e-9);
        }
    }

    @Test
    void weightedResidualGradientsMatchCentralDifferences() {
        SplittableRandom r = new SplittableRandom(52);
        int laws = NONLINEAR.evaluator().lawCount();
        double[] w = new double[laws];
        for (int i = 0; i < laws; i++) {
            w[i] = 0.5 + r.nextDouble();
        }
        Penalty penalty = Penalty.of(NONLINEAR, w);
        int batch = 70;  // more than one chunk of 64
        double[] x = new double[batch * 3];
        double[] y = new double[batch * 4];
        double[] g = new double[batch * laws];
        for (int i = 0; i < x.length; i++) {
            x[i] = r.nextDouble(-2, 2);
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = r.nextDouble(-2, 2);
        }
        for (int i = 0; i < g.length; i++) {
            g[i] = r.nextDouble(-1, 1);
        }
        double[] gy = new double[y.length];
        double[] gx = new double[x.length];
        Penalty.Workspace ws = penalty.newWorkspace();
        penalty.weightedResidualsBackward(x, y, g, batch, gy, gx, ws);
        // Source: central difference of f = Σ g·ρ, f'(t) ≈ (f(t + h) − f(t − h)) / 2h, error O(h²) (common practice)
        double h = 1e-5;
        double[] rho = new double[g.length];
        double[] fdY = new double[y.length];
        for (int i = 0; i < y.length; i++) {
            double[] plus = y.clone();
            double[] minus = y.clone();
            plus[i] += h;
            minus[i] -= h;
            penalty.weightedResiduals(x, plus, batch, rho, ws);
            double fp = dot(g, rho);
            penalty.weightedResiduals(x, minus, batch, rho, ws);
            fdY[i] = (fp - dot(g, rho)) / (2 * h);
        }
        double[] fdX = new double[x.length];
        for (int i = 0; i < x.length; i++) {
            double[] plus = x.clone();
            double[] minus = x.clone();
            plus[i] += h;
            minus[i] -= h;
            penalty.weightedResiduals(plus, y, batch, rho, ws);
            double fp = dot(g, rho);
            penalty.weightedResiduals(minus, y, batch, rho, ws);
            fdX[i] = (fp - dot(g, rho)) / (2 * h);
        }
        assertRelative(fdY, gy, 1e-7, "d(g.rho)/dy");
        assertRelative(fdX, gx, 1e-7, "d(g.rho)/dx");
        assertThrows(IllegalArgumentException.class, () -> penalty.weightedResiduals(x, y, batch, new double[3], ws));
        assertThrows(IllegalArgumentException.class,
                () -> penalty.weightedResidualsBackward(x, y, new double[3], batch, gy, gx, ws));
    }

    private static double dot(double[] a, double[] b) {
        double s = 0;
        for (int i = 0; i < a.length; i++) {
            s += a[i] * b[i];
        }
        return s;
    }

    private static void assertRelative(double[] expected, double[] actual, double tol, String what) {
        double scale = 0;
        double err = 0;
        for (int i = 0; i < expected.length; i++) {
            scale = Math.max(scale, Math.abs(expected[i]));
            err = Math.max(err, Math.abs(expected[i] - actual[i]));
        }
        assertTrue(scale > 0 && err <= tol * scale, what + ": relative error " + err / scale + " (max norm)\nexpected "
                + Arrays.toString(expected) + "\nactual   " + Arrays.toString(actual));
    }

    @Test
    void floatEntryPointsComputeInDoubleAndRoundOnce() {
        Penalty penalty = Penalty.of(NONLINEAR);
        SplittableRandom r = new SplittableRandom(52);
        int batch = 70;
        float[] x = new float[batch * 3];
        float[] y = new float[batch * 4];
        for (int i = 0; i < x.length; i++) {
            x[i] = (float) r.nextDouble(-2, 2);
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = (float) r.nextDouble(-2, 2);
        }
        double[] xd = new double[x.length];
        double[] yd = new double[y.length];
        for (int i = 0; i < x.length; i++) {
            xd[i] = x[i];
        }
        for (int i = 0; i < y.length; i++) {
            yd[i] = y[i];
        }
        double[] per = new double[batch];
        double[] gy = new double[y.length];
        double[] gx = new double[x.length];
        double total = penalty.value(xd, yd, batch, per);
        penalty.gradient(xd, yd, batch, gy, gx);
        float[] perF = new float[batch];
        float[] gyF = new float[y.length];
        float[] gxF = new float[x.length];
        Penalty.Workspace ws = penalty.newWorkspace();
        assertEquals(total, penalty.value(x, y, batch, perF, ws));
        assertEquals(total, penalty.gradient(x, y, batch, gyF, gxF, ws));
        for (int s = 0; s < batch; s++) {
            assertEquals((float) per[s], perF[s], "sample " + s);
        }
        for (int i = 0; i < gy.length; i++) {
            assertEquals((float) gy[i], gyF[i], "gy " + i);
        }
        for (int i = 0; i < gx.length; i++) {
            assertEquals((float) gx[i], gxF[i], "gx " + i);
        }
    }

    @Test
    void badArgumentsAreRejected() {
        IllegalArgumentException length = assertThrows(IllegalArgumentException.class,
                () -> Penalty.of(TWO_LAWS, new double[] {1}));
        assertEquals("law weights must hold one value per scalar law (2), found 1", length.getMessage());
        IllegalArgumentException negative = assertThrows(IllegalArgumentException.class,
                () -> Penalty.of(TWO_LAWS, new double[] {1, -2}));
        assertEquals("weight of law 'power' must be finite and not negative, found -2.0", negative.getMessage());
        Penalty penalty = Penalty.of(TWO_LAWS);
        IllegalArgumentException shortGy = assertThrows(IllegalArgumentException.class,
                () -> penalty.gradient(new double[6], new double[6], 2, new double[5], null));
        assertEquals("gy must hold at least 6 values for this batch, found 5", shortGy.getMessage());
        IllegalArgumentException foreign = assertThrows(IllegalArgumentException.class,
                () -> penalty.value(new double[3], new double[3], 1, null, Penalty.of(TWO_LAWS).newWorkspace()));
        assertEquals("workspace belongs to another penalty; use this penalty's newWorkspace()", foreign.getMessage());
        assertEquals(0.0, penalty.value(null, null, 0, null));
    }
}
