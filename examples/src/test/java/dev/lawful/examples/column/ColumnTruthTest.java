package dev.lawful.examples.column;

import static dev.lawful.examples.column.ColumnTruth.CP;
import static dev.lawful.examples.column.ColumnTruth.DAY;
import static dev.lawful.examples.column.ColumnTruth.G;
import static dev.lawful.examples.column.ColumnTruth.LEVELS;
import static dev.lawful.examples.column.ColumnTruth.LV;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.examples.ScenarioLaws;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Tier;
import java.io.IOException;
import org.junit.jupiter.api.Test;

/** The column truth: its budgets, hand-checkable columns, reference values and its law file. */
class ColumnTruthTest {
    private static final ColumnTruth TRUTH = new ColumnTruth();
    private static final int IN = 2 * LEVELS + 4;
    private static final int OUT = 2 * LEVELS + 3;

    private static double[] solve(ColumnTruth truth, double[] x) {
        double[] y = new double[OUT];
        truth.solve(x, 0, y, 0);
        return y;
    }

    /** A statically stable column: 5 K/km lapse rate from 290 K, relative humidity rh in every layer. */
    private static double[] stableColumn(double rh) {
        double ps = 100000;
        double[] x = new double[IN];
        double sigma = 1;
        for (int k = 0; k < LEVELS; k++) {
            double dsig = ColumnTruth.sigmaThickness()[k];
            double mid = sigma - dsig / 2;
            sigma -= dsig;
            double t = Math.max(290 * Math.pow(mid, ColumnTruth.RD * 0.005 / G), 210);
            x[k] = t;
            x[LEVELS + k] = rh * ColumnTruth.saturationHumidity(t, mid * ps);
        }
        x[2 * LEVELS] = ps;
        return x;
    }

    private static double[] masses(double ps) {
        double[] m = new double[LEVELS];
        for (int k = 0; k < LEVELS; k++) {
            m[k] = ColumnTruth.sigmaThickness()[k] * ps / G;
        }
        return m;
    }

    @Test
    void layerMassesSumToTheColumnMass() {
        // hydrostatic balance: the column holds p_s / g of air per area (common practice)
        double sum = 0;
        for (double d : ColumnTruth.sigmaThickness()) {
            sum += d;
        }
        assertEquals(1.0, sum, 0.0, "the layer thicknesses are binary fractions that sum to exactly 1");
        for (double ps : new double[] {95000, 101325, 103500}) {
            double total = 0;
            for (double m : masses(ps)) {
                total += m;
            }
            assertEquals(ps / G, total, 4 * ScenarioLaws.ULP * ps / G, "ps = " + ps);
        }
    }

    @Test
    void budgetsCloseToRoundingOnRandomColumns() {
        // Σ m dq/dt = E − P and Σ m c_p dT/dt = SH + L_v P + F_top − F_sfc, in SI, to 32 ulps of the sum of the
        // magnitudes of the terms (each tendency is a sum of up to six contributions, each rounded once or twice,
        // then converted to per-day units)
        int n = 20000;
        double[] x = ScenarioLaws.inputs(TRUTH, n, 11);
        double[] y = ScenarioLaws.outputs(TRUTH, x, n);
        int raining = 0;
        for (int s = 0; s < n; s++) {
            double[] m = masses(x[s * IN + 2 * LEVELS]);
            double water = 0;
            double waterScale = 0;
            double energy = 0;
            double energyScale = 0;
            for (int k = 0; k < LEVELS; k++) {
                double dq = y[s * OUT + LEVELS + k] / (1000 * DAY);
                double dt = y[s * OUT + k] / DAY;
                water += m[k] * dq;
                waterScale += Math.abs(m[k] * dq);
                energy += m[k] * CP * dt;
                energyScale += Math.abs(m[k] * CP * dt);
            }
            double e = x[s * IN + 2 * LEVELS + 2] / DAY;
            double sh = x[s * IN + 2 * LEVELS + 1];
            double p = y[s * OUT + 2 * LEVELS] / DAY;
            double top = y[s * OUT + 2 * LEVELS + 1];
            double sfc = y[s * OUT + 2 * LEVELS + 2];
            assertTrue(p >= 0, "sample " + s + ": negative precipitation " + p);
            raining += p > 0 ? 1 : 0;
            waterScale += Math.abs(e) + Math.abs(p);
            energyScale += Math.abs(sh) + Math.abs(LV * p) + Math.abs(top) + Math.abs(sfc);
            assertTrue(Math.abs(water - (e - p)) <= 32 * ScenarioLaws.ULP * waterScale, "water, sample " + s);
            assertTrue(Math.abs(energy - (sh + LV * p + top - sfc)) <= 32 * ScenarioLaws.ULP * energyScale,
                    "energy, sample " + s);
        }
        // the demo range has raining and dry columns
        assertTrue(raining > n / 20 && raining < n - n / 20, raining + " of " + n + " columns rain");
    }

    @Test
    void aStableSubsaturatedColumnDoesNotRain() {
        // no layer is saturated or unstable, so nothing condenses and, without background mixing, the evaporated
        // water stays in the lowest layer (common practice: large-scale condensation needs saturation)
        ColumnTruth still = new ColumnTruth(new ColumnTruth.Parameters(3600, 0.15, 0.01, 0.1, 1e-4,
                Double.POSITIVE_INFINITY));
        double[] x = stableColumn(0.5);
        x[2 * LEVELS + 1] = 20; // SH, W m-2
        x[2 * LEVELS + 2] = 3; // E, mm/day
        x[2 * LEVELS + 3] = 600; // S0, W m-2
        double[] y = solve(still, x);
        assertEquals(0.0, y[2 * LEVELS], 0.0, "precipitation");
        double m0 = masses(x[2 * LEVELS])[0];
        assertEquals(3 / m0 * 1000, y[LEVELS], 1e-12, "the lowest layer gains E / m_0");
        for (int k = 1; k < LEVELS; k++) {
            assertEquals(0.0, y[LEVELS + k], 0.0, "layer " + k + " keeps its moisture");
        }
    }

    @Test
    void aTransparentAtmosphereLetsRadiationThrough() {
        // With no absorber the net flux is the same at the top and the surface: absorbed sunlight minus the
        // surface's black-body emission σ T⁴ (Source: Stefan–Boltzmann law; σ from CODATA 2018, from memory).
        ColumnTruth clear = new ColumnTruth(new ColumnTruth.Parameters(3600, 0.3, 0, 0, 0, Double.POSITIVE_INFINITY));
        double[] x = stableColumn(0.5);
        x[2 * LEVELS + 3] = 1000;
        double[] y = solve(clear, x);
        double expected = 1000 * (1 - 0.3) - 5.670374419e-8 * Math.pow(x[0], 4);
        assertEquals(expected, y[2 * LEVELS + 1], 1e-12 * 1000, "top");
        assertEquals(expected, y[2 * LEVELS + 2], 1e-12 * 1000, "surface");
        for (int k = 0; k < LEVELS; k++) {
            assertEquals(0.0, y[k], 1e-12, "no radiative heating in layer " + k);
        }
    }

    @Test
    void anIsothermalColumnAtNightRadiatesLikeABlackBodyToSpace() {
        // Over a black surface at the same temperature, an isothermal grey atmosphere sends σ T⁴ upward at every
        // level (Kirchhoff's law), so the top loses σ T⁴; the surface receives the atmosphere's σ T⁴ (1 − τ) and
        // loses σ T⁴ τ to space, τ = exp(−Σ (k_lw q_k + k_dry) m_k) the column's transmissivity
        // (Source: Stefan–Boltzmann and Kirchhoff's laws, common practice; σ from CODATA 2018, from memory).
        double[] x = stableColumn(0.5);
        for (int k = 0; k < LEVELS; k++) {
            x[k] = 260;
        }
        double[] y = solve(TRUTH, x);
        ColumnTruth.Parameters p = TRUTH.parameters();
        double[] m = masses(x[2 * LEVELS]);
        double depth = 0;
        for (int k = 0; k < LEVELS; k++) {
            depth += (p.kLw() * x[LEVELS + k] + p.kDry()) * m[k];
        }
        double blackBody = 5.670374419e-8 * Math.pow(260, 4);
        assertEquals(-blackBody, y[2 * LEVELS + 1], 1e-12 * blackBody, "top net flux");
        assertEquals(-blackBody * Math.exp(-depth), y[2 * LEVELS + 2], 1e-12 * blackBody, "surface net flux");
    }

    @Test
    void saturationVapourPressureMatchesReferenceValues() {
        // Source: Bolton (1980) is built to give 611.2 Pa at 0 °C (from memory); IAPWS-95 saturation pressures
        // 2339.2 Pa at 20 °C and 4246.9 Pa at 30 °C (from memory). Bolton's fit is within 0.1% there.
        assertEquals(611.2, ColumnTruth.saturationVapourPressure(273.15), 1e-9);
        assertEquals(2339.2, ColumnTruth.saturationVapourPressure(293.15), 0.001 * 2339.2);
        assertEquals(4246.9, ColumnTruth.saturationVapourPressure(303.15), 0.001 * 4246.9);
    }

    @Test
    void aSupersaturatedLayerRainsBackToSaturation() {
        // Saturation adjustment: after τ the condensed layer is saturated at its warmed temperature, to the
        // linearisation error of Clausius–Clapeyron (common practice); here radiation, mixing and surface fluxes
        // are off so condensation is the only process.
        ColumnTruth dark = new ColumnTruth(new ColumnTruth.Parameters(3600, 0.15, 0, 0, 0, Double.POSITIVE_INFINITY));
        double[] x = stableColumn(0.5);
        int k = 3;
        double sigmaMid = 1;
        for (int i = 0; i < k; i++) {
            sigmaMid -= ColumnTruth.sigmaThickness()[i];
        }
        sigmaMid -= ColumnTruth.sigmaThickness()[k] / 2;
        double p = sigmaMid * x[2 * LEVELS];
        x[LEVELS + k] = 1.1 * ColumnTruth.saturationHumidity(x[k], p);
        double[] y = solve(dark, x);
        assertTrue(y[2 * LEVELS] > 0, "it rains");
        double tau = 3600;
        double qAfter = x[LEVELS + k] + tau * y[LEVELS + k] / (1000 * DAY);
        double tAfter = x[k] + tau * y[k] / DAY;
        double excess = x[LEVELS + k] - ColumnTruth.saturationHumidity(x[k], p);
        assertEquals(ColumnTruth.saturationHumidity(tAfter, p), qAfter, 0.02 * excess);
        assertTrue(y[k] > 0, "condensation warms the layer");
        // all the rain comes from that layer: P = m_k c_k
        double m = masses(x[2 * LEVELS])[k];
        assertEquals(-m * y[LEVELS + k] / 1000, y[2 * LEVELS], 1e-12 * y[2 * LEVELS]);
    }

    @Test
    void mixingAnUnstablePairMovesHeatUpward() {
        // a superadiabatic lowest layer (θ falling with height) gives heat to the layer above it, cooling itself
        // (common practice: convective adjustment)
        ColumnTruth dark = new ColumnTruth(new ColumnTruth.Parameters(3600, 0.15, 0, 0, 0, Double.POSITIVE_INFINITY));
        double[] x = stableColumn(0.3);
        x[0] += 5;
        double[] y = solve(dark, x);
        assertTrue(y[0] < 0 && y[1] > 0, "dT/dt " + y[0] + ", " + y[1]);
        double[] m = masses(x[2 * LEVELS]);
        assertEquals(0.0, m[0] * y[0] + m[1] * y[1], 1e-12 * Math.abs(m[0] * y[0]), "the exchange conserves heat");
        for (int k = 2; k < LEVELS; k++) {
            assertEquals(0.0, y[k], 0.0, "layer " + k);
        }
    }

    @Test
    void impossibleColumnsAreRefused() {
        double[] x = stableColumn(0.5);
        x[2 * LEVELS] = -1;
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> solve(TRUTH, x));
        assertTrue(e.getMessage().contains("-1.0"), e.getMessage());
    }

    @Test
    void lawFileHoldsOnTruthRowsAndCompletionReproducesThem() throws IOException {
        // affine completion: one 2×2 solve per sample; it reproduces P and F_sfc to 1e-12 of their largest value
        Completion c = ScenarioLaws.check(TRUTH, Tier.AFFINE, 5000, 8, 1e-12);
        assertEquals(java.util.List.of("P", "F_sfc"), c.completedNames());
        ScenarioLaws.assertReproducibleSampling(TRUTH);
    }
}
