package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.List;

/**
 * Assembles a law set in Java, statement by statement, with expressions written in the law language. The builder
 * writes each call as one line of law text and checks the whole with the same parser and checker as a file, so
 * a builder and a file with the same statements give equal law sets, and errors point at the line the call
 * made (source name {@code <builder>}).
 *
 * <pre>{@code
 * LawSet laws = LawSet.builder()
 *     .input("feed", 6, "mol/s")
 *     .output("out", 6, "mol/s")
 *     .constant("C", new double[] {1, 0, 1, 1, 0, 0}, "")
 *     .law("carbon", "sum(C * out) = sum(C * feed)")
 *     .limitBetween("share", "0", "out", "feed")
 *     .complete("out[0]")
 *     .build();
 * }</pre>
 */
public final class LawSetBuilder {
    private final List<String> lines = new ArrayList<>();
    private final List<String> problems = new ArrayList<>();

    LawSetBuilder() {
    }

    /** Declares a scalar input in {@code unit} ("" for a pure number). */
    public LawSetBuilder input(String name, String unit) {
        return add("input " + name + unitSuffix(unit), name, unit);
    }

    /** Declares an input vector of {@code length} elements in {@code unit}. */
    public LawSetBuilder input(String name, int length, String unit) {
        return add("input " + name + "[" + length + "]" + unitSuffix(unit), name, unit);
    }

    /** Declares a scalar output in {@code unit}. */
    public LawSetBuilder output(String name, String unit) {
        return add("output " + name + unitSuffix(unit), name, unit);
    }

    /** Declares an output vector of {@code length} elements in {@code unit}. */
    public LawSetBuilder output(String name, int length, String unit) {
        return add("output " + name + "[" + length + "]" + unitSuffix(unit), name, unit);
    }

    /** Declares a scalar constant in {@code unit}; the value must be finite. */
    public LawSetBuilder constant(String name, double value, String unit) {
        return add("const " + name + " = " + literal(value) + unitSuffix(unit), name, unit);
    }

    /** Declares a constant vector in {@code unit}; every value must be finite. */
    public LawSetBuilder constant(String name, double[] values, String unit) {
        StringBuilder sb = new StringBuilder("const ").append(name).append(" = [");
        for (int i = 0; i < values.length; i++) {
            sb.append(i > 0 ? ", " : "").append(literal(values[i]));
        }
        return add(sb.append(']').append(unitSuffix(unit)).toString(), name, unit);
    }

    /** Declares a definition {@code let name = expression}. */
    public LawSetBuilder define(String name, String expression) {
        return add("let " + name + " = " + expression, name, expression);
    }

    /** Declares a law from one equation {@code "lhs = rhs"}. */
    public LawSetBuilder law(String name, String equation) {
        return add("law " + name + ": " + equation, name, equation);
    }

    /** Declares a law {@code lhs = rhs}. */
    public LawSetBuilder law(String name, String lhs, String rhs) {
        return add("law " + name + ": " + lhs + " = " + rhs, name, lhs + rhs);
    }

    /** Declares a limit from one inequality: {@code "P >= 0"}, {@code "T <= T_max"} or {@code "0 <= x <= cap"}. */
    public LawSetBuilder limit(String name, String inequality) {
        return add("limit " + name + ": " + inequality, name, inequality);
    }

    /**
     * Declares a limit {@code left relation right}.
     *
     * @param relation {@code "<="} or {@code ">="}; anything else is an error of {@link #build()}
     */
    public LawSetBuilder limit(String name, String left, String relation, String right) {
        if (!relation.equals("<=") && !relation.equals(">=")) {
            problems.add((lines.size() + 1) + ":a limit's relation is '<=' or '>=', found '" + relation + "'");
        }
        return add("limit " + name + ": " + left + " " + relation + " " + right, name, left, relation, right);
    }

    /** Declares a two-sided limit {@code low <= expression <= high}. */
    public LawSetBuilder limitBetween(String name, String low, String expression, String high) {
        return add("limit " + name + ": " + low + " <= " + expression + " <= " + high, name, low, expression, high);
    }

    /** Names the completed outputs: whole outputs, elements {@code out[2]} or slices {@code out[0:3]}. */
    public LawSetBuilder complete(String... targets) {
        return add("complete " + String.join(", ", targets), String.join("", targets), "");
    }

    /**
     * @return the checked law set
     * @throws LawException with every error, positioned in the text the builder wrote
     */
    public LawSet build() {
        StringBuilder text = new StringBuilder();
        for (String line : lines) {
            text.append(line).append('\n');
        }
        if (!problems.isEmpty()) {
            SourceText source = new SourceText("<builder>", text.toString());
            Diagnostics d = new Diagnostics(source);
            for (String p : problems) {
                int line = Integer.parseInt(p.substring(0, p.indexOf(':')));
                int offset = 0;
                for (int i = 1; i < line; i++) {
                    offset = text.indexOf("\n", offset) + 1;
                }
                d.error(new Span(offset, lines.get(line - 1).length()), p.substring(p.indexOf(':') + 1));
            }
            d.throwIfErrors();
        }
        return LawSet.parse("<builder>", text.toString());
    }

    private LawSetBuilder add(String line, String... parts) {
        for (String part : parts) {
            if (part.indexOf('\n') >= 0 || part.indexOf('\r') >= 0 || part.indexOf('#') >= 0) {
                problems.add((lines.size() + 1) + ":a builder argument may not hold a line break or '#'");
                line = line.replace('\n', ' ').replace('\r', ' ').replace('#', ' ');
                break;
            }
        }
        lines.add(line);
        return this;
    }

    private String literal(double v) {
        if (!Double.isFinite(v)) {
            problems.add((lines.size() + 1) + ":a constant must be finite, found " + v);
            return "0";
        }
        return ExprPrinter.number(v);
    }

    private static String unitSuffix(String unit) {
        return unit == null || unit.isBlank() ? "" : " " + unit;
    }
}
