package dev.lawful.examples.reformer;

import static dev.lawful.examples.reformer.ReformerTruth.CH4;
import static dev.lawful.examples.reformer.ReformerTruth.CO;
import static dev.lawful.examples.reformer.ReformerTruth.CO2;
import static dev.lawful.examples.reformer.ReformerTruth.H2;
import static dev.lawful.examples.reformer.ReformerTruth.H2O;
import static dev.lawful.examples.reformer.ReformerTruth.N2;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.examples.ScenarioLaws;
import dev.lawful.enforce.Tier;
import java.io.IOException;
import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.junit.jupiter.api.Test;

/** The reformer truth against hand calculations, thermochemical data, an independent solver and its law file. */
class ReformerTruthTest {
    private static final ReformerTruth TRUTH = new ReformerTruth();
    private static final double R = 8.314462618; // J/(mol K), CODATA 2018 (exact product N_A k; from memory)

    private static double[] solve(double[] x) {
        double[] y = new double[6];
        TRUTH.solve(x, 0, y, 0);
        return y;
    }

    @Test
    void withoutMethaneTheShiftExtentIsTheRootOfAQuadratic() {
        // Feed CO + H2O diluted in N2 at 1200 K and 1 bar: reforming can only run backwards (methanation), and
        // at this temperature and pressure its equilibrium leaves a trace of methane. Neglecting it, the shift
        // extent x solves x² = K2 (c − x)(w − x), i.e. (1 − K2) x² + K2 (c + w) x − K2 c w = 0.
        // Source: law of mass action for CO + H2O = CO2 + H2 (common practice), K2 from Xu and Froment (1989).
        double c = 1;
        double w = 2;
        double t = 1200;
        double[] x = {0, w, c, 0, 0, 10, t, 1};
        double k2 = Math.exp(-4.036 + 4400 / t);
        double a = 1 - k2;
        double b = k2 * (c + w);
        double root = (-b + Math.sqrt(b * b + 4 * a * k2 * c * w)) / (2 * a);

        double[] y = solve(x);
        // the methane the neglected methanation leaves, from K1 at the quadratic's composition
        double total = c + w + 10;
        double yCo = (c - root) / total;
        double yH2 = root / total;
        double yH2o = (w - root) / total;
        double methane = yCo * yH2 * yH2 * yH2 / (Math.exp(30.114 - 26830 / t) * yH2o) * total;
        assertTrue(methane < 1e-6, "methane estimate " + methane);
        assertEquals(methane, y[CH4], 0.01 * methane, "the trace of methane");
        // the shift extent is the outlet CO2; methanation shifts it by about the methane flow
        assertEquals(root, y[CO2], 4 * methane, "shift extent");
        assertEquals(root, y[H2] + 3 * y[CH4], 4 * methane, "hydrogen made by the shift");
    }

    @Test
    void equilibriumConstantsAgreeWithShomateThermochemistry() {
        // K = exp(−ΔG°/RT) with G° = H − T S of each species from the Shomate equations, standard state 1 bar.
        // Source: NIST Chemistry WebBook, Shomate coefficients (coefficients from memory); the correlations are
        // Xu and Froment (1989). The two are independent fits of the same thermochemistry; they agree within a
        // few per cent, 6% at most over 700-1200 K.
        for (double t = 700; t <= 1200; t += 50) {
            double dg1 = g(CO_SH, t) + 3 * g(t <= 1000 ? H2_LOW : H2_HIGH, t) - g(CH4_SH, t) - g(H2O_SH, t);
            double dg2 = g(CO2_SH, t) + g(t <= 1000 ? H2_LOW : H2_HIGH, t) - g(CO_SH, t) - g(H2O_SH, t);
            double k1 = Math.exp(-dg1 / (R * t));
            double k2 = Math.exp(-dg2 / (R * t));
            assertEquals(1, k1 / Math.exp(ReformerTruth.lnK1(t)), 0.08, "K1 at " + t + " K");
            assertEquals(1, k2 / Math.exp(ReformerTruth.lnK2(t)), 0.08, "K2 at " + t + " K");
        }
    }

    // Shomate A..H (H and S in kJ/mol and J/(mol K)); NIST Chemistry WebBook, coefficients from memory
    private static final double[] CH4_SH = {-0.703029, 108.4773, -42.52157, 5.862788, 0.678565, -76.84376, 158.7163};
    private static final double[] H2O_SH = {30.09200, 6.832514, 6.793435, -2.534480, 0.082139, -250.8810, 223.3967};
    private static final double[] CO_SH = {25.56759, 6.096130, 4.054656, -2.671301, 0.131021, -118.0089, 227.3665};
    private static final double[] CO2_SH = {24.99735, 55.18696, -33.69137, 7.948387, -0.136638, -403.6075, 228.2431};
    private static final double[] H2_LOW = {33.066178, -11.363417, 11.432816, -2.772874, -0.158558, -9.980797,
        172.707974};
    private static final double[] H2_HIGH = {18.563083, 12.257357, -2.859786, 0.268238, 1.977990, -1.147438,
        156.288133};

    /** G° = H° − T S° in J/mol, H° including the enthalpy of formation (the Shomate F term). */
    private static double g(double[] c, double temperature) {
        double t = temperature / 1000;
        double h = 1000 * (c[0] * t + c[1] * t * t / 2 + c[2] * t * t * t / 3 + c[3] * t * t * t * t / 4 - c[4] / t
                + c[5]);
        double s = c[0] * Math.log(t) + c[1] * t + c[2] * t * t / 2 + c[3] * t * t * t / 3 - c[4] / (2 * t * t) + c[6];
        return h - temperature * s;
    }

    @Test
    void anIndependentBracketingSolverFindsTheSameEquilibrium() {
        // Nested Brent root finding on the same two equilibrium conditions: for each reforming extent the shift
        // extent is bracketed between the zero-flow limits, then the reforming extent likewise.
        // Source: Apache Commons Math 3.6.1 BrentSolver.
        int n = 300;
        double[] x = ScenarioLaws.inputs(TRUTH, n, 99);
        // two solvers: a Commons Math solver keeps the function it is solving in its fields, so it is not reentrant
        BrentSolver outer = new BrentSolver(1e-15, 1e-15);
        BrentSolver inner = new BrentSolver(1e-15, 1e-15);
        double worst = 0;
        for (int s = 0; s < n; s++) {
            double[] row = java.util.Arrays.copyOfRange(x, 8 * s, 8 * s + 8);
            double[] f = java.util.Arrays.copyOf(row, 6);
            double t = row[6];
            double lnP = Math.log(row[7]);
            double lnK1 = 30.114 - 26830 / t;
            double lnK2 = -4.036 + 4400 / t;
            double feedTotal = f[0] + f[1] + f[2] + f[3] + f[4] + f[5];
            // the outer bracket stays 1e-7 of the feed inside the limits (every demo outlet flow is larger), the
            // inner one 1e-9 of its own width, where the logarithm of the vanishing flow decides the sign
            double margin = 1e-7 * feedTotal;
            double[] shift = new double[1];
            UnivariateFunction reforming = e1 -> {
                double lo = Math.max(-f[CO2], -f[H2] - 3 * e1);
                double hi = Math.min(f[H2O] - e1, f[CO] + e1);
                double inside = 1e-9 * (hi - lo);
                lo += inside;
                hi -= inside;
                UnivariateFunction wgs = e2 -> Math.log(f[CO2] + e2) + Math.log(f[H2] + 3 * e1 + e2)
                        - Math.log(f[CO] + e1 - e2) - Math.log(f[H2O] - e1 - e2) - lnK2;
                shift[0] = inner.solve(10000, wgs, lo, hi);
                double e2 = shift[0];
                double total = feedTotal + 2 * e1;
                return Math.log(f[CO] + e1 - e2) + 3 * Math.log(f[H2] + 3 * e1 + e2) - Math.log(f[CH4] - e1)
                        - Math.log(f[H2O] - e1 - e2) - 2 * Math.log(total) + 2 * lnP - lnK1;
            };
            double lo = Math.max(Math.max(-f[CO] - f[CO2], -(f[H2O] + f[H2]) / 2), -(f[CO] + f[H2]) / 4);
            double hi = Math.min(f[CH4], f[H2O] + f[CO2]);
            double e1 = outer.solve(10000, reforming, lo + margin, hi - margin);
            reforming.value(e1);
            double e2 = shift[0];
            double[] y = solve(row);
            double[] expected = {f[CH4] - e1, f[H2O] - e1 - e2, f[CO] + e1 - e2, f[CO2] + e2, f[H2] + 3 * e1 + e2,
                f[N2]};
            for (int i = 0; i < 6; i++) {
                worst = Math.max(worst, Math.abs(y[i] - expected[i]) / feedTotal);
            }
        }
        assertTrue(worst < 1e-9, "largest difference " + worst + " of the total feed");
    }

    @Test
    void elementBalancesCloseToRoundingAndNoFlowIsNegative() {
        // the atom counts of the species' formulas (common practice)
        int[][] atoms = {{1, 0, 1, 1, 0, 0}, {4, 2, 0, 0, 2, 0}, {0, 1, 1, 2, 0, 0}, {0, 0, 0, 0, 0, 2}};
        int n = 20000;
        double[] x = ScenarioLaws.inputs(TRUTH, n, 5);
        double[] y = ScenarioLaws.outputs(TRUTH, x, n);
        for (int s = 0; s < n; s++) {
            for (int[] a : atoms) {
                double in = 0;
                double out = 0;
                double magnitude = 0;
                for (int i = 0; i < 6; i++) {
                    in += a[i] * x[8 * s + i];
                    out += a[i] * y[6 * s + i];
                    magnitude += a[i] * (x[8 * s + i] + Math.abs(y[6 * s + i]));
                }
                // each outlet flow carries at most two roundings, each sum one per term: 16 ulps is ample
                assertTrue(Math.abs(out - in) <= 16 * ScenarioLaws.ULP * magnitude, "sample " + s);
            }
            for (int i = 0; i < 5; i++) {
                assertTrue(y[6 * s + i] > 0, "sample " + s + " species " + i + ": " + y[6 * s + i]);
            }
            assertEquals(x[8 * s + N2], y[6 * s + N2], "nitrogen is inert");
        }
    }

    @Test
    void massIsConserved() {
        // Source: IUPAC CIAAW standard atomic weights 2021, abridged values (from memory), in g/mol
        double h = 1.0080;
        double c = 12.011;
        double n = 14.007;
        double o = 15.999;
        double[] molar = {c + 4 * h, 2 * h + o, c + o, c + 2 * o, 2 * h, 2 * n};
        int count = 5000;
        double[] x = ScenarioLaws.inputs(TRUTH, count, 17);
        double[] y = ScenarioLaws.outputs(TRUTH, x, count);
        for (int s = 0; s < count; s++) {
            double in = 0;
            double out = 0;
            for (int i = 0; i < 6; i++) {
                in += molar[i] * x[8 * s + i];
                out += molar[i] * y[6 * s + i];
            }
            assertEquals(in, out, 1e-13 * in, "sample " + s);
        }
    }

    @Test
    void highTemperatureAndLowPressureFavourReforming() {
        // Le Chatelier: reforming is endothermic and makes two extra moles, so methane conversion rises with T
        // and falls with P (common practice)
        double[] base = {1, 3, 0, 0, 0.05, 0, 900, 10};
        double[] hot = base.clone();
        hot[6] = 1100;
        double[] dense = base.clone();
        dense[7] = 30;
        assertTrue(solve(hot)[CH4] < solve(base)[CH4]);
        assertTrue(solve(dense)[CH4] > solve(base)[CH4]);
    }

    @Test
    void impossibleFeedsAreRefusedByName() {
        IllegalArgumentException noOxygen = assertThrows(IllegalArgumentException.class,
                () -> solve(new double[] {1, 0, 0, 0, 0.1, 0, 1000, 10}));
        assertTrue(noOxygen.getMessage().contains("feed=[1.0, 0.0, 0.0, 0.0, 0.1, 0.0] mol/s, T=1000.0 K, P=10.0 bar"),
                noOxygen.getMessage());
        assertThrows(IllegalArgumentException.class, () -> solve(new double[] {1, -1, 0, 0, 0, 0, 1000, 10}));
        assertThrows(IllegalArgumentException.class, () -> solve(new double[] {1, 3, 0, 0, 0, 0, Double.NaN, 10}));
    }

    @Test
    void lawFileHoldsOnTruthRowsAndCompletionReproducesThem() throws IOException {
        // constant-affine completion is exact up to the rounding of a 4×4 solve: 1e-13 of the largest flow
        ScenarioLaws.check(TRUTH, Tier.CONSTANT_AFFINE, 5000, 8, 1e-13);
        ScenarioLaws.assertReproducibleSampling(TRUTH);
    }
}
