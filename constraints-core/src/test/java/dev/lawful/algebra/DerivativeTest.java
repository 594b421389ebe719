package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.TreeSet;
import java.util.function.DoubleUnaryOperator;
import java.util.stream.Collectors;
import java.util.stream.IntStream;
import java.util.stream.Stream;

import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.analysis.differentiation.DerivativeStructure;
import org.apache.commons.math3.analysis.differentiation.FiniteDifferencesDifferentiator;
import org.apache.commons.math3.analysis.differentiation.UnivariateDifferentiableFunction;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * Symbolic derivatives ({@link Term#derivative(int)}, {@link Term#gradient()}) against finite differences and
 * against textbook identities.
 */
class DerivativeTest {

    /** The scope every expression is written in. {@code E} is in kJ, so its SI value is 1000 E. */
    private static final LawSet SCOPE = LawSet.parse("<scope>", String.join("\n",
            "input x",
            "input y",
            "input z",
            "input v[3]",
            "input E kJ",
            "output w",
            "const c = 2.5",
            "const k = [1, 0.5, -2]",
            "let q = x * y + sin(z)",
            "let r = v * k",
            "law keep: w = x",
            ""));
    private static final ExpandedLaws EXPANDED = SCOPE.expand();
    private static final int VARIABLES = EXPANDED.variableNames().size();
    private static final int X = EXPANDED.variable("x");
    private static final int Y = EXPANDED.variable("y");
    private static final int Z = EXPANDED.variable("z");
    private static final int E = EXPANDED.variable("E");

    /** Relative error allowed between a symbolic derivative and its finite-difference estimate. */
    private static final double TOLERANCE = 1e-7;

    /** An expression and the ranges its variables are drawn from (defaults inside every function's domain). */
    record Case(String expression, Map<String, double[]> ranges) {
        @Override
        public String toString() {
            return expression;
        }
    }

    private static Case of(String expression) {
        return new Case(expression, Map.of());
    }

    private static Case of(String expression, String variable, double lo, double hi) {
        return new Case(expression, Map.of(variable, new double[] {lo, hi}));
    }

    /** Default ranges: x, y, z in (0, 1), v in (-1, 1), E in (0.5, 2) kJ, w in (-1, 1). */
    private static double[] point(Random r, Map<String, double[]> ranges) {
        double[] p = new double[VARIABLES];
        for (int v = 0; v < VARIABLES; v++) {
            String name = EXPANDED.variableName(v);
            double[] range = ranges.get(name);
            if (range == null) {
                range = name.equals("x") ? new double[] {0.3, 0.9} : name.equals("y") ? new double[] {0.2, 0.8}
                        : name.equals("z") ? new double[] {0.1, 0.7} : name.equals("E") ? new double[] {0.5, 2}
                        : new double[] {-1, 1};
            }
            p[v] = range[0] + (range[1] - range[0]) * r.nextDouble();
        }
        return p;
    }

    static Stream<Case> cases() {
        return Stream.of(
                // every function, over a wide part of its domain
                of("exp(x)", "x", -20, 20), of("log(x)", "x", 0.05, 50), of("log10(x)", "x", 0.05, 50),
                of("sqrt(x)", "x", 0.05, 50), of("sin(x)", "x", -10, 10), of("cos(x)", "x", -10, 10),
                of("tan(x)", "x", -1.4, 1.4), of("asin(x)", "x", -0.9, 0.9), of("acos(x)", "x", -0.9, 0.9),
                of("atan(x)", "x", -10, 10), of("sinh(x)", "x", -5, 5), of("cosh(x)", "x", -5, 5),
                of("tanh(x)", "x", -3, 3), of("abs(x)", "x", 0.5, 3), of("abs(x)", "x", -3, -0.5),
                of("abs(x - 2) * y"), of("sign(x - 2) * y"), of("sign(x) * y + x"),
                // every operator, with constant and variable exponents
                of("x + y"), of("x - y"), of("x * y"), of("x / y"), of("-x"), of("-(x * y)"), of("-x^2"),
                of("x^2"), of("x^3"), of("x^0.5"), of("x^-1.5"), of("x^-1"), of("x^y"), of("y^x"), of("2^x"),
                of("pow(x, y)"), of("pow(x, 3)"), of("x^y^z"), of("(x * y)^(z + 1)"), of("x^(y - z)"),
                of("(x + 1)^2.5", "x", -0.5, 3), of("x^4", "x", -3, 3), of("x^3", "x", -3, 3),
                // constants, indexing, slices and reductions
                of("c * x + k[2] * y"), of("sum(v)"), of("sum(v * v)"), of("dot(v, k)"), of("dot(v, v)"),
                of("sum(exp(v) * k)"), of("sum(v[0:2])"), of("v[1] * v[2] / (1 + v[0]^2)"),
                of("sum(v^2 * k) - dot(v, [x, y, z])"), of("sum([x * y, y * z, z * x])"),
                // definitions
                of("q * x"), of("sum(r)"), of("q^2 + sin(q)"), of("dot(r, v) / q"),
                // a declared unit: E enters in SI (1000 E J)
                of("E * x"), of("E^2 / 1000000 - 3 * E * x * E"),
                // compositions
                of("sin(x * y) / (1 + z^2)"), of("exp(-x^2) * cos(3 * y)"), of("log(1 + x^2) - atan(y / z)"),
                of("sqrt(x^2 + y^2 + z^2)"), of("tanh(x) * cosh(y) - sinh(z)"), of("asin(x * y) + acos(z / 2)"),
                of("x * exp(y) / (2 + sin(z))"), of("log10(x + y + z) * tan(z)"), of("pow(x + 1, sin(y))"),
                of("exp(sin(x) * cos(y)) / (1 + abs(z - 2))"), of("(x - y) * (x + y) / (x * y + z)"));
    }

    @ParameterizedTest(name = "{0}")
    @MethodSource("cases")
    void derivativesMatchFiniteDifferences(Case c) {
        Term f = SCOPE.expression(c.expression());
        Random r = new Random(c.expression().hashCode());
        for (int n = 0; n < 25; n++) {
            checkAllPartials(f, point(r, c.ranges()), c.expression());
        }
    }

    /** Random smooth expressions over x, y, z; every function's argument is kept inside its domain. */
    @Test
    void derivativesOfRandomExpressionsMatchFiniteDifferences() {
        Random r = new Random(20240611L);
        for (int n = 0; n < 300; n++) {
            String expression = randomExpression(r, 4);
            Term f = SCOPE.expression(expression);
            for (int k = 0; k < 4; k++) {
                checkAllPartials(f, point(r, Map.of()), expression);
            }
        }
    }

    @Test
    void lawResidualDerivativesMatchFiniteDifferences() {
        LawSet laws = sparsityLaws();
        ExpandedLaws e = laws.expand();
        Random r = new Random(7);
        for (int i = 0; i < e.size(); i++) {
            for (int n = 0; n < 10; n++) {
                double[] p = new double[e.variableNames().size()];
                for (int v = 0; v < p.length; v++) {
                    p[v] = 0.2 + r.nextDouble();
                }
                checkPartials(e.residual(i), p, e.name(i), e.variableNames());
            }
        }
    }

    private static void checkAllPartials(Term f, double[] p, String label) {
        checkPartials(f, p, label, EXPANDED.variableNames());
    }

    /** Checks the derivative of {@code f} with respect to every variable, named by {@code names}, at {@code p}. */
    private static void checkPartials(Term f, double[] p, String label, List<String> names) {
        Set<Integer> involved = Arrays.stream(f.variables()).boxed().collect(Collectors.toSet());
        for (int v = 0; v < names.size(); v++) {
            final int var = v;
            Term d = f.derivative(v);
            if (!involved.contains(v)) {
                // Source: standard calculus identities (common practice): the derivative of an expression that
                // does not involve v is zero, and symbolically it must be the constant 0 itself
                assertTrue(d.isConstant(0), () -> label + ": d/d" + names.get(var) + " should be the constant 0, is "
                        + d);
                continue;
            }
            double t = p[v];
            DoubleUnaryOperator g = s -> {
                double[] q = p.clone();
                q[var] = s;
                return f.evaluate(q);
            };
            double symbolic = d.evaluate(p);
            double value = f.evaluate(p);
            assertTrue(Double.isFinite(symbolic) && Double.isFinite(value), () -> label + " not finite at "
                    + Arrays.toString(p) + ": " + value + ", derivative " + symbolic);
            double h = 1e-4 * Math.max(1, Math.abs(t));
            // the error of the estimates is judged against the derivative, or, where that is tiny compared with
            // the function, against the function's own size: rounding in f limits any finite difference to about
            // eps |f| / h, some 1e-12 |f| / max(1, |t|) at this step, so no estimate can be trusted to 1e-7 of a
            // derivative below 1e-4 |f| / max(1, |t|)
            double scale = Math.max(Math.abs(symbolic), 1e-4 * Math.abs(value) / Math.max(1, Math.abs(t)));
            double richardson = richardson(g, t, h);
            double reference = commonsMath(g, t, h);
            String where = label + ", d/d" + names.get(var) + " at " + Arrays.toString(p) + ": symbolic "
                    + symbolic + " (" + d + ")";
            assertTrue(Math.abs(symbolic - richardson) <= TOLERANCE * scale, () -> where + ", Richardson "
                    + richardson);
            assertTrue(Math.abs(symbolic - reference) <= TOLERANCE * scale, () -> where + ", 5-point " + reference);
        }
    }

    /**
     * Central differences D(h) = (g(t+h) - g(t-h)) / 2h with one Richardson step, (4 D(h/2) - D(h)) / 3, which
     * cancels the h^2 error term and leaves O(h^4).
     */
    private static double richardson(DoubleUnaryOperator g, double t, double h) {
        double d1 = (g.applyAsDouble(t + h) - g.applyAsDouble(t - h)) / (2 * h);
        double half = h / 2;
        double d2 = (g.applyAsDouble(t + half) - g.applyAsDouble(t - half)) / (2 * half);
        return (4 * d2 - d1) / 3;
    }

    /** Source: Apache Commons Math 3.6.1 FiniteDifferencesDifferentiator (5 points centred on t, step h). */
    private static double commonsMath(DoubleUnaryOperator g, double t, double h) {
        FiniteDifferencesDifferentiator differentiator = new FiniteDifferencesDifferentiator(5, h);
        UnivariateDifferentiableFunction dg = differentiator.differentiate((UnivariateFunction) g::applyAsDouble);
        return dg.value(new DerivativeStructure(1, 1, 0, t)).getPartialDerivative(1);
    }

    /**
     * A random expression whose every value stays finite and inside each function's domain for x, y, z in (0, 1):
     * domain-limited functions get arguments that cannot leave their domain (log(1 + u^2), asin(tanh(u) / 2)).
     */
    private static String randomExpression(Random r, int depth) {
        if (depth == 0 || r.nextInt(5) == 0) {
            switch (r.nextInt(6)) {
                case 0: return "x";
                case 1: return "y";
                case 2: return "z";
                case 3: return "c";
                case 4: return "k[1]";
                default: return ExprPrinter.number(Math.round((0.5 + 2 * r.nextDouble()) * 1000) / 1000.0);
            }
        }
        String a = "(" + randomExpression(r, depth - 1) + ")";
        String b = "(" + randomExpression(r, depth - 1) + ")";
        switch (r.nextInt(26)) {
            case 0: return a + " + " + b;
            case 1: return a + " - " + b;
            case 2: return a + " * " + b;
            case 3: return a + " / (1.5 + sin(" + b + "))";
            case 4: return "-" + a;
            case 5: return a + "^2";
            case 6: return a + "^3";
            case 7: return "(1 + " + a + "^2)^0.5";
            case 8: return "(1 + " + a + "^2)^-1.5";
            case 9: return "pow(1 + " + a + "^2, sin(" + b + "))";
            case 10: return "exp(sin(" + a + "))";
            case 11: return "exp(-" + a + "^2)";
            case 12: return "log(1 + " + a + "^2)";
            case 13: return "log10(2 + cos(" + a + "))";
            case 14: return "sqrt(1 + " + a + "^2)";
            case 15: return "sin(" + a + ")";
            case 16: return "cos(" + a + ")";
            case 17: return "tan(atan(" + a + ") / 2)";
            case 18: return "asin(tanh(" + a + ") / 2)";
            case 19: return "acos(tanh(" + a + ") / 2)";
            case 20: return "atan(" + a + ")";
            case 21: return "sinh(tanh(" + a + "))";
            case 22: return "cosh(atan(" + a + ")) * tanh(" + b + ")";
            case 23: return "abs(2 + sin(" + a + ")) - abs(-1 - " + b + "^2)";
            case 24: return "sign(2 + cos(" + a + ")) * " + b + " + sum([" + a + ", " + b + "])";
            default: return "dot([" + a + ", " + b + "], [" + b + ", 1])";
        }
    }

    // ---- exact identities --------------------------------------------------------------------------------------

    private static double[] at(double x) {
        double[] p = new double[VARIABLES];
        Arrays.fill(p, 0.5);
        p[X] = x;
        return p;
    }

    private static double[] samples() {
        Random r = new Random(11);
        double[] xs = new double[200];
        for (int i = 0; i < xs.length; i++) {
            xs[i] = 0.01 + 5 * r.nextDouble();
        }
        return xs;
    }

    /** |a - b| within {@code ulps} units in the last place of b. */
    private static void assertUlps(double expected, double actual, int ulps, String what) {
        assertTrue(Math.abs(expected - actual) <= ulps * Math.ulp(expected), () -> what + ": expected " + expected
                + ", found " + actual);
    }

    /**
     * |a - b| within 1e-14 |b|: for identities whose two sides are evaluated by different floating-point formulas
     * (1 - tanh^2 against 1 / cosh^2), each of which rounds differently by a few ulps.
     */
    private static void assertClose(double expected, double actual, String what) {
        assertTrue(Math.abs(expected - actual) <= 1e-14 * Math.abs(expected), () -> what + ": expected "
                + expected + ", found " + actual);
    }

    @Test
    void elementaryDerivativesAreTheTextbookFunctions() {
        // Source: standard calculus identities (common practice): sin' = cos, cos' = -sin, exp' = exp,
        // log' = 1/x, sqrt' = 1/(2 sqrt x), sinh' = cosh, cosh' = sinh
        Term sin = SCOPE.expression("sin(x)").derivative(X);
        Term cos = SCOPE.expression("cos(x)").derivative(X);
        Term exp = SCOPE.expression("exp(x)").derivative(X);
        Term log = SCOPE.expression("log(x)").derivative(X);
        Term sqrt = SCOPE.expression("sqrt(x)").derivative(X);
        Term sinh = SCOPE.expression("sinh(x)").derivative(X);
        Term cosh = SCOPE.expression("cosh(x)").derivative(X);
        for (double x : samples()) {
            double[] p = at(x);
            assertEquals(StrictMath.cos(x), sin.evaluate(p), "d/dx sin(x) at " + x);
            assertEquals(-StrictMath.sin(x), cos.evaluate(p), "d/dx cos(x) at " + x);
            assertEquals(StrictMath.exp(x), exp.evaluate(p), "d/dx exp(x) at " + x);
            assertEquals(1 / x, log.evaluate(p), "d/dx log(x) at " + x);
            assertEquals(1 / (2 * StrictMath.sqrt(x)), sqrt.evaluate(p), "d/dx sqrt(x) at " + x);
            assertEquals(StrictMath.cosh(x), sinh.evaluate(p), "d/dx sinh(x) at " + x);
            assertEquals(StrictMath.sinh(x), cosh.evaluate(p), "d/dx cosh(x) at " + x);
        }
    }

    @Test
    void derivativesOfTheOtherFunctionsAreTheirTextbookForms() {
        // Source: standard calculus identities (common practice): tan' = 1/cos^2, atan' = 1/(1+x^2),
        // asin' = 1/sqrt(1-x^2), acos' = -1/sqrt(1-x^2), tanh' = 1/cosh^2, log10' = 1/(x ln 10), |x|' = sign x
        Term tan = SCOPE.expression("tan(x)").derivative(X);
        Term atan = SCOPE.expression("atan(x)").derivative(X);
        Term asin = SCOPE.expression("asin(x)").derivative(X);
        Term acos = SCOPE.expression("acos(x)").derivative(X);
        Term tanh = SCOPE.expression("tanh(x)").derivative(X);
        Term log10 = SCOPE.expression("log10(x)").derivative(X);
        Term abs = SCOPE.expression("abs(x)").derivative(X);
        Term sign = SCOPE.expression("sign(x)").derivative(X);
        assertTrue(sign.isConstant(0), "sign is piecewise constant: its derivative is the constant 0, is " + sign);
        Random r = new Random(5);
        for (int i = 0; i < 200; i++) {
            double x = -0.95 + 1.9 * r.nextDouble();
            double[] p = at(x);
            double cosX = StrictMath.cos(x);
            assertClose(1 / (cosX * cosX), tan.evaluate(p), "d/dx tan(x) at " + x);
            assertClose(1 / (1 + x * x), atan.evaluate(p), "d/dx atan(x) at " + x);
            assertClose(1 / StrictMath.sqrt(1 - x * x), asin.evaluate(p), "d/dx asin(x) at " + x);
            assertClose(-1 / StrictMath.sqrt(1 - x * x), acos.evaluate(p), "d/dx acos(x) at " + x);
            double coshX = StrictMath.cosh(x);
            assertClose(1 / (coshX * coshX), tanh.evaluate(p), "d/dx tanh(x) at " + x);
            assertClose(1 / (x * StrictMath.log(10)), log10.evaluate(p), "d/dx log10(x) at " + x);
            assertEquals(Math.signum(x), abs.evaluate(p), "d/dx abs(x) at " + x);
        }
    }

    @Test
    void powerProductQuotientAndChainRules() {
        // Source: standard calculus identities (common practice): (x^3)' = 3x^2, (x^a)' = a x^(a-1),
        // (a^x)' = a^x ln a, (fg)' = f'g + fg', (f/g)' = (f'g - fg')/g^2, (f(g))' = f'(g) g'
        Term cube = SCOPE.expression("x^3").derivative(X);
        Term root = SCOPE.expression("x^0.5").derivative(X);
        Term twoX = SCOPE.expression("2^x").derivative(X);
        Term xToY = SCOPE.expression("x^y");
        Term product = SCOPE.expression("sin(x) * exp(x)").derivative(X);
        Term quotient = SCOPE.expression("sin(x) / x").derivative(X);
        Term chain = SCOPE.expression("sin(x^2)").derivative(X);
        for (double x : samples()) {
            double[] p = at(x);
            double y = p[Y];
            assertUlps(3 * x * x, cube.evaluate(p), 2, "d/dx x^3 at " + x);
            assertUlps(0.5 / StrictMath.sqrt(x), root.evaluate(p), 2, "d/dx x^0.5 at " + x);
            assertUlps(StrictMath.pow(2, x) * StrictMath.log(2), twoX.evaluate(p), 2, "d/dx 2^x at " + x);
            assertUlps(y * StrictMath.pow(x, y - 1), xToY.derivative(X).evaluate(p), 2, "d/dx x^y at " + x);
            assertUlps(StrictMath.pow(x, y) * StrictMath.log(x), xToY.derivative(Y).evaluate(p), 2,
                    "d/dy x^y at " + x);
            double s = StrictMath.sin(x);
            double c = StrictMath.cos(x);
            double e = StrictMath.exp(x);
            assertUlps(c * e + s * e, product.evaluate(p), 4, "product rule at " + x);
            double q = (c * x - s) / (x * x);
            assertTrue(Math.abs(q - quotient.evaluate(p)) <= 1e-13 * Math.max(Math.abs(q), 1 / x),
                    "quotient rule at " + x + ": expected " + q + ", found " + quotient.evaluate(p));
            assertUlps(2 * x * StrictMath.cos(x * x), chain.evaluate(p), 4, "chain rule at " + x);
        }
    }

    @Test
    void derivativesSimplifyToExactConstants() {
        // Source: standard calculus identities (common practice): d/dx (3x + y) = 3, d/dx (c x) = c,
        // d/dx (x - x) = 0, and the derivative of what does not involve x is 0
        assertConstant(3, SCOPE.expression("3 * x + y").derivative(X));
        assertConstant(1, SCOPE.expression("3 * x + y").derivative(Y));
        assertConstant(2.5, SCOPE.expression("c * x").derivative(X));
        assertConstant(-2, SCOPE.expression("k[2] * x - 7").derivative(X));
        assertConstant(0, SCOPE.expression("x - x").derivative(X));
        assertConstant(0, SCOPE.expression("y * sin(z) + exp(q)").derivative(E));
        assertConstant(0, SCOPE.expression("y * sin(z)").derivative(X));
        assertConstant(0, SCOPE.expression("7").derivative(X));
        assertConstant(1, SCOPE.expression("x + y * z").derivative(X));
        assertConstant(-1, SCOPE.expression("-x").derivative(X));
        assertConstant(6, SCOPE.expression("sum([x, 2 * x, 3 * x])").derivative(X));
        // Source: BIPM SI Brochure, 9th edition (2019), prefixes: kilo = 10^3, so E in kJ is 1000 E in J
        assertConstant(1000, SCOPE.expression("E").derivative(E));
        assertConstant(3000, SCOPE.expression("3 * E").derivative(E));
        assertConstant(1000, SCOPE.expression("3 * E - 2 * E").derivative(E));
    }

    private static void assertConstant(double expected, Term t) {
        assertTrue(t.isConstant(expected), () -> "expected the constant " + expected + ", found " + t + " ("
                + t.kind() + ")");
    }

    // ---- gradient and sparsity ---------------------------------------------------------------------------------

    private static LawSet sparsityLaws() {
        return LawSet.parse("<sparsity>", String.join("\n",
                "input a",
                "input b",
                "input v[3]",
                "input T K",
                "output y",
                "output u[3]",
                "output P kW",
                "const k = [1, 2, 3]",
                "const P0 = 1000 W",
                "const T0 = 1 K",
                "let s = dot(k, v) + a",
                "law l1: y = a * b + v[0]",
                "law l2: u = exp(v) * a + y",
                "law l3: sum(u) = dot(v, v) / b + s",
                "law l4: y^2 = sin(a)",
                "law l5: P * T = P0 * T0 * (u[2] + log(1 + b^2))",
                ""));
    }

    @Test
    void gradientKeysAreTheStructuralSparsity() {
        ExpandedLaws e = sparsityLaws().expand();
        int nIn = e.inputWidth();
        assertEquals(1 + 3 + 1 + 1 + 1, e.size());
        for (int i = 0; i < e.size(); i++) {
            Set<Integer> structural = new TreeSet<>();
            for (int v : e.inputs(i)) {
                structural.add(v);
            }
            for (int v : e.outputs(i)) {
                structural.add(nIn + v);
            }
            Map<Integer, Term> gradient = e.residual(i).gradient();
            assertEquals(structural, gradient.keySet(), e.name(i));
            assertEquals(gradient.keySet(), e.gradient(i).keySet(), e.name(i));
            assertEquals(structural, IntStream.of(e.residual(i).variables()).boxed().collect(Collectors.toSet()),
                    e.name(i));
            assertEquals(new ArrayList<>(structural), new ArrayList<>(gradient.keySet()), "ascending order");
            for (Map.Entry<Integer, Term> g : gradient.entrySet()) {
                double[] p = new double[e.variableNames().size()];
                Arrays.fill(p, 0.7);
                assertEquals(e.residual(i).derivative(g.getKey()).evaluate(p), g.getValue().evaluate(p));
            }
        }
        // hand-read sparsity of two laws: l1 involves a, b, v[0] and y; l4 involves a and y only
        int l1 = 0;
        assertEquals(List.of("y"), e.outputNames(l1));
        assertEquals(Set.of(e.variable("a"), e.variable("b"), e.variable("v[0]")),
                Arrays.stream(e.inputs(l1)).boxed().collect(Collectors.toSet()));
        int l4 = 5;
        assertEquals("l4", e.name(l4));
        assertEquals(Set.of(e.variable("a"), e.variable("y")), e.residual(l4).gradient().keySet());
    }

    @Test
    void gradientLeavesOutOnlyIdenticallyZeroDerivatives() {
        // sign' is zero everywhere it exists, so a enters the residual but not its gradient
        LawSet laws = LawSet.parse("<sign>", "input a\ninput b\noutput y\nlaw l: y = sign(a) * b\n");
        ExpandedLaws e = laws.expand();
        Set<Integer> structural = IntStream.of(e.residual(0).variables()).boxed().collect(Collectors.toSet());
        Set<Integer> keys = e.residual(0).gradient().keySet();
        assertTrue(structural.containsAll(keys));
        assertEquals(Set.of(e.variable("b"), e.variable("y")), keys);
        assertTrue(e.residual(0).derivative(e.variable("a")).isConstant(0));
    }
}
