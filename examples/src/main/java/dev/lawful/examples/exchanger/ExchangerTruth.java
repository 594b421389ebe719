package dev.lawful.examples.exchanger;

import dev.lawful.examples.TruthModel;
import java.util.List;
import java.util.SplittableRandom;

/**
 * A counterflow heat exchanger whose streams have temperature-dependent heat capacities, the truth of the
 * {@code counterflow-exchanger.law} scenario: flue gas heats steam (a superheater).
 *
 * <p><b>Rows.</b> Input: {@code T_hot_in}, {@code T_cold_in} (K), {@code m_hot}, {@code m_cold} (kg/s), {@code UA}
 * (W/K). Output: {@code T_hot_out}, {@code T_cold_out} (K), {@code Q} (heat duty, kW).
 *
 * <p><b>Physics.</b> Each fluid's heat capacity is a Shomate polynomial in t = T / 1000 K (NIST Chemistry WebBook,
 * coefficients from memory), per kilogram: c_p(T) = (A + B t + C t² + D t³ + E/t²) / M, and its enthalpy relative to
 * an arbitrary datum h(T) = (1000 K / M) (A t + B t²/2 + C t³/3 + D t⁴/4 − E/t). The duty follows from the
 * effectiveness-NTU relation of a counterflow exchanger (Incropera and DeWitt, Fundamentals of Heat and Mass
 * Transfer), ε = (1 − exp(−NTU (1 − C_r))) / (1 − C_r exp(−NTU (1 − C_r))), ε = NTU / (1 + NTU) at C_r = 1, with
 * NTU = UA / C_min and C_r = C_min / C_max, and Q = ε C_min (T_hot_in − T_cold_in). The capacity rates C = m c̄_p
 * use each stream's mean heat capacity c̄_p = Δh / ΔT over its own temperature change, iterated until Q is
 * consistent (to 1e−13 relative); then both outlet temperatures come from that one Q by Newton on the enthalpy
 * polynomials, h_hot(T_hot_out) = h_hot(T_hot_in) − Q/m_hot and h_cold(T_cold_out) = h_cold(T_cold_in) + Q/m_cold,
 * so the energy balance of the law file holds to rounding. (The mean-c_p method is exact at constant c_p and an
 * approximation of the counterflow differential equations otherwise.)
 *
 * <p>Immutable and thread-safe; {@link #solve} allocates nothing.
 */
public final class ExchangerTruth implements TruthModel {
    /** Temperature scale of the Shomate polynomials, K. */
    public static final double T0 = 1000;

    /** Demo range of the hot (flue gas) inlet temperature, K (demo values). */
    public static final double T_HOT_MIN = 900;
    /** @see #T_HOT_MIN */
    public static final double T_HOT_MAX = 1200;
    /** Demo range of the cold (steam) inlet temperature, K (demo values). */
    public static final double T_COLD_MIN = 520;
    /** @see #T_COLD_MIN */
    public static final double T_COLD_MAX = 650;

    private static final int MAX_ITERATIONS = 100;

    /**
     * A fluid's heat capacity as a Shomate polynomial in t = T / 1000 K, per mole, and its molar mass.
     *
     * @param name      what the fluid is
     * @param a         coefficient A, J/(mol K)
     * @param b         coefficient B, J/(mol K)
     * @param c         coefficient C, J/(mol K)
     * @param d         coefficient D, J/(mol K)
     * @param e         coefficient E, J/(mol K)
     * @param molarMass kg/mol
     */
    public record Fluid(String name, double a, double b, double c, double d, double e, double molarMass) {

        /**
         * Nitrogen, valid 500–2000 K (NIST Chemistry WebBook, Shomate coefficients from memory; molar mass from
         * the IUPAC CIAAW 2021 abridged atomic weights, from memory).
         *
         * @return N2
         */
        public static Fluid nitrogen() {
            return new Fluid("N2", 19.50583, 19.88705, -8.598535, 1.369784, 0.527601, 0.0280134);
        }

        /** @return CO2, valid 298–1200 K (NIST Chemistry WebBook, Shomate coefficients from memory) */
        public static Fluid carbonDioxide() {
            return new Fluid("CO2", 24.99735, 55.18696, -33.69137, 7.948387, -0.136638, 0.0440095);
        }

        /** @return water vapour, valid 500–1700 K (NIST Chemistry WebBook, Shomate coefficients from memory) */
        public static Fluid steam() {
            return new Fluid("H2O", 30.09200, 6.832514, 6.793435, -2.534480, 0.082139, 0.0180153);
        }

        /**
         * The flue gas of the scenario (demo values): mole fractions 0.73 N2, 0.09 CO2, 0.18 H2O, roughly the products
         * of burning natural gas in air with little excess, its oxygen counted as nitrogen.
         *
         * @return the ideal mixture of {@link #nitrogen()}, {@link #carbonDioxide()} and {@link #steam()}
         */
        public static Fluid flueGas() {
            return mixture("flue gas", new double[] {0.73, 0.09, 0.18}, nitrogen(), carbonDioxide(), steam());
        }

        /**
         * An ideal mixture: molar coefficients and molar mass are the mole-fraction weighted sums.
         *
         * @param name      the mixture's name
         * @param fractions mole fractions, one per species (used as given)
         * @param species   the components
         * @return the mixture
         * @throws IllegalArgumentException if the counts differ
         */
        public static Fluid mixture(String name, double[] fractions, Fluid... species) {
            if (fractions.length != species.length) {
                throw new IllegalArgumentException(fractions.length + " fractions for " + species.length + " species");
            }
            double[] s = new double[6];
            for (int i = 0; i < species.length; i++) {
                Fluid f = species[i];
                s[0] += fractions[i] * f.a;
                s[1] += fractions[i] * f.b;
                s[2] += fractions[i] * f.c;
                s[3] += fractions[i] * f.d;
                s[4] += fractions[i] * f.e;
                s[5] += fractions[i] * f.molarMass;
            }
            return new Fluid(name, s[0], s[1], s[2], s[3], s[4], s[5]);
        }

        /**
         * A fluid of constant heat capacity (for checks against closed forms).
         *
         * @param name the fluid's name
         * @param cp   specific heat capacity, J/(kg K)
         * @return a fluid with A = c_p, molar mass 1 kg/mol and the other coefficients 0
         */
        public static Fluid constant(String name, double cp) {
            return new Fluid(name, cp, 0, 0, 0, 0, 1.0);
        }

        /**
         * @param t temperature, K
         * @return specific heat capacity (A + B t + C t² + D t³ + E/t²) / M in J/(kg K), t = T / 1000 K
         */
        public double cp(double t) {
            double s = t / T0;
            return (a + b * s + c * s * s + d * s * s * s + e / (s * s)) / molarMass;
        }

        /**
         * @param t temperature, K
         * @return specific enthalpy (1000 K / M)(A t + B t²/2 + C t³/3 + D t⁴/4 − E/t) in J/kg, relative to a datum
         *         that cancels in every difference
         */
        public double enthalpy(double t) {
            double s = t / T0;
            double s2 = s * s;
            return T0 / molarMass * (a * s + b / 2 * s2 + c / 3 * (s2 * s) + d / 4 * (s2 * s2) - e / s);
        }

        /**
         * The temperature of a given enthalpy, by Newton from {@code guess}: T ← T − (h(T) − h)/c_p(T).
         *
         * @param h     specific enthalpy, J/kg (on the datum of {@link #enthalpy})
         * @param guess starting temperature, K
         * @return T with h(T) = h to rounding, K
         * @throws IllegalStateException if Newton does not converge in 50 steps
         */
        public double temperature(double h, double guess) {
            double t = guess;
            boolean close = false;
            for (int i = 0; i < 50; i++) {
                double step = (enthalpy(t) - h) / cp(t);
                t -= step;
                if (close) {
                    return t;
                }
                close = Math.abs(step) <= 1e-11 * Math.abs(t);
            }
            throw new IllegalStateException(name + ": no temperature found for enthalpy " + h + " J/kg from " + guess
                    + " K");
        }
    }

    private final Fluid hot;
    private final Fluid cold;

    /** Creates the scenario's truth: flue gas ({@link Fluid#flueGas()}) heats steam ({@link Fluid#steam()}). */
    public ExchangerTruth() {
        this(Fluid.flueGas(), Fluid.steam());
    }

    /**
     * @param hot  the hot stream's fluid
     * @param cold the cold stream's fluid
     */
    public ExchangerTruth(Fluid hot, Fluid cold) {
        this.hot = hot;
        this.cold = cold;
    }

    /** @return the hot stream's fluid */
    public Fluid hot() {
        return hot;
    }

    /** @return the cold stream's fluid */
    public Fluid cold() {
        return cold;
    }

    /**
     * Counterflow effectiveness (Incropera and DeWitt): ε = (1 − e^(−a)) / (1 − C_r e^(−a)), a = NTU (1 − C_r),
     * evaluated as −expm1(−a) / ((1 − C_r) − C_r expm1(−a)) so that it stays accurate as C_r → 1, and NTU / (1 + NTU)
     * at C_r = 1.
     *
     * @param ntu number of transfer units UA / C_min, at least 0
     * @param cr  capacity ratio C_min / C_max, 0..1
     * @return ε, 0..1
     */
    public static double effectiveness(double ntu, double cr) {
        if (cr == 1) {
            return ntu / (1 + ntu);
        }
        double em = Math.expm1(-ntu * (1 - cr));
        return -em / ((1 - cr) - cr * em);
    }

    @Override
    public String lawFile() {
        return "counterflow-exchanger.law";
    }

    /** @return 5: T_hot_in, T_cold_in (K), m_hot, m_cold (kg/s), UA (W/K) */
    @Override
    public int inputWidth() {
        return 5;
    }

    /** @return 3: T_hot_out, T_cold_out (K), Q (kW) */
    @Override
    public int outputWidth() {
        return 3;
    }

    /**
     * Draws an operating point, uniform (demo values): flue gas in at 900–1200 K, steam in at 520–650 K, flue gas
     * 0.5–3 kg/s, steam 0.3–2 kg/s, UA 500–8000 W/K (NTU about 0.1 to 10). Every temperature then stays inside the
     * ranges the polynomials were fitted on.
     */
    @Override
    public void sample(SplittableRandom random, double[] x, int offset) {
        x[offset] = T_HOT_MIN + (T_HOT_MAX - T_HOT_MIN) * random.nextDouble();
        x[offset + 1] = T_COLD_MIN + (T_COLD_MAX - T_COLD_MIN) * random.nextDouble();
        x[offset + 2] = 0.5 + 2.5 * random.nextDouble();
        x[offset + 3] = 0.3 + 1.7 * random.nextDouble();
        x[offset + 4] = 500 + 7500 * random.nextDouble();
    }

    /**
     * Outlet temperatures and duty (see the class documentation).
     *
     * @throws IllegalArgumentException if an input is not finite, a flow or UA not positive, or the hot inlet
     *         colder than the cold inlet
     * @throws IllegalStateException if the mean heat capacities or an outlet temperature do not converge (the
     *         message names the input)
     */
    @Override
    public void solve(double[] x, int xOffset, double[] y, int yOffset) {
        double hotIn = x[xOffset];
        double coldIn = x[xOffset + 1];
        double mHot = x[xOffset + 2];
        double mCold = x[xOffset + 3];
        double ua = x[xOffset + 4];
        if (!(Double.isFinite(hotIn) && Double.isFinite(coldIn) && hotIn > 0 && coldIn > 0 && hotIn >= coldIn
                && mHot > 0 && mCold > 0 && ua >= 0 && Double.isFinite(mHot) && Double.isFinite(mCold)
                && Double.isFinite(ua))) {
            throw new IllegalArgumentException("an exchanger needs finite inputs, positive flows, UA of at least 0"
                    + " and T_hot_in >= T_cold_in, found " + describe(x, xOffset));
        }
        double hHotIn = hot.enthalpy(hotIn);
        double hColdIn = cold.enthalpy(coldIn);
        double cpHot = hot.cp(hotIn);
        double cpCold = cold.cp(coldIn);
        double q = Double.NaN;
        double hotOut = hotIn;
        double coldOut = coldIn;
        boolean converged = false;
        try {
            for (int i = 0; i < MAX_ITERATIONS && !converged; i++) {
                double cHot = mHot * cpHot;
                double cCold = mCold * cpCold;
                double cMin = Math.min(cHot, cCold);
                double cMax = Math.max(cHot, cCold);
                double next = effectiveness(ua / cMin, cMin / cMax) * cMin * (hotIn - coldIn);
                hotOut = hot.temperature(hHotIn - next / mHot, hotIn - next / cHot);
                coldOut = cold.temperature(hColdIn + next / mCold, coldIn + next / cCold);
                converged = Math.abs(next - q) <= 1e-13 * Math.abs(next);
                q = next;
                if (hotIn - hotOut > 1e-9 * hotIn && coldOut - coldIn > 1e-9 * coldIn) {
                    cpHot = q / (mHot * (hotIn - hotOut));
                    cpCold = q / (mCold * (coldOut - coldIn));
                } else {
                    // (almost) no heat transferred: the mean heat capacities are the inlet ones
                    converged = true;
                }
            }
        } catch (IllegalStateException e) {
            throw new IllegalStateException("exchanger did not converge for input " + describe(x, xOffset), e);
        }
        if (!converged) {
            throw new IllegalStateException("exchanger mean heat capacities did not converge for input "
                    + describe(x, xOffset));
        }
        y[yOffset] = hotOut;
        y[yOffset + 1] = coldOut;
        y[yOffset + 2] = q / 1000;
    }

    private static String describe(double[] x, int offset) {
        return "T_hot_in=" + x[offset] + " K, T_cold_in=" + x[offset + 1] + " K, m_hot=" + x[offset + 2]
                + " kg/s, m_cold=" + x[offset + 3] + " kg/s, UA=" + x[offset + 4] + " W/K";
    }

    /** @return outlet temperatures (K) and the heat duty (kW) */
    @Override
    public List<ColumnGroup> outputGroups() {
        return List.of(new ColumnGroup("outlet temperatures", "K", 0, 2), new ColumnGroup("heat duty", "kW", 2, 1));
    }

    /**
     * @return for both laws (in W): 1 kW, about 0.1% of the duty of a typical demo point (common practice for the
     *         closure of a plant heat balance)
     */
    @Override
    public List<LawMark> lawMarks() {
        String label = "1 kW, about 0.1% of a typical demo duty (common practice for a heat balance)";
        return List.of(new LawMark("hot_side", 1000, label), new LawMark("cold_side", 1000, label));
    }
}
