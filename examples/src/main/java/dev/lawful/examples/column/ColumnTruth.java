package dev.lawful.examples.column;

import dev.lawful.examples.TruthModel;
import java.util.List;
import java.util.SplittableRandom;

/**
 * A single column of moist air on {@value #LEVELS} sigma levels, the truth of the {@code moist-column.law} scenario:
 * a simple column scheme of our own (surface fluxes, mixing of unstable layers, condensation of supersaturation,
 * grey radiation) that closes its water and energy budgets exactly up to rounding.
 *
 * <p><b>Rows</b> (units as the law file declares them). Input: {@code T[10]} (K), {@code q[10]} (kg/kg),
 * {@code ps} (Pa), {@code SH} (surface sensible heat flux, W m-2, upward positive), {@code E} (surface evaporation,
 * kg m-2 d-1, i.e. mm of water per day), {@code S0} (sunlight arriving at the top, W m-2). Output: {@code dTdt[10]}
 * (K/d), {@code dqdt[10]} (g/(kg d)), {@code P} (surface precipitation, kg m-2 d-1), {@code F_top} and
 * {@code F_sfc} (net downward radiative flux at the top and at the surface, W m-2). Index 0 is the layer next to
 * the surface, index 9 the top layer.
 *
 * <p><b>Layers.</b> Layer k spans Δσ_k of the column ({@link #DSIG}, summing to exactly 1), so its mass per area is
 * m_k = Δσ_k p_s / g (hydrostatic balance) and its mid-level pressure p_k = σ_k p_s with σ_k the middle of the
 * layer.
 *
 * <p><b>Scheme</b> (all tendencies computed in SI, then converted to the declared units):
 * <ol>
 * <li>Radiation from the input state. Shortwave: each layer transmits t_k = exp(−k_sw m_k q_k) of the beam on
 *     its way down and up, the surface reflects the albedo α. Longwave, grey: layer emissivity
 *     e_k = 1 − exp(−(k_lw q_k + k_dry) m_k), black surface at the temperature of layer 0,
 *     U_{k+1} = U_k (1 − e_k) + e_k σ T_k⁴ upward and D_k = D_{k+1} (1 − e_k) + e_k σ T_k⁴ downward. With the net
 *     downward flux F_j at interface j (0 the surface, 10 the top), layer k heats by (F_{k+1} − F_k)/(m_k c_p);
 *     F_top = F_10 and F_sfc = F_0.</li>
 * <li>Surface fluxes into layer 0: SH/(m_0 c_p) and E/m_0.</li>
 * <li>Mixing: where θ = T (p°/p)^κ (the potential temperature) falls with height between layers k and k+1, the
 *     pair exchanges heat c_p μ (θ_k − θ_{k+1}) Π / τ and moisture μ (q_k − q_{k+1}) / τ (μ = m_k m_{k+1}/(m_k +
 *     m_{k+1}), Π the Exner function at their interface); every pair also exchanges moisture μ (q_k − q_{k+1}) / τ_b,
 *     a background mixing that stands for the transport a single column does not resolve. Each exchange is
 *     antisymmetric, so it conserves heat and water.</li>
 * <li>Condensation: with the state after τ of the tendencies so far (T*, q*), the excess over saturation
 *     condenses at the rate c = (q* − q_s(T*)) / (τ (1 + L_v² q_s / (c_p R_v T*²))) (saturation adjustment,
 *     common practice), heats by L_v c / c_p and rains out at once: P = Σ m_k c_k.</li>
 * </ol>
 * Hence the budgets, with every flux positive downward for radiation and upward for SH and E:
 * Σ m_k dq_k/dt = E − P and Σ m_k c_p dT_k/dt = SH + L_v P + F_top − F_sfc.
 *
 * <p>Immutable and thread-safe; {@link #solve} allocates a few arrays of {@value #LEVELS} + 1 values per call.
 */
public final class ColumnTruth implements TruthModel {
    /** Number of layers. */
    public static final int LEVELS = 10;
    /** Standard gravity g, m s-2 (BIPM SI Brochure; 3rd CGPM, 1901). */
    public static final double G = 9.80665;
    /** Specific heat capacity of dry air at constant pressure, J/(kg K) (Wallace and Hobbs, Atmospheric Science, 2006; from memory). */
    public static final double CP = 1004;
    /** Latent heat of vaporisation of water at 0 °C, J/kg (Bolton, Monthly Weather Review 108 (1980) 1046; from memory). */
    public static final double LV = 2.501e6;
    /** Gas constant of dry air, J/(kg K) (Wallace and Hobbs 2006; from memory). */
    public static final double RD = 287.04;
    /** Gas constant of water vapour, J/(kg K) (Wallace and Hobbs 2006; from memory). */
    public static final double RV = 461.5;
    /** Stefan–Boltzmann constant, W m-2 K-4 (CODATA 2018, exact in the SI of 2019; from memory). */
    public static final double STEFAN_BOLTZMANN = 5.670374419e-8;
    /** Reference pressure of the potential temperature, Pa (common practice). */
    public static final double P_REF = 1e5;
    /** Seconds per day: converts per-second tendencies to the declared per-day units. */
    public static final double DAY = 86400;

    /**
     * Layer thicknesses Δσ_k from the surface up (demo values, thinner near the surface and at the top); binary
     * fractions that sum to exactly 1, the same numbers as the law file's {@code dsig}.
     */
    static final double[] DSIG = {0.0625, 0.078125, 0.09375, 0.109375, 0.125, 0.125, 0.125, 0.109375, 0.09375,
        0.078125};

    /** Width of an input row: T[10], q[10], ps, SH, E, S0. */
    static final int IN = 2 * LEVELS + 4;
    /** Width of an output row: dTdt[10], dqdt[10], P, F_top, F_sfc. */
    static final int OUT = 2 * LEVELS + 3;

    /**
     * The scheme's tunable numbers.
     *
     * @param tau    relaxation time of mixing and condensation, s
     * @param albedo surface albedo, 0..1
     * @param kSw    shortwave absorption coefficient of water vapour, m² per kg of vapour
     * @param kLw    longwave absorption coefficient of water vapour, m² per kg of vapour
     * @param kDry   longwave absorption coefficient of the dry air (standing for CO2 and the other gases), m²/kg
     * @param tauBackground time scale of the background mixing of moisture between all neighbouring layers, s
     *               ({@code Double.POSITIVE_INFINITY} turns it off)
     */
    public record Parameters(double tau, double albedo, double kSw, double kLw, double kDry, double tauBackground) {
        /**
         * @return the scenario's values (demo values): τ 3600 s, α 0.15, k_sw 0.01, k_lw 0.1, k_dry 1e−4 m²/kg,
         *         background mixing of moisture over 1 day
         */
        public static Parameters demo() {
            return new Parameters(3600, 0.15, 0.01, 0.1, 1e-4, DAY);
        }
    }

    private final Parameters parameters;

    /** Creates the scenario's truth with {@link Parameters#demo()}. */
    public ColumnTruth() {
        this(Parameters.demo());
    }

    /**
     * @param parameters the scheme's numbers
     * @throws IllegalArgumentException if τ is not positive, the albedo outside 0..1 or a coefficient negative
     */
    public ColumnTruth(Parameters parameters) {
        if (!(parameters.tau() > 0 && parameters.albedo() >= 0 && parameters.albedo() <= 1 && parameters.kSw() >= 0
                && parameters.kLw() >= 0 && parameters.kDry() >= 0 && parameters.tauBackground() > 0)) {
            throw new IllegalArgumentException("invalid column parameters " + parameters);
        }
        this.parameters = parameters;
    }

    /** @return the scheme's numbers */
    public Parameters parameters() {
        return parameters;
    }

    /** @return Δσ_k of layer k (0 at the surface), a copy */
    public static double[] sigmaThickness() {
        return DSIG.clone();
    }

    /**
     * Saturation vapour pressure over liquid water (Bolton 1980; from memory):
     * e_s = 611.2 Pa · exp(17.67 (T − 273.15 K) / (T − 29.65 K)).
     *
     * @param t temperature, K
     * @return e_s in Pa
     */
    public static double saturationVapourPressure(double t) {
        return 611.2 * Math.exp(17.67 * (t - 273.15) / (t - 29.65));
    }

    /**
     * Saturation specific humidity q_s = ε e_s / (p − (1 − ε) e_s), ε = R_d/R_v, capped at 1 where e_s ≥ p.
     *
     * @param t temperature, K
     * @param p pressure, Pa
     * @return q_s in kg/kg
     */
    public static double saturationHumidity(double t, double p) {
        double es = saturationVapourPressure(t);
        double eps = RD / RV;
        double denominator = p - (1 - eps) * es;
        return denominator <= eps * es ? 1.0 : eps * es / denominator;
    }

    @Override
    public String lawFile() {
        return "moist-column.law";
    }

    /** @return 24: T[10] K, q[10] kg/kg, ps Pa, SH W m-2, E kg m-2 d-1, S0 W m-2 */
    @Override
    public int inputWidth() {
        return IN;
    }

    /** @return 23: dTdt[10] K/d, dqdt[10] g/(kg d), P kg m-2 d-1, F_top and F_sfc W m-2 */
    @Override
    public int outputWidth() {
        return OUT;
    }

    /**
     * Draws a column (all demo values): p_s 95–103.5 kPa; surface air 270–305 K with a lapse rate of 4–11 K/km
     * (above 9.8 K/km the lowest layers are unstable), plus ±1 K noise per layer, never below a tropopause
     * temperature of 195–220 K; relative humidity 50–105% at the surface (slightly supersaturated air rains)
     * falling linearly to 10–60% at the top; SH −20..150 W m-2; E 0–8 mm/day; S0 0–1100 W m-2, zero in a quarter
     * of the rows (night).
     */
    @Override
    public void sample(SplittableRandom random, double[] x, int offset) {
        double ps = 95000 + 8500 * random.nextDouble();
        double ts = 270 + 35 * random.nextDouble();
        double lapse = 0.004 + 0.007 * random.nextDouble();
        double tropopause = 195 + 25 * random.nextDouble();
        double rhSurface = 0.5 + 0.55 * random.nextDouble();
        double rhTop = 0.1 + 0.5 * random.nextDouble();
        double exponent = RD * lapse / G;
        double sigma = 1;
        for (int k = 0; k < LEVELS; k++) {
            double mid = sigma - 0.5 * DSIG[k];
            sigma -= DSIG[k];
            double t = Math.max(ts * Math.pow(mid, exponent) + (2 * random.nextDouble() - 1), tropopause);
            double rh = rhSurface + (rhTop - rhSurface) * k / (LEVELS - 1);
            x[offset + k] = t;
            x[offset + LEVELS + k] = rh * saturationHumidity(t, mid * ps);
        }
        x[offset + 2 * LEVELS] = ps;
        x[offset + 2 * LEVELS + 1] = -20 + 170 * random.nextDouble();
        x[offset + 2 * LEVELS + 2] = 8 * random.nextDouble();
        x[offset + 2 * LEVELS + 3] = random.nextInt(4) == 0 ? 0.0 : 1100 * random.nextDouble();
    }

    /**
     * Computes the tendencies, precipitation and radiative fluxes of one column (see the class documentation).
     *
     * @throws IllegalArgumentException if p_s is not positive, a temperature not positive, a humidity negative or
     *         any input not finite (the message names the input)
     */
    @Override
    public void solve(double[] x, int xOffset, double[] y, int yOffset) {
        double ps = x[xOffset + 2 * LEVELS];
        double sensible = x[xOffset + 2 * LEVELS + 1];
        double evaporation = x[xOffset + 2 * LEVELS + 2] / DAY;
        check(x, xOffset);
        double tau = parameters.tau();
        double kappa = RD / CP;
        double[] mass = new double[LEVELS];
        double[] pMid = new double[LEVELS];
        double[] pLow = new double[LEVELS];
        double sigma = 1;
        for (int k = 0; k < LEVELS; k++) {
            mass[k] = DSIG[k] * ps / G;
            pLow[k] = sigma * ps;
            pMid[k] = (sigma - 0.5 * DSIG[k]) * ps;
            sigma -= DSIG[k];
        }
        double[] flux = new double[LEVELS + 1];
        radiation(x, xOffset, mass, flux);

        double[] dT = new double[LEVELS];
        double[] dq = new double[LEVELS];
        // radiative heating: what enters the layer at its top minus what leaves through its bottom
        for (int k = 0; k < LEVELS; k++) {
            dT[k] = (flux[k + 1] - flux[k]) / (mass[k] * CP);
        }
        // surface fluxes go into the lowest layer
        dT[0] += sensible / (mass[0] * CP);
        dq[0] += evaporation / mass[0];
        // mixing of neighbours, fast where they are statically unstable: an antisymmetric exchange
        double background = 1 / parameters.tauBackground();
        for (int k = 0; k + 1 < LEVELS; k++) {
            double tLow = x[xOffset + k];
            double tHigh = x[xOffset + k + 1];
            double thetaLow = tLow * Math.pow(P_REF / pMid[k], kappa);
            double thetaHigh = tHigh * Math.pow(P_REF / pMid[k + 1], kappa);
            double convective = thetaHigh < thetaLow ? 1 / tau : 0;
            double rate = convective + background;
            if (rate > 0) {
                double mu = mass[k] * mass[k + 1] / (mass[k] + mass[k + 1]);
                double exner = Math.pow(pLow[k + 1] / P_REF, kappa);
                double heat = CP * mu * (thetaLow - thetaHigh) * exner * convective;
                double water = mu * (x[xOffset + LEVELS + k] - x[xOffset + LEVELS + k + 1]) * rate;
                dT[k] -= heat / (mass[k] * CP);
                dT[k + 1] += heat / (mass[k + 1] * CP);
                dq[k] -= water / mass[k];
                dq[k + 1] += water / mass[k + 1];
            }
        }
        // condensation of the excess over saturation, which rains out at once
        double rain = 0;
        for (int k = 0; k < LEVELS; k++) {
            double t = x[xOffset + k] + tau * dT[k];
            double q = x[xOffset + LEVELS + k] + tau * dq[k];
            double qs = saturationHumidity(t, pMid[k]);
            if (q > qs) {
                double rate = (q - qs) / (tau * (1 + LV * LV * qs / (CP * RV * t * t)));
                dq[k] -= rate;
                dT[k] += LV * rate / CP;
                rain += mass[k] * rate;
            }
        }
        for (int k = 0; k < LEVELS; k++) {
            y[yOffset + k] = dT[k] * DAY;
            y[yOffset + LEVELS + k] = dq[k] * (1000 * DAY);
        }
        y[yOffset + 2 * LEVELS] = rain * DAY;
        y[yOffset + 2 * LEVELS + 1] = flux[LEVELS];
        y[yOffset + 2 * LEVELS + 2] = flux[0];
    }

    /**
     * Net downward radiative flux at the 11 interfaces (W m-2), shortwave plus grey longwave, from the input state.
     *
     * @param x       input rows; read only
     * @param xOffset first index of the row
     * @param mass    layer masses per area, kg m-2
     * @param flux    receives F_0 (surface) .. F_10 (top) (modified)
     */
    private void radiation(double[] x, int xOffset, double[] mass, double[] flux) {
        double sun = x[xOffset + 2 * LEVELS + 3];
        double[] down = new double[LEVELS + 1];
        double[] up = new double[LEVELS + 1];
        double[] transmit = new double[LEVELS];
        // shortwave: down through every layer, reflected at the surface, up through every layer
        down[LEVELS] = sun;
        for (int k = LEVELS - 1; k >= 0; k--) {
            transmit[k] = Math.exp(-parameters.kSw() * mass[k] * x[xOffset + LEVELS + k]);
            down[k] = down[k + 1] * transmit[k];
        }
        up[0] = parameters.albedo() * down[0];
        for (int k = 0; k < LEVELS; k++) {
            up[k + 1] = up[k] * transmit[k];
        }
        for (int j = 0; j <= LEVELS; j++) {
            flux[j] = down[j] - up[j];
        }
        // longwave, grey: emissivity e_k, black surface at the temperature of the lowest layer
        double[] emissivity = transmit;
        double[] emission = new double[LEVELS];
        for (int k = 0; k < LEVELS; k++) {
            double t = x[xOffset + k];
            emissivity[k] = -Math.expm1(-(parameters.kLw() * x[xOffset + LEVELS + k] + parameters.kDry()) * mass[k]);
            emission[k] = emissivity[k] * STEFAN_BOLTZMANN * (t * t) * (t * t);
        }
        double t0 = x[xOffset];
        up[0] = STEFAN_BOLTZMANN * (t0 * t0) * (t0 * t0);
        for (int k = 0; k < LEVELS; k++) {
            up[k + 1] = up[k] * (1 - emissivity[k]) + emission[k];
        }
        down[LEVELS] = 0;
        for (int k = LEVELS - 1; k >= 0; k--) {
            down[k] = down[k + 1] * (1 - emissivity[k]) + emission[k];
        }
        for (int j = 0; j <= LEVELS; j++) {
            flux[j] += down[j] - up[j];
        }
    }

    private static void check(double[] x, int xOffset) {
        boolean ok = x[xOffset + 2 * LEVELS] > 0;
        for (int i = 0; i < IN && ok; i++) {
            ok = Double.isFinite(x[xOffset + i]);
        }
        for (int k = 0; k < LEVELS && ok; k++) {
            ok = x[xOffset + k] > 0 && x[xOffset + LEVELS + k] >= 0;
        }
        if (!ok) {
            StringBuilder s = new StringBuilder();
            for (int i = 0; i < IN; i++) {
                s.append(i == 0 ? "" : ", ").append(x[xOffset + i]);
            }
            throw new IllegalArgumentException("a column needs finite inputs, positive temperatures and ps and"
                    + " humidities of at least 0, found [" + s + "]");
        }
    }

    /** @return heating rates (K/d), moistening rates (g/(kg d)), precipitation (kg m-2 d-1), radiative fluxes (W m-2) */
    @Override
    public List<ColumnGroup> outputGroups() {
        return List.of(new ColumnGroup("heating rate", "K/d", 0, LEVELS),
                new ColumnGroup("moistening rate", "g/(kg d)", LEVELS, LEVELS),
                new ColumnGroup("surface precipitation", "kg m-2 d-1", 2 * LEVELS, 1),
                new ColumnGroup("net radiative flux", "W m-2", 2 * LEVELS + 1, 2));
    }

    /**
     * @return 1 W m-2 for both laws (the water law is written as latent heat, L_v times the water budget, so it is
     *         in W m-2 too): a typical closure target of climate models' energy budgets (common practice)
     */
    @Override
    public List<LawMark> lawMarks() {
        return List.of(new LawMark("water", 1.0, "1 W m-2 of latent heat (0.035 mm/day), a typical closure target"
                        + " of climate models (common practice)"),
                new LawMark("energy", 1.0, "1 W m-2, a typical closure target of climate models (common practice)"));
    }
}
