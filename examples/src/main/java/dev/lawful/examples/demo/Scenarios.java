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
        return new Scenario("reformer", "Steam reformer outlet: C, H, O and N element balances (constant-affine)",
                new ReformerTruth(),
                "a surrogate of a reacting system is no basis for operating or designing plant without validation"
                        + " against trusted models and the applicable codes, and review by a licensed engineer.",
                20000, 40, new int[] {64, 64}, 128, 2e-3, 100);
    }

    /** Single-column moist atmosphere: water and energy budgets with coefficients that depend on surface pressure. */
    public static Scenario column() {
        return new Scenario("column", "Single-column moist atmosphere: column water and energy budgets (affine)",
                new ColumnTruth(),
                "the column scheme is a simplified demonstration, not a validated parameterisation; a surrogate"
                        + " coupled to a weather or climate model needs validation against the scheme it replaces"
                        + " and the model's own budget diagnostics before any forecast use.",
                20000, 40, new int[] {128, 128}, 128, 1e-3, 100);
    }

    /** Counterflow heat exchanger with temperature-dependent heat capacities: the nonlinear energy balance. */
    public static Scenario exchanger() {
        return new Scenario("exchanger", "Counterflow heat exchanger: energy balance with c_p(T) (nonlinear)",
                new ExchangerTruth(),
                "the exchanger model is a demonstration; sizing or operating real equipment needs validated"
                        + " thermal models, the applicable pressure-equipment codes and licensed review.",
                20000, 40, new int[] {64, 64}, 128, 2e-3, 100);
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
