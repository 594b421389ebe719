package dev.lawful.examples.reformer;

import dev.lawful.examples.TruthModel;
import java.util.List;
import java.util.SplittableRandom;

/**
 * Outlet of a steam methane reformer at chemical equilibrium, the truth of the {@code reformer-outlet.law} scenario.
 *
 * <p><b>Rows.</b> Input: {@code feed[6]} (mol/s, species order CH4, H2O, CO, CO2, H2, N2), {@code T} (K),
 * {@code P} (bar). Output: {@code out[6]} (mol/s, same species order).
 *
 * <p><b>Physics.</b> Two reactions with extents ξ1, ξ2 (mol/s):
 * <pre>
 *   reforming  CH4 + H2O = CO + 3 H2      K1(T) = y_CO y_H2³ / (y_CH4 y_H2O) · (P/P°)²
 *   shift      CO  + H2O = CO2 + H2       K2(T) = y_CO2 y_H2 / (y_CO y_H2O)
 * </pre>
 * so {@code out = feed + ν1 ξ1 + ν2 ξ2} with ν1 = (−1, −1, 1, 0, 3, 0), ν2 = (0, −1, −1, 1, 1, 0), ideal gas, P° = 1 bar.
 * The equilibrium constants are the correlations of Xu and Froment (AIChE Journal 35 (1989) 88), coefficients
 * from memory: ln K1 = 30.114 − 26830 K / T (K1 in bar²), ln K2 = −4.036 + 4400 K / T.
 *
 * <p><b>Solver.</b> The two equilibrium conditions in logarithmic form are the gradient of the reduced Gibbs
 * energy G(ξ)/RT = Σ n_i ln(n_i/N) + ξ1 (2 ln(P/P°) − ln K1) − ξ2 ln K2, which is strictly convex on the open
 * set where every reacting species has a positive flow. Damped Newton starts at the mean of that polygon's
 * vertices (an interior point), never steps past 99% of the way to its boundary, and backtracks on G until the
 * residual is small, so it converges for every feed that contains carbon, hydrogen and oxygen. The outputs are
 * formed from the extents, so the element balances hold to rounding whatever the extents are.
 *
 * <p>Immutable and thread-safe; {@link #solve} allocates only a few small arrays per call.
 */
public final class ReformerTruth implements TruthModel {
    /** Index of methane in the species vectors. */
    public static final int CH4 = 0;
    /** Index of water (steam). */
    public static final int H2O = 1;
    /** Index of carbon monoxide. */
    public static final int CO = 2;
    /** Index of carbon dioxide. */
    public static final int CO2 = 3;
    /** Index of hydrogen. */
    public static final int H2 = 4;
    /** Index of nitrogen (inert). */
    public static final int N2 = 5;
    /** Number of species. */
    public static final int SPECIES = 6;

    /** Demo range of the temperature, K (demo values). */
    public static final double T_MIN = 800;
    /** @see #T_MIN */
    public static final double T_MAX = 1200;
    /** Demo range of the pressure, bar (demo values). */
    public static final double P_MIN = 1;
    /** @see #P_MIN */
    public static final double P_MAX = 30;
    /** Demo range of the steam-to-carbon ratio, mol H2O per mol CH4 in the feed (demo values). */
    public static final double STEAM_TO_CARBON_MIN = 2;
    /** @see #STEAM_TO_CARBON_MIN */
    public static final double STEAM_TO_CARBON_MAX = 5;

    /** Stoichiometric coefficients of the reforming reaction, per species. */
    static final double[] NU1 = {-1, -1, 1, 0, 3, 0};
    /** Stoichiometric coefficients of the shift reaction, per species. */
    static final double[] NU2 = {0, -1, -1, 1, 1, 0};
    /** Number of reacting species (all but the inert N2), which bound the feasible extents. */
    private static final int REACTING = 5;
    private static final int MAX_ITERATIONS = 200;

    /** Creates the scenario's truth (it has no parameters). */
    public ReformerTruth() {
    }

    /**
     * ln K1 of steam methane reforming, K1 in bar² (Xu and Froment 1989, coefficients from memory).
     *
     * @param t temperature, K
     * @return 30.114 − 26830/T
     */
    public static double lnK1(double t) {
        return 30.114 - 26830.0 / t;
    }

    /**
     * ln K2 of the water-gas shift, K2 dimensionless (Xu and Froment 1989, coefficients from memory).
     *
     * @param t temperature, K
     * @return −4.036 + 4400/T
     */
    public static double lnK2(double t) {
        return -4.036 + 4400.0 / t;
    }

    @Override
    public String lawFile() {
        return "reformer-outlet.law";
    }

    /** @return 8: feed[6] in mol/s, T in K, P in bar */
    @Override
    public int inputWidth() {
        return SPECIES + 2;
    }

    /** @return 6: out[6] in mol/s */
    @Override
    public int outputWidth() {
        return SPECIES;
    }

    /**
     * Draws a feed and operating point (all demo values): CH4 0.5–2 mol/s; steam-to-carbon 2–5; CO2 0–10% of
     * the CH4; CO zero in half the rows (a fresh feed), else 0–5% of the CH4 (a recycle); H2 1–10% of the CH4 (the
     * hydrogen usually added to keep the catalyst reduced); N2 0–5% of the CH4 (natural gas nitrogen); T 800–1200 K
     * and P 1–30 bar, uniform.
     */
    @Override
    public void sample(SplittableRandom random, double[] x, int offset) {
        double methane = 0.5 + 1.5 * random.nextDouble();
        double steamToCarbon = STEAM_TO_CARBON_MIN + (STEAM_TO_CARBON_MAX - STEAM_TO_CARBON_MIN) * random.nextDouble();
        double co = random.nextBoolean() ? 0.0 : 0.05 * methane * random.nextDouble();
        x[offset + CH4] = methane;
        x[offset + H2O] = steamToCarbon * methane;
        x[offset + CO] = co;
        x[offset + CO2] = 0.1 * methane * random.nextDouble();
        x[offset + H2] = methane * (0.01 + 0.09 * random.nextDouble());
        x[offset + N2] = 0.05 * methane * random.nextDouble();
        x[offset + SPECIES] = T_MIN + (T_MAX - T_MIN) * random.nextDouble();
        x[offset + SPECIES + 1] = P_MIN + (P_MAX - P_MIN) * random.nextDouble();
    }

    /**
     * Outlet flows at equilibrium: out_i = feed_i + ν1_i ξ1 + ν2_i ξ2 (mol/s) with the extents of
     * {@link #extents}.
     *
     * @throws IllegalArgumentException if a flow is negative or not finite, T or P is not positive, or the feed
     *         lacks carbon, hydrogen or oxygen (no equilibrium with every reacting species present)
     * @throws IllegalStateException if Newton does not converge (the message names the input)
     */
    @Override
    public void solve(double[] x, int xOffset, double[] y, int yOffset) {
        double[] xi = new double[2];
        extents(x, xOffset, xi);
        outlet(x, xOffset, xi[0], xi[1], y, yOffset);
    }

    /**
     * The equilibrium extents of reforming and shift for one input row: the root of
     * <pre>
     *   f1 = ln n_CO + 3 ln n_H2 − ln n_CH4 − ln n_H2O − 2 ln N + 2 ln(P/P°) − ln K1 = 0
     *   f2 = ln n_CO2 + ln n_H2 − ln n_CO − ln n_H2O − ln K2 = 0
     * </pre>
     * (N the total outlet flow), to |f| ≤ 1e−12, or until Newton's correction is below 1e−13 of the total feed
     * (when a nearly consumed species limits how small f can get in double precision).
     *
     * @param x       input rows (feed[6] mol/s, T K, P bar); read only
     * @param xOffset first index of the row
     * @param xi      receives ξ1 and ξ2 in mol/s (modified)
     * @throws IllegalArgumentException for an impossible input, see {@link #solve}
     * @throws IllegalStateException if Newton does not converge
     */
    public void extents(double[] x, int xOffset, double[] xi) {
        double[] feed = new double[SPECIES];
        double scale = 0;
        for (int i = 0; i < SPECIES; i++) {
            feed[i] = x[xOffset + i];
            if (!(feed[i] >= 0) || feed[i] == Double.POSITIVE_INFINITY) {
                throw new IllegalArgumentException("feed flows must be finite and not negative, found "
                        + describe(x, xOffset));
            }
            scale += feed[i];
        }
        double t = x[xOffset + SPECIES];
        double p = x[xOffset + SPECIES + 1];
        if (!(t > 0 && p > 0) || Double.isInfinite(t) || Double.isInfinite(p)) {
            throw new IllegalArgumentException("T and P must be positive and finite, found " + describe(x, xOffset));
        }
        interiorStart(feed, scale, xi, x, xOffset);
        double a1 = 2 * Math.log(p) - lnK1(t);
        double a2 = -lnK2(t);
        double x1 = xi[0];
        double x2 = xi[1];
        double[] n = new double[SPECIES];
        for (int iteration = 0; iteration < MAX_ITERATIONS; iteration++) {
            flows(feed, x1, x2, n);
            double total = n[CH4] + n[H2O] + n[CO] + n[CO2] + n[H2] + n[N2];
            double lnTotal = Math.log(total);
            double f1 = Math.log(n[CO]) + 3 * Math.log(n[H2]) - Math.log(n[CH4]) - Math.log(n[H2O]) - 2 * lnTotal + a1;
            double f2 = Math.log(n[CO2]) + Math.log(n[H2]) - Math.log(n[CO]) - Math.log(n[H2O]) + a2;
            double fMax = Math.max(Math.abs(f1), Math.abs(f2));
            if (fMax <= 1e-12) {
                xi[0] = x1;
                xi[1] = x2;
                return;
            }
            // Hessian of G/RT: Σ ν_r ν_s / n_i − Δν_r Δν_s / N, with Δν = (2, 0)
            double h11 = -4 / total;
            double h12 = 0;
            double h22 = 0;
            for (int i = 0; i < REACTING; i++) {
                h11 += NU1[i] * NU1[i] / n[i];
                h12 += NU1[i] * NU2[i] / n[i];
                h22 += NU2[i] * NU2[i] / n[i];
            }
            double det = h11 * h22 - h12 * h12;
            double d1 = -(h22 * f1 - h12 * f2) / det;
            double d2 = -(h11 * f2 - h12 * f1) / det;
            if (!(Double.isFinite(d1) && Double.isFinite(d2))) {
                break;
            }
            if (fMax <= 1e-6 && Math.max(Math.abs(d1), Math.abs(d2)) <= 1e-13 * scale) {
                // the remaining correction is below the rounding of the flows: a species near zero (methane at
                // high T) carries a relative error of ulp(feed)/n in its logarithm, which bounds |f| from below
                xi[0] = x1;
                xi[1] = x2;
                return;
            }
            // never go more than 99% of the way to the nearest zero flow
            double step = 1;
            for (int i = 0; i < REACTING; i++) {
                double dn = NU1[i] * d1 + NU2[i] * d2;
                if (dn < 0) {
                    step = Math.min(step, -0.99 * n[i] / dn);
                }
            }
            if (fMax > 1e-3) {
                // far from the root: backtrack on the Gibbs energy, whose descent Newton's direction is (closer in,
                // the changes of G are at its rounding level and plain Newton converges quadratically)
                double g0 = gibbs(feed, x1, x2, a1, a2, n);
                double slope = f1 * d1 + f2 * d2;
                while (step > 1e-30 && gibbs(feed, x1 + step * d1, x2 + step * d2, a1, a2, n) > g0 + 1e-4 * step * slope) {
                    step *= 0.5;
                }
            }
            double next1 = x1 + step * d1;
            double next2 = x2 + step * d2;
            if (next1 == x1 && next2 == x2) {
                // no representable progress: accept if the residual is at the rounding level of the logarithms
                if (fMax <= 1e-10) {
                    xi[0] = x1;
                    xi[1] = x2;
                    return;
                }
                break;
            }
            x1 = next1;
            x2 = next2;
        }
        throw new IllegalStateException("reformer equilibrium did not converge for input " + describe(x, xOffset));
    }

    /** Outlet flows for given extents: out_i = feed_i + ν1_i ξ1 + ν2_i ξ2. */
    static void outlet(double[] x, int xOffset, double x1, double x2, double[] y, int yOffset) {
        y[yOffset + CH4] = x[xOffset + CH4] - x1;
        y[yOffset + H2O] = x[xOffset + H2O] - x1 - x2;
        y[yOffset + CO] = x[xOffset + CO] + x1 - x2;
        y[yOffset + CO2] = x[xOffset + CO2] + x2;
        y[yOffset + H2] = x[xOffset + H2] + 3 * x1 + x2;
        y[yOffset + N2] = x[xOffset + N2];
    }

    private static void flows(double[] feed, double x1, double x2, double[] n) {
        outlet(feed, 0, x1, x2, n, 0);
    }

    /** G/RT at the given extents, or +∞ outside the feasible region; n is scratch. */
    private static double gibbs(double[] feed, double x1, double x2, double a1, double a2, double[] n) {
        flows(feed, x1, x2, n);
        double total = 0;
        for (int i = 0; i < SPECIES; i++) {
            if (i < REACTING && !(n[i] > 0)) {
                return Double.POSITIVE_INFINITY;
            }
            total += n[i];
        }
        double g = x1 * a1 + x2 * a2;
        for (int i = 0; i < SPECIES; i++) {
            if (n[i] > 0) {
                g += n[i] * Math.log(n[i] / total);
            }
        }
        return g;
    }

    /**
     * An interior point of the feasible extents: the mean of the vertices of the polygon {n_i(ξ) ≥ 0} of the
     * reacting species (it is bounded: carbon, hydrogen and oxygen bound every direction).
     */
    private static void interiorStart(double[] feed, double scale, double[] xi, double[] x, int xOffset) {
        double sum1 = 0;
        double sum2 = 0;
        int vertices = 0;
        double tolerance = 1e-12 * scale;
        for (int i = 0; i < REACTING; i++) {
            for (int j = i + 1; j < REACTING; j++) {
                // n_i = n_j = 0: NU1_i ξ1 + NU2_i ξ2 = −feed_i
                double det = NU1[i] * NU2[j] - NU1[j] * NU2[i];
                if (det == 0) {
                    continue;
                }
                double v1 = (-feed[i] * NU2[j] + feed[j] * NU2[i]) / det;
                double v2 = (-feed[j] * NU1[i] + feed[i] * NU1[j]) / det;
                boolean inside = true;
                for (int k = 0; k < REACTING && inside; k++) {
                    inside = feed[k] + NU1[k] * v1 + NU2[k] * v2 >= -tolerance;
                }
                if (inside) {
                    sum1 += v1;
                    sum2 += v2;
                    vertices++;
                }
            }
        }
        double x1 = vertices == 0 ? 0 : sum1 / vertices;
        double x2 = vertices == 0 ? 0 : sum2 / vertices;
        for (int k = 0; k < REACTING; k++) {
            if (!(feed[k] + NU1[k] * x1 + NU2[k] * x2 > 0)) {
                throw new IllegalArgumentException("the feed must contain carbon, hydrogen and oxygen so that every"
                        + " reacting species is present at equilibrium, found " + describe(x, xOffset));
            }
        }
        xi[0] = x1;
        xi[1] = x2;
    }

    private static String describe(double[] x, int offset) {
        StringBuilder s = new StringBuilder("feed=[");
        for (int i = 0; i < SPECIES; i++) {
            s.append(i == 0 ? "" : ", ").append(x[offset + i]);
        }
        return s.append("] mol/s, T=").append(x[offset + SPECIES]).append(" K, P=").append(x[offset + SPECIES + 1])
                .append(" bar").toString();
    }

    /** @return one group, the outlet flows out[0..5] in mol/s */
    @Override
    public List<ColumnGroup> outputGroups() {
        return List.of(new ColumnGroup("outlet molar flows", "mol/s", 0, SPECIES));
    }

    /**
     * @return for carbon, hydrogen, oxygen and nitrogen (in mol/s of atoms): 1e−6 of a typical carbon feed of
     *         1.25 mol/s (the middle of the demo CH4 range), the size of an analyser's ppm-level error
     */
    @Override
    public List<LawMark> lawMarks() {
        double mark = 1.25e-6;
        String label = "1 ppm of the typical carbon feed (1.25 mol/s)";
        return List.of(new LawMark("carbon", mark, label), new LawMark("hydrogen", mark, label),
                new LawMark("oxygen", mark, label), new LawMark("nitrogen", mark, label));
    }
}
