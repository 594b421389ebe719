package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Dimensional consistency of laws as the {@link Checker} judges it, the conversion of declared units to SI in the
 * expanded residuals, and the unit a law's residual is reported in ({@link LawSet#lawUnit(String)}).
 */
class UnitCheckTest {

    private static LawSet parse(String... lines) {
        return LawSet.parse("check.law", String.join("\n", lines) + "\n");
    }

    /** Parses text that must hold exactly one error and returns it. */
    private static Diagnostic error(String... lines) {
        LawException e = assertThrows(LawException.class, () -> parse(lines));
        assertEquals(1, e.errors().size(), () -> "expected exactly one error, found:\n" + e.getMessage());
        return e.errors().get(0);
    }

    private static void assertError(String message, int line, int column, Diagnostic d) {
        assertEquals(message, d.message());
        assertEquals(line, d.line(), "line of: " + d.message());
        assertEquals(column, d.column(), "column of: " + d.message());
    }

    // ---- sides and sums -------------------------------------------------------------------------------------

    @Test
    void bothSidesOfALawMustHaveOneDimension() {
        parse("input x m", "output y m", "law copy: y = x");
        assertError("unit mismatch between the sides of law 'copy': left is s, right is m", 3, 15,
                error("input x m", "output y s", "law copy: y = x"));
        // different units of one dimension agree; the message shows the declared unit and its SI form
        parse("input x km", "output y m", "law copy: y = x");
        assertError("unit mismatch between the sides of law 'copy': left is kJ (J), right is kW (W)", 3, 15,
                error("input x kW", "output y kJ", "law copy: y = x"));
    }

    @Test
    void everySumMustHaveOneDimension() {
        assertError("law 'a': unit mismatch in '+': left is m, right is s", 4, 12,
                error("input x m", "input t s", "output y m", "law a: y = x + t"));
        assertError("law 'a': unit mismatch in '-': left is m, right is s", 4, 12,
                error("input x m", "input t s", "output y m", "law a: y = x - t"));
        // a sum nested in a product and one inside a definition are checked too
        assertError("law 'a': unit mismatch in '+': left is m, right is s", 4, 17,
                error("input x m", "input t s", "output y m2", "law a: y = x * (x + t)"));
        assertError("definition 'e': unit mismatch in '+': left is W, right is J", 3, 9,
                error("input Q W", "input H J", "let e = Q + H", "output y W", "law a: y = e"));
        // a vector sum is checked element-wise with the same rule
        assertError("law 'a': unit mismatch in '+': left is mol/s (mol s-1), right is kg/s (kg s-1)", 4, 12,
                error("input n[2] mol/s", "input w[2] kg/s", "output y[2] mol/s", "law a: y = n + w"));
    }

    @Test
    void aConstantKeepsItsUnitThroughDefinitions() {
        // cp * m * T is in J/(kg K) * kg/s * K = W
        String[] header = {"const cp = 4.184 kJ/(kg K)", "input  m kg/s", "input  T K", "let q = cp * m * T"};
        LawSet laws = parse(concat(header, "output P W", "law heat: P = q"));
        assertEquals(Unit.parse("W"), laws.lawUnit("heat"));
        // the definition's factor: 4.184 kJ/(kg K) is 4184 J/(kg K); variables are in the declared units
        Term r = laws.expand().residual(0);
        double q = 4184.0 * 2.0 * 300.0;
        assertEquals(-q, r.evaluate(new double[] {2.0, 300.0, 0.0}), 1e-15 * q);
        assertEquals(0.0, r.evaluate(new double[] {2.0, 300.0, q}), 1e-15 * q);
        assertError("unit mismatch between the sides of law 'heat': left is J, right is W", 6, 15,
                error(concat(header, "output P J", "law heat: P = q")));
        // without its unit the constant makes q a flow of kg K/s, which is no power
        assertError("unit mismatch between the sides of law 'heat': left is W, right is kg K s-1", 6, 15,
                error("const cp = 4184", "input  m kg/s", "input  T K", "let q = cp * m * T", "output P W",
                        "law heat: P = q"));
    }

    @Test
    void kilojoulesAndJoulesAddAfterConversionToSi() {
        LawSet laws = parse("input  a kJ", "input  b J", "output y J", "law total: y = a + b");
        assertEquals(Unit.parse("J"), laws.lawUnit("total"));
        Term r = laws.expand().residual(0);
        // Source: BIPM SI Brochure, 9th edition (2019), Table 7 (SI prefixes): k = 10^3, so 2 kJ + 500 J = 2500 J
        double kilo = 1e3;
        assertEquals(0.0, r.evaluate(new double[] {2.0, 500.0, 2.0 * kilo + 500.0}), 0.0);
        assertEquals(-(2.0 * kilo + 500.0), r.evaluate(new double[] {2.0, 500.0, 0.0}), 0.0);
        // the residual is in SI (J) even when the law's own unit is kJ
        LawSet inKilo = parse("input  a kJ", "input  b J", "output y kJ", "law total: y = a + b");
        assertEquals(Unit.parse("kJ"), inKilo.lawUnit("total"));
        assertEquals(0.0, inKilo.expand().residual(0).evaluate(new double[] {2.0, 500.0, 2.5}), 0.0);
        assertEquals(-500.0, inKilo.expand().residual(0).evaluate(new double[] {2.0, 500.0, 2.0}), 0.0);
    }

    // ---- functions and powers -------------------------------------------------------------------------------

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"exp", "log", "log10", "sin", "cos", "tan", "asin", "acos", "atan", "sinh", "cosh",
        "tanh"})
    void elementaryFunctionsNeedDimensionlessArguments(String f) {
        assertError("law 'a': the argument of '" + f + "' must be dimensionless, found m", 3, 12,
                error("input x m", "output y", "law a: y = " + f + "(x)"));
        // a ratio of lengths is a pure number
        parse("input x m", "const x0 = 2 km", "output y", "law a: y = " + f + "(x / x0)");
    }

    @Test
    void aFunctionOfARatioConvertsBothUnits() {
        // common practice: 1 bar = 10^5 Pa
        LawSet laws = parse("input p Pa", "const p0 = 1 bar", "output y", "law ratio: y = log(p / p0)");
        Term r = laws.expand().residual(0);
        assertEquals(-StrictMath.log(2.0), r.evaluate(new double[] {2e5, 0.0}), 1e-15);
    }

    @Test
    void squareRootHalvesEvenExponents() {
        assertEquals(Unit.parse("m"), parse("input x m2", "output y m", "law a: y = sqrt(x)").lawUnit("a"));
        parse("input x m^2 s^-4", "output y m s-2", "law a: y = sqrt(x)");
        // a specific energy's root is a speed: J/kg = m2 s-2
        parse("input e J/kg", "output v m/s", "law a: v = sqrt(2 * e)");
        assertError("unit mismatch between the sides of law 'a': left is m2, right is m", 3, 12,
                error("input x m2", "output y m2", "law a: y = sqrt(x)"));
    }

    @Test
    void squareRootRejectsOddExponents() {
        assertError("law 'a': the argument of 'sqrt' is in m3, which has no square root in whole unit powers", 3, 12,
                error("input x m3", "output y m", "law a: y = sqrt(x)"));
        assertError("law 'a': the argument of 'sqrt' is in kg/s (kg s-1), which has no square root in whole unit powers",
                3, 12, error("input x kg/s", "output y", "law a: y = sqrt(x)"));
    }

    @Test
    void constantExponentsMultiplyTheDimension() {
        parse("input x m", "output y m2", "law a: y = x^2");
        parse("input x m", "output y m-1", "law a: y = x^-1");
        parse("input x m2", "output y m", "law a: y = x^0.5");
        parse("input x m", "const k = 3", "output y m3", "law a: y = x^k");
        parse("input x m", "output y m2", "law a: y = pow(x, 2)");
        assertError("unit mismatch between the sides of law 'a': left is m3, right is m2", 3, 12,
                error("input x m", "output y m3", "law a: y = x^2"));
        assertError("law 'a': exponent 2.5 does not give whole unit powers of m", 3, 12,
                error("input x m", "output y m", "law a: y = x^2.5"));
    }

    @Test
    void aQuantityWithAUnitCannotHaveAVariableExponent() {
        assertError("law 'a': a quantity in m can only be raised to a constant scalar exponent", 4, 12,
                error("input x m", "input k", "output y m2", "law a: y = x^k"));
        assertError("law 'a': a quantity in m can only be raised to a constant scalar exponent", 4, 12,
                error("input x m", "input k", "output y m2", "law a: y = pow(x, k)"));
        // a pure number may have any exponent
        parse("input x", "input k", "output y", "law a: y = x^k");
        assertError("law 'a': the exponent must be dimensionless, found s", 4, 12,
                error("input x", "input k s", "output y", "law a: y = x^k"));
    }

    // ---- zero and the law's unit ----------------------------------------------------------------------------

    @Test
    void literalZeroFitsAnyUnit() {
        LawSet laws = parse("input  feed[3] mol/s", "output out[3]  mol/s", "law balance: sum(out) - sum(feed) = 0");
        assertEquals(Unit.parse("mol/s"), laws.lawUnit("balance"));
        parse("input x m", "output y m", "law a: y = x + 0");
        parse("input x m", "output y m", "law a: 0 = y - x");
        // any other number is a pure number and does not fit
        assertError("unit mismatch between the sides of law 'balance': left is mol/s (mol s-1), right is"
                + " dimensionless", 3, 37,
                error("input  feed[3] mol/s", "output out[3]  mol/s", "law balance: sum(out) - sum(feed) = 1"));
    }

    @Test
    void aLawIsReportedInTheDeclaredUnitOfItsLeftSide() {
        assertEquals(Unit.parse("kJ"), parse("input x J", "output y kJ", "law a: y = x").lawUnit("a"));
        assertEquals(Unit.parse("J"), parse("input x J", "output y kJ", "law a: x = y").lawUnit("a"));
        // a pure-number factor keeps the declared unit
        assertEquals(Unit.parse("kW"), parse("input x W", "output P kW", "law a: 2 * P = x").lawUnit("a"));
        assertEquals(Unit.parse("mol/s"),
                parse("input feed[2] mol/s", "output out[2] mol/s", "const C = [1, 2]",
                        "law a: dot(C, out) = dot(C, feed)").lawUnit("a"));
        // when the left side follows from no single declaration, the right side's unit is used
        assertEquals(Unit.parse("kW"), parse("input a W", "input b J/s", "output P kW", "law p: a + b = P")
                .lawUnit("p"));
        // declared units that cancel leave one declared unit: P * P / P is in kW
        assertEquals(Unit.parse("kW"),
                parse("input U V", "input I A", "output P kW", "law a: U * I = 2 * P * P / P").lawUnit("a"));
        // and when neither side is in one declared unit nor one product of them, the coherent SI unit
        assertEquals(new Unit("W", 1.0, Unit.parse("W").dimension()),
                parse("input a W", "input b J/s", "output P kW", "output L W", "law s: P + L = a + b").lawUnit("s"));
    }

    private static String[] concat(String[] head, String... tail) {
        String[] all = new String[head.length + tail.length];
        System.arraycopy(head, 0, all, 0, head.length);
        System.arraycopy(tail, 0, all, head.length, tail.length);
        return all;
    }
}
