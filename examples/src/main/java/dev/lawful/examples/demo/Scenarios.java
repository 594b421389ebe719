package dev.lawful.examples.demo;

import dev.lawful.examples.column.ColumnTruth;
import dev.lawful.examples.exchanger.ExchangerTruth;
import dev.lawful.examples.reformer.ReformerTruth;
import java.util.List;

/**
 * The worked scenarios of {@code lawful demo}, one per tier of completion. Sizes, network widths, learning rates and
 * penalty weights are demo values, chosen so that the default run of all three finishes in a few minutes on two
 * cores; they are not tuned for the best accuracy.
 */
public final class Scenarios {
    private Scenarios() {
    }

    /** Steam reformer outlet: constant-affine element balances. */
    public static Scenario reformer() {
        return new Scenario("reformer", "Steam reformer outlet: element balances (constant-affine)",
                new ReformerTruth(),
                "a surrogate of a reacting system is no basis for operating or designing plant without validation"
                        + " against trusted models and the applicable codes, and review by a licensed engineer.",
                20000, 40, new int[] {64, 64}, 128, 2e-3, 100, List.of(new Scenario.SideCheck("total mass balance",
                        "kg/s", Scenarios::reformerMass)));
    }

    /**
     * Molar masses of CH4, H2O, CO, CO2, H2, N2 in kg/mol from the standard atomic weights
     * (IUPAC CIAAW 2021 abridged values, from memory: H 1.0080, C 12.011, N 14.007, O 15.999).
     */
    private static final double[] MOLAR_MASS = {
        (12.011 + 4 * 1.0080) / 1000, (2 * 1.0080 + 15.999) / 1000, (12.011 + 15.999) / 1000,
        (12.011 + 2 * 15.999) / 1000, 2 * 1.0080 / 1000, 2 * 14.007 / 1000};

    /** Σ M_i (out_i − feed_i) in kg/s: zero to rounding when the element balances hold. */
    private static double reformerMass(double[] x, int xo, double[] y, int yo) {
        double sum = 0;
        for (int i = 0; i < 6; i++) {
            sum += MOLAR_MASS[i] * (y[yo + i] - x[xo + i]);
        }
        return sum;
    }

    /** Single-column moist atmosphere: water and energy budgets with coefficients that depend on surface pressure. */
    public static Scenario column() {
        return new Scenario("column", "Moist atmospheric column: water and energy budgets (affine)",
                new ColumnTruth(),
                "the column scheme is a simplified demonstration, not a validated parameterisation; a surrogate"
                        + " coupled to a weather or climate model needs validation against the scheme it replaces"
                        + " and the model's own budget diagnostics before any forecast use.",
                20000, 40, new int[] {128, 128}, 128, 1e-3, 100, List.of(),
                // raising a negative rain to zero dries the column (the water budget); the energy budget must then
                // take the latent heat of that condensation as warming of the layers, which is what condensing water
                // does, not as a change of the radiative fluxes, which rain does not cause: the fluxes weigh 100
                // times more in the move (each moves a tenth as far per unit of the loss's scale)
                java.util.Map.of("F_sfc", 100.0, "F_top", 100.0));
    }

    /** Counterflow heat exchanger with temperature-dependent heat capacities: the nonlinear energy balance. */
    public static Scenario exchanger() {
        return new Scenario("exchanger", "Counterflow heat exchanger: energy balances with c_p(T) (nonlinear)",
                new ExchangerTruth(),
                "the exchanger model is a demonstration; sizing or operating real equipment needs validated"
                        + " thermal models, the applicable pressure-equipment codes and licensed review.",
                20000, 40, new int[] {64, 64}, 128, 2e-3, 100, List.of());
    }

    /** @return every scenario, in tier order */
    public static List<Scenario> all() {
        return List.of(reformer(), column(), exchanger());
    }

    /** @return the scenario names, in tier order */
    public static List<String> names() {
        return List.of("reformer", "column", "exchanger");
    }

    /**
     * @param name a scenario name
     * @return the scenario, or null when there is none of that name
     */
    public static Scenario named(String name) {
        for (Scenario s : all()) {
            if (s.name().equals(name)) {
                return s;
            }
        }
        return null;
    }
}
