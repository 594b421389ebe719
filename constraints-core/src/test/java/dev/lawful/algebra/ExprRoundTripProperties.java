package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;

import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.function.Consumer;
import java.util.stream.Collectors;

import org.junit.jupiter.api.Test;

/**
 * Printing and parsing are inverse: an expression tree printed with {@link ExprPrinter#print(Expr)} parses back to
 * an equal tree, and a law set printed with {@link LawSet#toString()} parses back to an equal law set, which is
 * also what {@link LawSet#builder()} makes from the same statements.
 *
 * <p>Each property runs a fixed number of seeded trials through {@link Trials}; a failure reports the seed that
 * reproduces it and the printed input. Unlike the property-testing library these tests first used, nothing shrinks
 * a failing tree or law set to a smallest one, and the seeds are fixed, so every run checks the same inputs.
 */
class ExprRoundTripProperties {

    // ---- syntax level: any tree over a fixed scope ------------------------------------------------------------

    private static final List<String> SCALAR_NAMES = List.of("a", "b", "y", "T_0", "k2");
    private static final List<String> VECTOR_NAMES = List.of("v", "w", "out", "C");
    private static final List<Expr.Op> OPS = List.of(Expr.Op.values());
    private static final List<String> CALLEES;

    static {
        List<String> callees = new ArrayList<>(List.of("sum", "dot", "pow"));
        for (Function f : Function.values()) {
            callees.add(f.spelling());
        }
        CALLEES = List.copyOf(callees);
    }

    /**
     * Any well-formed tree (not necessarily type-correct: the parser does not check shapes or units), so every
     * record and every operator meets every other as a neighbour.
     */
    @Test
    void printedTreeParsesBackToAnEqualTree() {
        Trials.run("printedTreeParsesBackToAnEqualTree", 0x7EE5_0001L, 600, r -> {
            Expr tree = tree(r, 5);
            String text = ExprPrinter.print(tree);
            Expr parsed = parseExpression(text);
            assertEquals(tree, parsed, () -> "printed as: " + text);
            assertEquals(text, ExprPrinter.print(parsed), "printing is a fixpoint after one round trip");
        });
    }

    /** Every finite non-negative double survives the trip through its printed form. */
    @Test
    void literalsParseBackToTheSameDouble() {
        Trials.run("literalsParseBackToTheSameDouble", 0x7EE5_0002L, 400, r -> {
            double value = literal(r);
            Expr parsed = parseExpression(ExprPrinter.print(new Expr.Num(value)));
            assertEquals(new Expr.Num(value), parsed, () -> "printed as: " + ExprPrinter.number(value));
            assertEquals(Double.doubleToRawLongBits(value), Double.doubleToRawLongBits(((Expr.Num) parsed).value()),
                    () -> "value " + value + " printed as: " + ExprPrinter.number(value));
        });
    }

    /** @return a tree no deeper than {@code depth} operators above its leaves */
    private static Expr tree(SplittableRandom r, int depth) {
        if (depth == 0) {
            return leaf(r);
        }
        switch (Trials.weighted(r, 4, 2, 5, 2, 1)) {
            case 0:
                return leaf(r);
            case 1:
                return new Expr.Neg(tree(r, depth - 1));
            case 2:
                return new Expr.Binary(Trials.pick(r, OPS), tree(r, depth - 1), tree(r, depth - 1));
            case 3:
                return new Expr.Call(Trials.pick(r, CALLEES), trees(r, depth - 1, 0, 3));
            default:
                return new Expr.Vector(trees(r, depth - 1, 1, 4));
        }
    }

    /** @return {@code min} to {@code max} trees, each no deeper than {@code depth} */
    private static List<Expr> trees(SplittableRandom r, int depth, int min, int max) {
        int n = min + r.nextInt(max - min + 1);
        List<Expr> list = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            list.add(tree(r, depth));
        }
        return list;
    }

    private static Expr leaf(SplittableRandom r) {
        switch (Trials.weighted(r, 3, 3, 1, 2, 1)) {
            case 0:
                return new Expr.Num(literal(r));
            case 1:
                return new Expr.Name(Trials.pick(r, SCALAR_NAMES));
            case 2:
                return new Expr.Name(Trials.pick(r, VECTOR_NAMES));
            case 3:
                return new Expr.Index(Trials.pick(r, VECTOR_NAMES), Trials.between(r, 0, Limits.MAX_VECTOR_LENGTH - 1));
            default: {
                String name = Trials.pick(r, VECTOR_NAMES);
                int from = Trials.between(r, 0, Limits.MAX_VECTOR_LENGTH - 1);
                int len = Trials.between(r, 1, 50);
                return new Expr.Slice(name, from, Math.min(Limits.MAX_VECTOR_LENGTH, from + len));
            }
        }
    }

    private static final List<Double> SPECIAL_LITERALS = List.of(0.0, Double.MIN_VALUE, Double.MIN_NORMAL,
            Double.MAX_VALUE, 1e15, 1e15 - 1, 1e15 + 2, 999999999999999.9, 0.1, 1e-5, 6.02214076e23, 1.602176634e-19,
            4.9e-324, 1e308, 9007199254740993.0, 123456789.125, 2.5e-7, Math.PI, Math.E);

    /**
     * Non-negative finite doubles: small integers, decimals with six places, random bit patterns (subnormals
     * included), powers of ten across the whole range (tiny to huge) and hand-picked edges.
     */
    private static double literal(SplittableRandom r) {
        switch (Trials.weighted(r, 3, 2, 3, 1, 2)) {
            case 0:
                return Trials.between(r, 0, 1000);
            case 1: // 0 to 1e6 in steps of 1e-6
                return BigDecimal.valueOf(Trials.between(r, 0L, 1_000_000_000_000L), 6).doubleValue();
            case 2:
                while (true) {
                    double d = Double.longBitsToDouble(r.nextLong() & Long.MAX_VALUE);
                    if (Double.isFinite(d)) {
                        return d;
                    }
                }
            case 3:
                while (true) {
                    double d = StrictMath.pow(10, Trials.between(r, -323, 308));
                    if (d > 0 && Double.isFinite(d)) {
                        return d;
                    }
                }
            default:
                return Trials.pick(r, SPECIAL_LITERALS);
        }
    }

    /** Parses {@code text} as the expression of one definition, with the parser alone (no scope or unit checks). */
    private static Expr parseExpression(String text) {
        Diagnostics diagnostics = new Diagnostics(new SourceText("<tree>", "let e_ = " + text + "\n"));
        Parser.Result result = new Parser(diagnostics).parseFile();
        assertFalse(diagnostics.hasErrors(), () -> "text: " + text + "\n" + diagnostics.all());
        assertEquals(1, result.declarations().size(), () -> "text: " + text);
        return assertInstanceOf(Declaration.Definition.class, result.declarations().get(0)).expr();
    }

    // ---- law set level: random but type-correct law sets ------------------------------------------------------

    /**
     * A law set is printed, parsed again and compared; the parsed expressions are compared with the generated
     * trees; and a builder fed the same statements gives an equal law set (when it can express them all: it has
     * no call for {@code guess}).
     */
    @Test
    void lawSetPrintsAndBuildsToAnEqualLawSet() {
        Trials.run("lawSetPrintsAndBuildsToAnEqualLawSet", 0x7EE5_0003L, 250,
                r -> lawSetPrintsAndBuildsToAnEqualLawSet(new LawGenerator(r).generate()));
    }

    private static void lawSetPrintsAndBuildsToAnEqualLawSet(Spec spec) {
        String text = spec.text();
        LawSet parsed = LawSet.parse("<generated>", text);
        assertEquals(spec.expected.size(), parsed.declarations().size(), text);
        for (int i = 0; i < spec.expected.size(); i++) {
            assertSameDeclaration(spec.expected.get(i), parsed.declarations().get(i), text);
        }

        String printed = parsed.toString();
        LawSet again = LawSet.parse("<printed>", printed);
        assertEquals(parsed, again, () -> "generated:\n" + text + "printed:\n" + printed);
        assertEquals(parsed.hashCode(), again.hashCode());
        assertEquals(printed, again.toString(), "printing is a fixpoint after one round trip");
        assertEquals(parsed, LawSet.of(parsed.declarations()));

        if (!spec.hasGuess) {
            LawSetBuilder builder = LawSet.builder();
            for (Stmt s : spec.statements) {
                s.build().accept(builder);
            }
            LawSet built = builder.build();
            assertEquals(parsed, built, () -> "generated:\n" + text + "built:\n" + built);
        }
    }

    /** The parsed declaration has the names, shapes, values, units and expression trees that were generated. */
    private static void assertSameDeclaration(Expected want, Declaration got, String text) {
        assertEquals(want.kind, got.getClass(), text);
        if (got instanceof Declaration.Variable v) {
            assertEquals(want.name, v.name(), text);
            assertEquals(want.role, v.role(), text);
            assertEquals(want.vector, v.vector(), text);
            assertEquals(want.size, v.size(), text);
            assertEquals(UnitParser.normalise(want.unit), v.unit().text(), text);
        } else if (got instanceof Declaration.Constant c) {
            assertEquals(want.name, c.name(), text);
            assertEquals(want.vector, c.vector(), text);
            assertEquals(want.values, c.values(), text);
            assertEquals(UnitParser.normalise(want.unit), c.unit().text(), text);
        } else if (got instanceof Declaration.Definition d) {
            assertEquals(want.name, d.name(), text);
            assertEquals(want.exprs.get(0), d.expr(), text);
        } else if (got instanceof Declaration.Law l) {
            assertEquals(want.name, l.name(), text);
            assertEquals(want.exprs.get(0), l.lhs(), text);
            assertEquals(want.exprs.get(1), l.rhs(), text);
        } else if (got instanceof Declaration.Completion c) {
            assertEquals(want.exprs, c.targets(), text);
        } else if (got instanceof Declaration.Guess g) {
            assertEquals(want.exprs.get(0), g.target(), text);
            assertEquals(want.exprs.get(1), g.value(), text);
        }
    }

    /** One statement as law text and as the matching builder call. */
    record Stmt(String line, Consumer<LawSetBuilder> build) {
    }

    /** What one statement should parse to. */
    static final class Expected {
        Class<?> kind;
        String name;
        Declaration.Role role;
        boolean vector;
        int size;
        String unit = "";
        List<Double> values = List.of();
        List<Expr> exprs = List.of();
    }

    /** A generated law set: its statements and what each should parse to. */
    static final class Spec {
        final List<Stmt> statements = new ArrayList<>();
        final List<Expected> expected = new ArrayList<>();
        boolean hasGuess;

        String text() {
            return statements.stream().map(s -> s.line() + "\n").collect(Collectors.joining());
        }

        @Override
        public String toString() {
            return text();
        }
    }

    /**
     * Generates type-correct law sets: every declaration is dimensionless (possibly in a dimensionless unit such as
     * rad or m/km), and expressions are generated for a requested shape, so vector lengths always agree.
     */
    static final class LawGenerator {
        /** Units of dimension one, so any combination of declared values is consistent. */
        private static final List<String> UNITS = List.of("", "", "", "1", "rad", "sr", "m/km", "mol/kmol", "J/kJ",
                "kg  /  g", "mm/m");

        private final SplittableRandom r;
        private final Spec spec = new Spec();
        /** name to shape (0 scalar, otherwise length) of every declared value */
        private final Map<String, Integer> symbols = new LinkedHashMap<>();
        private final List<String> outputNames = new ArrayList<>();
        private final Map<String, Integer> outputShapes = new LinkedHashMap<>();
        private int counter;

        LawGenerator(SplittableRandom r) {
            this.r = r;
        }

        Spec generate() {
            int inputs = 1 + r.nextInt(4);
            for (int i = 0; i < inputs; i++) {
                variable(Declaration.Role.INPUT);
            }
            int outputs = 1 + r.nextInt(3);
            for (int i = 0; i < outputs; i++) {
                variable(Declaration.Role.OUTPUT);
            }
            int constants = r.nextInt(4);
            for (int i = 0; i < constants; i++) {
                constant();
            }
            int definitions = r.nextInt(4);
            for (int i = 0; i < definitions; i++) {
                definition();
            }
            int laws = 1 + r.nextInt(4);
            for (int i = 0; i < laws; i++) {
                law();
            }
            if (r.nextBoolean()) {
                completion();
            }
            if (r.nextInt(3) == 0) {
                guesses();
            }
            return spec;
        }

        private String name() {
            String first = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ_";
            String rest = first + "0123456789";
            StringBuilder sb = new StringBuilder();
            sb.append(first.charAt(r.nextInt(first.length())));
            int len = r.nextInt(6);
            for (int i = 0; i < len; i++) {
                sb.append(rest.charAt(r.nextInt(rest.length())));
            }
            // the suffix keeps names unique and never a keyword or function name (none holds '_' then digits)
            return sb.append('_').append(counter++).toString();
        }

        private void variable(Declaration.Role role) {
            String name = name();
            boolean vector = r.nextBoolean();
            int size = vector ? 1 + r.nextInt(5) : 1;
            String unit = UNITS.get(r.nextInt(UNITS.size()));
            boolean in = role == Declaration.Role.INPUT;
            String line = role.keyword() + " " + name + (vector ? "[" + size + "]" : "") + (unit.isEmpty() ? "" : " "
                    + unit);
            Consumer<LawSetBuilder> build = vector
                    ? (in ? b -> b.input(name, size, unit) : b -> b.output(name, size, unit))
                    : (in ? b -> b.input(name, unit) : b -> b.output(name, unit));
            spec.statements.add(new Stmt(line, build));
            Expected e = new Expected();
            e.kind = Declaration.Variable.class;
            e.name = name;
            e.role = role;
            e.vector = vector;
            e.size = size;
            e.unit = unit;
            spec.expected.add(e);
            symbols.put(name, vector ? size : 0);
            if (!in) {
                outputNames.add(name);
                outputShapes.put(name, vector ? size : 0);
            }
        }

        private double signedValue() {
            double v;
            switch (r.nextInt(5)) {
                case 0:
                    v = r.nextInt(100);
                    break;
                case 1:
                    v = r.nextDouble();
                    break;
                case 2:
                    v = Double.longBitsToDouble(r.nextLong() & Long.MAX_VALUE);
                    if (!Double.isFinite(v)) {
                        v = Double.MAX_VALUE;
                    }
                    break;
                case 3:
                    v = StrictMath.pow(10, r.nextInt(600) - 300);
                    break;
                default:
                    v = List.of(0.0, 1e15, Double.MIN_VALUE, 0.1, 1e-5).get(r.nextInt(5));
            }
            return r.nextBoolean() ? -v : v;
        }

        private void constant() {
            String name = name();
            boolean vector = r.nextBoolean();
            int size = vector ? 1 + r.nextInt(5) : 1;
            double[] values = new double[size];
            for (int i = 0; i < size; i++) {
                values[i] = signedValue();
            }
            String unit = UNITS.get(r.nextInt(UNITS.size()));
            String literal = vector
                    ? java.util.Arrays.stream(values).mapToObj(ExprPrinter::number).collect(
                            Collectors.joining(", ", "[", "]"))
                    : ExprPrinter.number(values[0]);
            String line = "const " + name + " = " + literal + (unit.isEmpty() ? "" : " " + unit);
            Consumer<LawSetBuilder> build = vector ? b -> b.constant(name, values.clone(), unit)
                    : b -> b.constant(name, values[0], unit);
            spec.statements.add(new Stmt(line, build));
            Expected e = new Expected();
            e.kind = Declaration.Constant.class;
            e.name = name;
            e.vector = vector;
            e.size = size;
            e.unit = unit;
            e.values = java.util.Arrays.stream(values).boxed().collect(Collectors.toList());
            spec.expected.add(e);
            symbols.put(name, vector ? size : 0);
        }

        private int anyShape() {
            return r.nextInt(3) == 0 ? 0 : 1 + r.nextInt(5);
        }

        private void definition() {
            String name = name();
            int shape = anyShape();
            Expr e = expr(shape, 1 + r.nextInt(4));
            String text = ExprPrinter.print(e);
            spec.statements.add(new Stmt("let " + name + " = " + text, b -> b.define(name, text)));
            Expected x = new Expected();
            x.kind = Declaration.Definition.class;
            x.name = name;
            x.exprs = List.of(e);
            spec.expected.add(x);
            symbols.put(name, shape);
        }

        private void law() {
            String name = name();
            int shape = anyShape();
            Expr lhs = expr(shape, 1 + r.nextInt(4));
            Expr rhs = expr(r.nextInt(4) == 0 ? 0 : shape, 1 + r.nextInt(4));
            // a law must still involve an output once simplified (0 * y or y^0 would not): an added output
            // reference always survives, since sums keep every non-constant term
            lhs = r.nextBoolean() ? new Expr.Binary(Expr.Op.ADD, lhs, outputScalar())
                    : new Expr.Binary(Expr.Op.ADD, outputScalar(), lhs);
            String l = ExprPrinter.print(lhs);
            String rt = ExprPrinter.print(rhs);
            Consumer<LawSetBuilder> build = r.nextBoolean() ? b -> b.law(name, l, rt)
                    : b -> b.law(name, l + " = " + rt);
            spec.statements.add(new Stmt("law " + name + ": " + l + " = " + rt, build));
            Expected x = new Expected();
            x.kind = Declaration.Law.class;
            x.name = name;
            x.exprs = List.of(lhs, rhs);
            spec.expected.add(x);
        }

        private void completion() {
            List<String> chosen = new ArrayList<>(outputNames);
            Trials.shuffle(r, chosen);
            chosen = chosen.subList(0, 1 + r.nextInt(chosen.size()));
            List<Expr> targets = new ArrayList<>();
            for (String o : chosen) {
                int shape = outputShapes.get(o);
                int pick = shape == 0 ? 0 : r.nextInt(3);
                if (pick == 0) {
                    targets.add(new Expr.Name(o));
                } else if (pick == 1) {
                    targets.add(new Expr.Index(o, r.nextInt(shape)));
                } else {
                    int from = r.nextInt(shape);
                    targets.add(new Expr.Slice(o, from, from + 1 + r.nextInt(shape - from)));
                }
            }
            String[] printed = targets.stream().map(ExprPrinter::print).toArray(String[]::new);
            spec.statements.add(new Stmt("complete " + String.join(", ", printed), b -> b.complete(printed)));
            Expected x = new Expected();
            x.kind = Declaration.Completion.class;
            x.exprs = targets;
            spec.expected.add(x);
        }

        /**
         * One or two {@code guess} statements for distinct outputs (the builder has no call for them); their values
         * use no outputs, since a guess is a starting value for outputs yet to be computed.
         */
        private void guesses() {
            Map<String, Integer> all = new LinkedHashMap<>(symbols);
            symbols.keySet().removeAll(outputNames);
            List<String> chosen = new ArrayList<>(outputNames);
            Trials.shuffle(r, chosen);
            for (String o : chosen.subList(0, Math.min(chosen.size(), 1 + r.nextInt(2)))) {
                int shape = outputShapes.get(o);
                Expr target = shape == 0 || r.nextBoolean() ? new Expr.Name(o) : new Expr.Index(o, r.nextInt(shape));
                int targetShape = target instanceof Expr.Name ? shape : 0;
                Expr value = expr(targetShape != 0 && r.nextBoolean() ? targetShape : 0, 1 + r.nextInt(3));
                String line = "guess " + ExprPrinter.print(target) + " = " + ExprPrinter.print(value);
                spec.statements.add(new Stmt(line, null));
                spec.hasGuess = true;
                Expected x = new Expected();
                x.kind = Declaration.Guess.class;
                x.exprs = List.of(target, value);
                spec.expected.add(x);
            }
            symbols.putAll(all);
        }

        /** @return a scalar reference to some output: a scalar output or one element of a vector output */
        private Expr outputScalar() {
            String o = outputNames.get(r.nextInt(outputNames.size()));
            int shape = outputShapes.get(o);
            return shape == 0 ? new Expr.Name(o) : new Expr.Index(o, r.nextInt(shape));
        }

        /** @return a random expression of {@code shape} (0 for a scalar) no deeper than {@code depth} operators */
        private Expr expr(int shape, int depth) {
            if (depth <= 0 || r.nextInt(4) == 0) {
                return leaf(shape);
            }
            int d = depth - 1;
            switch (r.nextInt(shape == 0 ? 8 : 6)) {
                case 0:
                    return new Expr.Neg(expr(shape, d));
                case 1:
                case 2: {
                    Expr.Op op = Expr.Op.values()[r.nextInt(Expr.Op.values().length)];
                    // broadcasting: one side of a vector operation may be a scalar
                    int left = shape != 0 && r.nextInt(4) == 0 ? 0 : shape;
                    int right = left == 0 ? shape : r.nextInt(4) == 0 ? 0 : shape;
                    return new Expr.Binary(op, expr(left, d), expr(right, d));
                }
                case 3: {
                    Function f = Function.values()[r.nextInt(Function.values().length)];
                    return new Expr.Call(f.spelling(), List.of(expr(shape, d)));
                }
                case 4: {
                    int base = shape != 0 && r.nextBoolean() ? 0 : shape;
                    int exponent = base == 0 ? shape : r.nextBoolean() ? 0 : shape;
                    return new Expr.Call("pow", List.of(expr(base, d), expr(exponent, d)));
                }
                case 5: {
                    if (shape == 0) {
                        return new Expr.Call("sum", List.of(expr(anyShape(), d)));
                    }
                    List<Expr> elements = new ArrayList<>();
                    for (int i = 0; i < shape; i++) {
                        elements.add(expr(0, d));
                    }
                    return new Expr.Vector(elements);
                }
                case 6: {
                    int n = 1 + r.nextInt(5);
                    return new Expr.Call("dot", List.of(expr(n, d), expr(n, d)));
                }
                default:
                    return new Expr.Call("sum", List.of(expr(0, d)));
            }
        }

        private Expr leaf(int shape) {
            List<Expr> options = new ArrayList<>();
            if (shape == 0) {
                options.add(new Expr.Num(Math.abs(signedValue())));
                options.add(new Expr.Num(r.nextInt(10)));
                for (Map.Entry<String, Integer> s : symbols.entrySet()) {
                    if (s.getValue() == 0) {
                        options.add(new Expr.Name(s.getKey()));
                    } else {
                        options.add(new Expr.Index(s.getKey(), r.nextInt(s.getValue())));
                    }
                }
            } else {
                for (Map.Entry<String, Integer> s : symbols.entrySet()) {
                    int n = s.getValue();
                    if (n == shape) {
                        options.add(new Expr.Name(s.getKey()));
                    }
                    if (n >= shape && n > 0) {
                        int from = r.nextInt(n - shape + 1);
                        options.add(new Expr.Slice(s.getKey(), from, from + shape));
                    }
                }
                List<Expr> elements = new ArrayList<>();
                for (int i = 0; i < shape; i++) {
                    elements.add(leaf(0));
                }
                options.add(new Expr.Vector(elements));
            }
            return options.get(r.nextInt(options.size()));
        }
    }
}
