package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.EnumMap;
import java.util.Map;
import java.util.Random;
import java.util.function.DoubleUnaryOperator;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * Every elementary function, written in law text and evaluated both by {@link Term#evaluate(double[])} and by the
 * compiled {@link LawEvaluator}, gives the value of the {@link StrictMath} method of the same name, bit for bit.
 */
class FunctionValueTest {

    /** Source: java.lang.StrictMath (fdlibm algorithms), the reference for each function. */
    private static final Map<Function, DoubleUnaryOperator> REFERENCE = new EnumMap<>(Function.class);

    static {
        REFERENCE.put(Function.EXP, StrictMath::exp);
        REFERENCE.put(Function.LOG, StrictMath::log);
        REFERENCE.put(Function.LOG10, StrictMath::log10);
        REFERENCE.put(Function.SQRT, StrictMath::sqrt);
        REFERENCE.put(Function.SIN, StrictMath::sin);
        REFERENCE.put(Function.COS, StrictMath::cos);
        REFERENCE.put(Function.TAN, StrictMath::tan);
        REFERENCE.put(Function.ASIN, StrictMath::asin);
        REFERENCE.put(Function.ACOS, StrictMath::acos);
        REFERENCE.put(Function.ATAN, StrictMath::atan);
        REFERENCE.put(Function.SINH, StrictMath::sinh);
        REFERENCE.put(Function.COSH, StrictMath::cosh);
        REFERENCE.put(Function.TANH, StrictMath::tanh);
        REFERENCE.put(Function.ABS, StrictMath::abs);
        REFERENCE.put(Function.SIGN, StrictMath::signum);
    }

    @Test
    void everyFunctionHasAReference() {
        assertEquals(Function.values().length, REFERENCE.size());
    }

    /** Special values, the edges of every domain, and random points from many magnitudes and bit patterns. */
    private static double[] points() {
        double[] special = {0.0, -0.0, Double.MIN_VALUE, -Double.MIN_VALUE, Double.MIN_NORMAL, -Double.MIN_NORMAL,
            1, -1, 0.5, -0.5, 2, -2, 10, 1000, 1e-8, -1e-8, 1e-300, -1e-300, 1e300, -1e300, Double.MAX_VALUE,
            -Double.MAX_VALUE, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY, Double.NaN, Math.PI, -Math.PI,
            Math.PI / 2, -Math.PI / 2, Math.PI / 4, Math.E, 709.78, 709.79, 710, -745.1, -746, 22, 1e15, 1e16,
            Math.nextUp(1.0), Math.nextDown(1.0), Math.nextUp(-1.0), Math.nextDown(-1.0), 0.9999999, 1.0000001};
        Random r = new Random(3);
        int random = 3000;
        double[] points = Arrays.copyOf(special, special.length + random);
        for (int i = 0; i < random; i++) {
            double p;
            switch (i % 4) {
                case 0:
                    p = -10 + 20 * r.nextDouble();
                    break;
                case 1:
                    p = -1.2 + 2.4 * r.nextDouble();
                    break;
                case 2:
                    p = (r.nextBoolean() ? 1 : -1) * StrictMath.pow(10, -300 + 600 * r.nextDouble());
                    break;
                default:
                    p = Double.longBitsToDouble(r.nextLong());
            }
            points[special.length + i] = p;
        }
        return points;
    }

    /** Equal as values: bit for bit, except that every NaN is one value. */
    private static void assertSameDouble(double expected, double actual, String what) {
        assertEquals(Double.doubleToLongBits(expected), Double.doubleToLongBits(actual),
                () -> what + ": expected " + expected + ", found " + actual);
    }

    @ParameterizedTest
    @EnumSource(Function.class)
    void valuesThroughLawTextEqualStrictMath(Function f) {
        // the residual of "y * f(x) = 0" is y * f(x); with y = 1 it is f(x) exactly, NaN and signed zero included
        LawSet laws = LawSet.parse("<" + f.spelling() + ">", "input x\noutput y\nlaw l: y * " + f.spelling()
                + "(x) = 0\n");
        Term term = laws.expression(f.spelling() + "(x)");
        Term residual = laws.expand().residual(0);
        double[] xs = points();
        double[] ones = new double[xs.length];
        Arrays.fill(ones, 1.0);
        double[] residuals = new double[xs.length];
        laws.evaluator().residuals(xs, ones, xs.length, residuals, null);
        DoubleUnaryOperator reference = REFERENCE.get(f);
        for (int i = 0; i < xs.length; i++) {
            double x = xs[i];
            // Source: java.lang.StrictMath (fdlibm algorithms)
            double expected = reference.applyAsDouble(x);
            String at = f.spelling() + "(" + x + ")";
            assertSameDouble(expected, term.evaluate(new double[] {x, 0}), "Term.evaluate of " + at);
            assertSameDouble(expected, residual.evaluate(new double[] {x, 1}), "residual of " + at);
            assertSameDouble(expected, residuals[i], "LawEvaluator residual of " + at);
            assertSameDouble(expected, f.apply(x), "Function.apply of " + at);
        }
    }

    /** Evaluates {@code f(x)} through law text with both evaluators; they must agree, and that value is returned. */
    private static double viaLawText(String function, double x) {
        LawSet laws = LawSet.parse("<handbook>", "input x\noutput y\nlaw l: y * " + function + "(x) = 0\n");
        double viaTerm = laws.expression(function + "(x)").evaluate(new double[] {x, 0});
        double[] residual = new double[1];
        laws.evaluator().residuals(new double[] {x}, new double[] {1}, 1, residual, null);
        assertSameDouble(viaTerm, residual[0], function + "(" + x + ") by the two evaluators");
        return residual[0];
    }

    private static void assertWithinUlp(double expected, double actual, String what) {
        assertTrue(Math.abs(expected - actual) <= Math.ulp(expected), () -> what + ": expected " + expected
                + " within 1 ulp, found " + actual);
    }

    @Test
    void handbookValues() {
        // values from memory, written to full double precision; each must be met within 1 ulp
        assertWithinUlp(2.718281828459045, viaLawText("exp", 1), "exp(1), from memory");
        assertWithinUlp(1.0, viaLawText("exp", 0), "exp(0), from memory");
        assertWithinUlp(0.6931471805599453, viaLawText("log", 2), "log(2), from memory");
        assertWithinUlp(3.0, viaLawText("log10", 1000), "log10(1000), from memory");
        assertWithinUlp(-2.0, viaLawText("log10", 0.01), "log10(0.01), from memory");
        assertWithinUlp(1.4142135623730951, viaLawText("sqrt", 2), "sqrt(2), from memory");
        assertWithinUlp(0.5, viaLawText("sin", Math.PI / 6), "sin(pi/6), from memory");
        assertWithinUlp(0.5, viaLawText("cos", Math.PI / 3), "cos(pi/3), from memory");
        assertWithinUlp(1.0, viaLawText("tan", Math.PI / 4), "tan(pi/4), from memory");
        assertWithinUlp(0.5235987755982989, viaLawText("asin", 0.5), "asin(1/2) = pi/6, from memory");
        assertWithinUlp(1.5707963267948966, viaLawText("acos", 0), "acos(0) = pi/2, from memory");
        assertWithinUlp(3.141592653589793, viaLawText("acos", -1), "acos(-1) = pi, from memory");
        assertWithinUlp(0.7853981633974483, viaLawText("atan", 1), "atan(1) = pi/4, from memory");
        assertWithinUlp(1.1752011936438014, viaLawText("sinh", 1), "sinh(1), from memory");
        assertWithinUlp(1.5430806348152437, viaLawText("cosh", 1), "cosh(1), from memory");
        assertWithinUlp(0.46211715726000974, viaLawText("tanh", 0.5), "tanh(0.5), from memory");
        assertWithinUlp(2.5, viaLawText("abs", -2.5), "abs(-2.5), from memory");
        assertWithinUlp(-1.0, viaLawText("sign", -3), "sign(-3), from memory");
        assertWithinUlp(1.0, viaLawText("sign", 1e-300), "sign(1e-300), from memory");
    }
}
