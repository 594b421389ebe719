package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Unit parsing ({@link Unit#parse(String)}, {@link UnitParser}) and the unit definitions of {@link UnitTable}.
 *
 * <p>A definition is checked by parsing both sides independently and comparing the SI factor and the dimension,
 * so a named unit is compared with the composition the SI defines it by, and where the SI gives it, with its
 * expression in base units (built here exponent by exponent, not parsed).
 *
 * <p>The SI Brochure's table and section numbers below are cited from memory, except Table 8, which was checked.
 */
class UnitTest {

    /** Relative tolerance for factors that are products of decimal prefixes (a few ulps). */
    private static final double FACTOR_TOLERANCE = 1e-15;

    private static void assertUnit(double factor, Dimension dimension, String text) {
        Unit u = Unit.parse(text);
        assertEquals(dimension, u.dimension(), "dimension of '" + text + "'");
        assertEquals(factor, u.factor(), Math.abs(factor) * FACTOR_TOLERANCE, "SI factor of '" + text + "'");
    }

    /** Asserts that {@code symbol} and {@code definition} are the same unit (factor and dimension). */
    private static void assertSameUnit(String definition, String symbol) {
        Unit d = Unit.parse(definition);
        assertUnit(d.factor(), d.dimension(), symbol);
    }

    private static Dimension dim(int m, int kg, int s, int a, int k, int mol, int cd) {
        return Dimension.of(m, kg, s, a, k, mol, cd);
    }

    private static Diagnostic onlyError(LawException e) {
        assertEquals(1, e.errors().size(), () -> "expected exactly one error, found:\n" + e.getMessage());
        return e.errors().get(0);
    }

    // ---- SI definitions -------------------------------------------------------------------------------------

    @Test
    void baseUnitsAreTheSevenBaseDimensions() {
        // Source: BIPM SI Brochure, 9th edition (2019), Table 2 (SI base units)
        List<String> base = List.of("m", "kg", "s", "A", "K", "mol", "cd");
        for (int i = 0; i < base.size(); i++) {
            assertUnit(1.0, Dimension.base(i), base.get(i));
        }
        // Source: BIPM SI Brochure, 9th edition (2019), section 3: multiples of the kilogram are formed by
        // attaching prefixes to the gram, 1 g = 10^-3 kg
        assertUnit(1e-3, Dimension.base(1), "g");
    }

    @ParameterizedTest(name = "{0} = {1}")
    @CsvSource(delimiter = '|', value = {
        // Source: BIPM SI Brochure, 9th edition (2019), Table 4 (the 22 SI units with special names and symbols):
        // symbol | in other SI units | m kg s A K mol cd exponents in base units
        "Hz  | 1/s      |  0  0 -1  0 0 0 0",
        "N   | kg m s^-2|  1  1 -2  0 0 0 0",
        "Pa  | N/m^2    | -1  1 -2  0 0 0 0",
        "J   | N m      |  2  1 -2  0 0 0 0",
        "W   | J/s      |  2  1 -3  0 0 0 0",
        "C   | A s      |  0  0  1  1 0 0 0",
        "V   | W/A      |  2  1 -3 -1 0 0 0",
        "F   | C/V      | -2 -1  4  2 0 0 0",
        "ohm | V/A      |  2  1 -3 -2 0 0 0",
        "\u03a9 | V/A   |  2  1 -3 -2 0 0 0",
        "S   | 1/ohm    | -2 -1  3  2 0 0 0",
        "Wb  | V s      |  2  1 -2 -1 0 0 0",
        "T   | Wb/m^2   |  0  1 -2 -1 0 0 0",
        "H   | Wb/A     |  2  1 -2 -2 0 0 0",
        "Gy  | J/kg     |  2  0 -2  0 0 0 0",
    })
    void derivedUnitsWithSpecialNames(String symbol, String definition, String baseExponents) {
        assertSameUnit(definition, symbol);
        String[] e = baseExponents.trim().split("\\s+");
        int[] k = new int[7];
        for (int i = 0; i < 7; i++) {
            k[i] = Integer.parseInt(e[i]);
        }
        assertUnit(1.0, Dimension.of(k), symbol);
    }

    @ParameterizedTest(name = "{0} = {1} {2}")
    @CsvSource(delimiter = '|', value = {
        // Source: BIPM SI Brochure, 9th edition (2019), Table 7 (SI prefixes): k = 10^3, m = 10^-3, µ = 10^-6,
        // G = 10^9
        "km    | 1e3  | m",
        "mg    | 1e-6 | kg",
        "\u00b5s | 1e-6 | s",
        "\u03bcs | 1e-6 | s",
        "GW    | 1e9  | W",
        "kPa   | 1e3  | Pa",
        "mmol  | 1e-3 | mol",
        // common practice: 'u' as the ASCII spelling of the micro prefix (the Brochure writes µ)
        "us    | 1e-6 | s",
    })
    void prefixes(String symbol, double factor, String unit) {
        Unit u = Unit.parse(unit);
        assertUnit(factor * u.factor(), u.dimension(), symbol);
    }

    @Test
    void anExponentAppliesToThePrefixedUnit() {
        // Source: BIPM SI Brochure, 9th edition (2019), section 3 (SI prefixes): a prefix and its unit form one
        // symbol that an exponent raises as a whole, so km^2 = (10^3 m)^2 = 10^6 m^2 and ms-1 = 10^3 s^-1
        assertUnit(1e6, dim(2, 0, 0, 0, 0, 0, 0), "km^2");
        assertUnit(1e3, dim(0, 0, -1, 0, 0, 0, 0), "ms-1");
    }

    @Test
    void nonSiUnitsAcceptedForUseWithTheSi() {
        // Source: BIPM SI Brochure, 9th edition (2019), Table 8 (non-SI units accepted for use with the SI units)
        assertUnit(1e-3, dim(3, 0, 0, 0, 0, 0, 0), "L");
        assertUnit(1e-3, dim(3, 0, 0, 0, 0, 0, 0), "l");
        assertUnit(60, Dimension.base(2), "min");
        assertUnit(3600, Dimension.base(2), "h");
        assertUnit(86400, Dimension.base(2), "d");
        assertUnit(1e3, Dimension.base(1), "t");
        // Source: BIPM SI Brochure, 9th edition (2019), Table 8: 1 eV = 1.602 176 634 x 10^-19 J, exact since the
        // elementary charge is a defining constant of the 2019 SI
        assertUnit(1.602176634e-19, dim(2, 1, -2, 0, 0, 0, 0), "eV");
        assertEquals(1.602176634e-19, Unit.parse("eV").factor(), 0.0, "the electronvolt is exact, not rounded");
    }

    @Test
    void bar() {
        // common practice: 1 bar = 10^5 Pa (the 9th edition's Table 8 does not list the bar)
        assertUnit(1e5, dim(-1, 1, -2, 0, 0, 0, 0), "bar");
        // Source: BIPM SI Brochure, 9th edition (2019), Table 7 (SI prefixes): m = 10^-3, h = 10^2
        assertSameUnit("hPa", "mbar");
    }

    @Test
    void standardGravityInALaw() {
        // Source: BIPM SI Brochure 9th ed., and the 3rd CGPM 1901 value: standard acceleration of gravity
        // g_n = 980.665 cm s^-2 = 9.80665 m s^-2
        double gn = 9.80665;
        LawSet laws = LawSet.parse("weight.law", String.join("\n",
                "const gn = 9.80665 m s^-2",
                "input  m kg",
                "output F kN",
                "law weight: F = m * gn",
                ""));
        Declaration.Constant c = laws.constants().get(0);
        assertEquals(Unit.parse("m/s2").dimension(), c.unit().dimension());
        assertEquals(Unit.parse("kN"), laws.lawUnit("weight"));
        // variables are in the declared units (m in kg, F in kN); the residual is in N
        Term r = laws.expand().residual(0);
        assertEquals(-2 * gn, r.evaluate(new double[] {2, 0}), 1e-15 * 2 * gn);
        assertEquals(0, r.evaluate(new double[] {2, 2 * gn / 1000}), 1e-15 * 2 * gn);
        // the constant's unit takes part in the check: as a pure number it no longer gives a force
        LawException e = assertThrows(LawException.class, () -> LawSet.parse("weight.law",
                "const gn = 9.80665\ninput m kg\noutput F kN\nlaw weight: F = m * gn\n"));
        assertEquals("unit mismatch between the sides of law 'weight': left is kN (N), right is kg",
                onlyError(e).message());
    }

    // ---- syntax ---------------------------------------------------------------------------------------------

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"m2", "m^2", "m^+2", "(m)2", "m m"})
    void squareMetreSpellings(String text) {
        assertUnit(1.0, dim(2, 0, 0, 0, 0, 0, 0), text);
    }

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"m-2", "m^-2", "1/m2", "1/m^2"})
    void inverseSquareMetreSpellings(String text) {
        assertUnit(1.0, dim(-2, 0, 0, 0, 0, 0, 0), text);
    }

    @Test
    void compoundUnits() {
        assertUnit(1.0, dim(0, 1, -3, 0, 0, 0, 0), "W m-2");
        assertUnit(1.0, dim(2, 0, -2, 0, -1, 0, 0), "J/(kg K)");
        assertSameUnit("J/(kg K)", "J K-1 kg-1");
        assertUnit(1.0, dim(1, 1, -2, 0, 0, 0, 0), "kg.m/s2");
        assertUnit(1.0, dim(1, 1, -2, 0, 0, 0, 0), "kg*m/s^2");
        assertUnit(1.0, dim(1, 1, -2, 0, 0, 0, 0), "kg\u00b7m\u00b7s-2");
        assertUnit(1.0, dim(0, 0, -1, 0, 0, 0, 0), "1/s");
        assertUnit(1.0, Dimension.NONE, "1");
        // common practice: 1 kmol/h = 1000 mol / 3600 s
        assertUnit(1000.0 / 3600.0, dim(0, 0, -1, 0, 0, 1, 0), "kmol/h");
    }

    @Test
    void textIsKeptWithWhiteSpaceNormalised() {
        Unit u = Unit.parse("  W   m-2 ");
        assertEquals("W m-2", u.text());
        assertEquals("W m-2", u.display());
        assertTrue(Unit.parse("").isNone());
        assertEquals("1", Unit.parse("").display());
    }

    // ---- errors ---------------------------------------------------------------------------------------------

    @Test
    void unknownSymbolIsReportedWithTheNearestSymbol() {
        LawException e = assertThrows(LawException.class, () -> Unit.parse("kg mols"));
        Diagnostic d = onlyError(e);
        assertEquals("unknown unit 'mols'; did you mean 'mol'?", d.message());
        assertEquals(1, d.line());
        assertEquals(4, d.column());
        assertEquals(4, d.span().length());
        assertEquals("unit:1:4: unknown unit 'mols'; did you mean 'mol'?\nkg mols\n   ^^^^", e.getMessage());
    }

    @Test
    void aDivisionFollowedByTwoFactorsIsAmbiguous() {
        LawException e = assertThrows(LawException.class, () -> Unit.parse("J/kg K"));
        Diagnostic d = onlyError(e);
        assertEquals("ambiguous unit 'J/kg K': a '/' must be followed by one factor only; use parentheses, as in"
                + " J/(kg K), or move the factor before the '/', as in J K/kg", d.message());
        assertEquals(6, d.column());
        assertThrows(LawException.class, () -> Unit.parse("W/m2/K"));
    }

    @ParameterizedTest(name = "{0}")
    @ValueSource(strings = {"degC", "\u00b0C", "degF", "celsius"})
    void offsetTemperaturesAreRejectedWithAdvice(String text) {
        LawException e = assertThrows(LawException.class, () -> Unit.parse("J/" + text));
        Diagnostic d = onlyError(e);
        assertEquals("unit '" + text + "' has an offset from zero; write temperatures in K", d.message());
        assertEquals(3, d.column());
        assertEquals(text.length(), d.span().length());
    }

    @Test
    void badExponents() {
        LawException letter = assertThrows(LawException.class, () -> Unit.parse("m^x"));
        assertEquals("expected a whole-number exponent after '^' in unit 'm^x', found 'x'",
                onlyError(letter).message());
        assertEquals(3, onlyError(letter).column());
        LawException sign = assertThrows(LawException.class, () -> Unit.parse("kg m-"));
        assertEquals("expected a whole-number exponent after '-' in unit 'kg m-', found the end of the unit",
                onlyError(sign).message());
        assertEquals(6, onlyError(sign).column());
        LawException fraction = assertThrows(LawException.class, () -> Unit.parse("m2.5"));
        assertEquals("unit exponents must be whole numbers, found '2.5' in unit 'm2.5'", onlyError(fraction).message());
        assertEquals(2, onlyError(fraction).column());
        LawException large = assertThrows(LawException.class, () -> Unit.parse("m^100"));
        assertEquals("unit exponent too large (limit 64)", onlyError(large).message());
        assertEquals(2, onlyError(large).column());
    }

    @Test
    void unclosedParenthesis() {
        LawException e = assertThrows(LawException.class, () -> Unit.parse("J/(kg K"));
        Diagnostic d = onlyError(e);
        assertEquals("unclosed '(' in unit", d.message());
        assertEquals(3, d.column());
        LawException extra = assertThrows(LawException.class, () -> Unit.parse("kg m)"));
        assertEquals("expected a unit symbol, found ')' in unit 'kg m)'", onlyError(extra).message());
        assertEquals(5, onlyError(extra).column());
    }

    @Test
    void unitErrorsInADeclarationPointIntoTheWholeSource() {
        LawException e = assertThrows(LawException.class, () -> LawSet.parse("u.law",
                "input  x m\noutput y J/kg K\nlaw a: y = x\n"));
        Diagnostic d = onlyError(e);
        assertEquals(2, d.line());
        assertEquals(15, d.column());
        assertTrue(d.message().startsWith("ambiguous unit"), d.message());
    }

    /**
     * A unit is the rest of its line, so a mistake in one unit must not swallow the lines after it: each text
     * below has exactly one error, on line 1, and the declarations of lines 2 and 3 stay intact.
     */
    @ParameterizedTest(name = "{0}")
    @CsvSource(delimiter = '|', value = {
        "J/(kg K | 12 | unclosed '(' in unit",
        "m^      | 12 | expected a whole-number exponent after '^' in unit 'm^', found the end of the unit",
        "m*      | 12 | expected a unit symbol, found the end of the unit",
        "m/      | 12 | expected a unit symbol, found the end of the unit",
    })
    void aBadUnitDoesNotSwallowTheNextLine(String unit, int column, String message) {
        String text = "input  a " + unit + "\noutput y m\nlaw copy: y = a\n";
        LawException e = assertThrows(LawException.class, () -> LawSet.parse("u.law", text));
        Diagnostic d = onlyError(e);
        assertEquals(message, d.message());
        assertEquals(1, d.line(), () -> "the error belongs to line 1:\n" + e.getMessage());
        assertEquals(column, d.column());
    }

    @Test
    void coherentUnitsReadAsNamedUnitsTimesAPowerOfTheMetreWhereOneMatches() {
        // Source: BIPM SI Brochure, 9th edition (2019), table 4: W = kg m2 s-3, J = kg m2 s-2, N = kg m s-2,
        // Pa = kg m-1 s-2 (from memory)
        assertEquals("W m-2", Units.coherent(Dimension.of(0, 1, -3, 0, 0, 0, 0)).text());   // kg s-3, an energy flux
        assertEquals("Pa", Units.coherent(Dimension.of(-1, 1, -2, 0, 0, 0, 0)).text());  // an exact match wins
        assertEquals("J m-2", Units.coherent(Dimension.of(0, 1, -2, 0, 0, 0, 0)).text());  // kg s-2
        assertEquals("W m", Units.coherent(Dimension.of(3, 1, -3, 0, 0, 0, 0)).text());
        assertEquals("kg m-2 s-1", Units.coherent(Dimension.of(-2, 1, -1, 0, 0, 0, 0)).text());  // a mass flux
        assertEquals("mol s-1", Units.coherent(Dimension.of(0, 0, -1, 0, 0, 1, 0)).text());
        assertEquals("W", Units.coherent(Dimension.of(2, 1, -3, 0, 0, 0, 0)).text());
        // diagnostics keep the base symbols beside a declared unit, to compare dimensions
        assertEquals("kg s-3", Units.named(Dimension.of(0, 1, -3, 0, 0, 0, 0)).text());
    }
}
