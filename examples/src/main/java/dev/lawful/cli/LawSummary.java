package dev.lawful.cli;

import dev.lawful.algebra.Declaration;
import dev.lawful.algebra.Diagnostic;
import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.ExprPrinter;
import dev.lawful.algebra.LawSet;
import dev.lawful.algebra.ScalarLimit;
import dev.lawful.algebra.Unit;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Tier;
import dev.lawful.io.ShortestDecimal;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;

/**
 * What {@code lawful check} reports about a valid law set, gathered once for both the readable and the JSON form.
 *
 * @param file        the file name as given
 * @param inputs      the inputs in declaration order
 * @param outputs     the outputs in declaration order
 * @param constants   the constants in declaration order
 * @param definitions the definitions in declaration order
 * @param laws        the laws in declaration order
 * @param limits      the limits in declaration order
 * @param outputWidth the number of output elements
 * @param completed   the completed output elements, in the order the completion solves for them ({@code name} or
 *                    {@code name[i]}); empty when the file has no laws
 * @param free        the other output elements, in the completion's order
 * @param hasCompletion whether the file has a {@code complete} statement (without one, the completed outputs are
 *                    the automatic choice)
 * @param tier        how the laws are solved ({@link Tier#label()}), or null when the file has no laws
 * @param condition   the 2-norm condition number of the equilibrated dC/dy_completed at the completion's reference point, or NaN
 *                    when the file has no laws
 * @param completionWarnings the completion's notes (the automatic choice, ill-conditioning, missing guesses)
 * @param warnings    the checker's warnings
 */
record LawSummary(String file, List<Item> inputs, List<Item> outputs, List<Item> constants,
                  List<Definition> definitions, List<Law> laws, List<Limit> limits, int outputWidth, List<String> completed,
                  List<String> free, boolean hasCompletion, String tier, double condition,
                  List<String> completionWarnings, List<Diagnostic> warnings) {

    /**
     * A declared input, output or constant.
     *
     * @param name   its name
     * @param length its number of elements, 1 for a scalar
     * @param unit   its unit
     */
    record Item(String name, int length, Unit unit) {
    }

    /**
     * A definition ({@code let}).
     *
     * @param name       its name
     * @param length     its number of elements, 1 for a scalar
     * @param expression its value as law text
     */
    record Definition(String name, int length, String expression) {
    }

    /**
     * A declared law.
     *
     * @param name    its name
     * @param unit    the unit its residuals are reported in
     * @param length  its number of scalar equations: 1 for a scalar law, k for a vector law of length k
     * @param outputs the output elements any of its equations involves, in output order ({@code name} or
     *                {@code name[i]})
     */
    record Law(String name, Unit unit, int length, List<String> outputs) {
    }

    /**
     * A declared limit.
     *
     * @param name       its name
     * @param unit       the unit its values g are reported in
     * @param length     its number of scalar limits: 1 for a scalar one-sided limit, k for a vector limit of length
     *                   k, twice that for a two-sided one
     * @param outputs    the output elements any of its scalar limits involves, in output order
     * @param inequality the limit as law text, without its name ({@code 0 <= out <= feed})
     */
    record Limit(String name, Unit unit, int length, List<String> outputs, String inequality) {
    }

    // copy every list, so a summary never changes after it is made
    LawSummary {
        limits = List.copyOf(limits);
        inputs = List.copyOf(inputs);
        outputs = List.copyOf(outputs);
        constants = List.copyOf(constants);
        definitions = List.copyOf(definitions);
        laws = List.copyOf(laws);
        completed = List.copyOf(completed);
        free = List.copyOf(free);
        completionWarnings = List.copyOf(completionWarnings);
        warnings = List.copyOf(warnings);
    }

    /**
     * Gathers the summary of a checked law set.
     *
     * @param file       the file name to report
     * @param set        the law set read from it
     * @param completion its completion ({@link Completion#of(LawSet)}), or null when it has no laws
     * @return its summary
     */
    static LawSummary of(String file, LawSet set, Completion completion) {
        List<Item> inputs = new ArrayList<>();
        for (Declaration.Variable v : set.inputs()) {
            inputs.add(new Item(v.name(), v.size(), v.unit()));
        }
        List<Item> outputs = new ArrayList<>();
        for (Declaration.Variable v : set.outputs()) {
            outputs.add(new Item(v.name(), v.size(), v.unit()));
        }
        List<Item> constants = new ArrayList<>();
        for (Declaration.Constant c : set.constants()) {
            constants.add(new Item(c.name(), c.size(), c.unit()));
        }
        ExpandedLaws expanded = set.expand();
        List<Definition> definitions = new ArrayList<>();
        for (Declaration.Definition d : set.definitions()) {
            definitions.add(new Definition(d.name(), Math.max(1, expanded.definitionShape(d.name())),
                    ExprPrinter.print(d.expr())));
        }

        // the scalar laws of one declared law together involve the union of their output elements
        Map<String, Set<Integer>> involved = new LinkedHashMap<>();
        for (int i = 0; i < expanded.size(); i++) {
            Set<Integer> elements = involved.computeIfAbsent(expanded.law(i).name(), k -> new TreeSet<>());
            for (int k : expanded.outputs(i)) {
                elements.add(k);
            }
        }
        List<String> outputNames = set.outputNames();
        List<Law> laws = new ArrayList<>();
        for (Declaration.Law l : set.laws()) {
            List<String> names = new ArrayList<>();
            for (int k : involved.getOrDefault(l.name(), Set.of())) {
                names.add(outputNames.get(k));
            }
            laws.add(new Law(l.name(), set.lawUnit(l.name()), Math.max(1, set.lawShape(l.name())), names));
        }

        List<Limit> limits = limits(set, expanded);
        List<String> completed = completion == null ? List.of() : completion.completedNames();
        List<String> free = completion == null ? outputNames : completion.freeNames();
        return new LawSummary(file, inputs, outputs, constants, definitions, laws, limits, outputNames.size(), completed,
                free, set.completion().isPresent(), completion == null ? null : completion.tier().label(),
                completion == null ? Double.NaN : completion.condition(),
                completion == null ? List.of() : completion.warnings(), set.warnings());
    }

    private static List<Limit> limits(LawSet set, ExpandedLaws expanded) {
        Map<String, Set<Integer>> involved = new LinkedHashMap<>();
        Map<String, Integer> counts = new LinkedHashMap<>();
        for (int j = 0; j < expanded.limitCount(); j++) {
            ScalarLimit l = expanded.limit(j);
            Set<Integer> elements = involved.computeIfAbsent(l.declaration().name(), k -> new TreeSet<>());
            for (int k : l.outputs()) {
                elements.add(k);
            }
            counts.merge(l.declaration().name(), 1, Integer::sum);
        }
        List<Limit> limits = new ArrayList<>();
        for (Declaration.Limit l : set.limits()) {
            List<String> names = new ArrayList<>();
            for (int k : involved.getOrDefault(l.name(), Set.of())) {
                names.add(set.outputNames().get(k));
            }
            String text = l.text();
            limits.add(new Limit(l.name(), set.limitUnit(l.name()), counts.getOrDefault(l.name(), 0), names,
                    text.substring(text.indexOf(": ") + 2)));
        }
        return limits;
    }

    /** @return the number of scalar limits of all limits together */
    int scalarLimits() {
        return limits.stream().mapToInt(Limit::length).sum();
    }

    /** @return the number of scalar equations of all laws together */
    int equations() {
        return laws.stream().mapToInt(Law::length).sum();
    }

    /**
     * @param v a number, such as a condition number
     * @return {@code v} rounded to three significant digits, in the shortest form that reads back to that
     *         rounded value ({@code 6.35}, {@code 2660}, {@code 1}, {@code 3.16e9}); {@code infinite} for infinity
     *         and {@code -} for NaN
     */
    static String threeDigits(double v) {
        if (Double.isNaN(v)) {
            return "-";
        }
        if (Double.isInfinite(v)) {
            return v > 0 ? "infinite" : "-infinite";
        }
        return ShortestDecimal.format(Double.parseDouble(String.format(Locale.ROOT, "%.3g", v)));
    }
}
