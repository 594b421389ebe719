package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.lawful.enforce.LawResiduals;
import dev.lawful.enforce.ResidualReport;
import org.junit.jupiter.api.Test;

/**
 * The unit a law is reported in when a side is one product of declared quantities ({@link LawSet#lawUnit}, chosen
 * by {@link DeclaredLawUnit}): its text, its SI factor and that residuals are converted with that factor.
 *
 * <p>Factors below: Source: BIPM SI Brochure, 9th edition (2019): Table 7 (SI prefixes: M = 10^6, k = 10^3),
 * Table 4 (ohm, W, J, Hz are coherent: factor 1) and Table 8 (non-SI units accepted for use with the SI:
 * 1 h = 3600 s, 1 d = 86 400 s).
 */
class DeclaredLawUnitTest {
    private static final double MEGA = 1e6;
    private static final double KILO = 1e3;
    private static final double HOUR = 3600;
    private static final double DAY = 86400;

    private static LawSet parse(String... lines) {
        return LawSet.parse("units.law", String.join("\n", lines) + "\n");
    }

    private static void assertUnit(String text, double factor, Unit actual) {
        assertEquals(text, actual.text());
        assertEquals(factor, actual.factor(), 1e-15 * factor, text);
        // the text parses back to the same unit, so what is shown is exactly what residuals are divided by
        assertEquals(Unit.parse(text), actual);
    }

    private static final String[] JOULE = {"input R ohm", "input U kV", "output P MW", "law joule: R * P = U * U"};

    @Test
    void resistanceTimesPowerReadsInTheDeclaredUnits() {
        Unit u = parse(JOULE).lawUnit("joule");
        assertUnit("ohm MW", MEGA, u);
        // the law's dimension, as the checker found it: ohm W = V2 (before: kg2 m4 s-6 A-2)
        assertEquals(Unit.parse("V2").dimension(), u.dimension());
        assertEquals("kg2 m4 s-6 A-2", u.dimension().toString());
    }

    @Test
    void residualsAreReportedInTheUnitShown() {
        LawSet laws = parse(JOULE);
        // R = 2 ohm, U = 1 kV, P = 0.6 MW: R P - U^2 = 1.2e6 - 1e6 = 2e5 V2 = 0.2 ohm MW
        LawResiduals r = ResidualReport.of(laws, new double[] {2, 1}, new double[] {0.6}, 1, 1e-9).law("joule");
        assertEquals(laws.lawUnit("joule"), r.unit());
        assertEquals(laws.lawUnit("joule"), laws.expand().unit(0));
        double si = 2 * 0.6 * MEGA - KILO * KILO;
        assertEquals(si / MEGA, r.absolute().max(), 1e-12);
    }

    @Test
    void repeatedSymbolsAreCombined() {
        // kg/s * kJ/(kg K) * K: kg and K cancel; the left side sums two units, so the right side is used
        assertUnit("kJ/s", KILO, parse("input m kg/s", "input dT K", "const cp = 4.18 kJ/(kg K)", "output Q kW",
                "output L W", "law heat: Q + L = m * cp * dT").lawUnit("heat"));
        // W m-2 * m2 is W
        assertUnit("W", 1, parse("input A m2", "output E W m-2", "output Q kW", "output L W",
                "law area: E * A = Q + L").lawUnit("area"));
        // powers multiply the exponents: kg (m/s)^2
        assertUnit("kg m2/s2", 1, parse("input mass kg", "input v m/s", "output E1 J", "output E2 kJ",
                "law kinetic: 0.5 * mass * v^2 = E1 + E2").lawUnit("kinetic"));
    }

    @Test
    void quotientsKeepOneSlash() {
        // J/kg * kg m-2 d-1 = J m-2 d-1, written with one '/' followed by one factor
        assertUnit("J/(m2 d)", 1 / DAY, parse("input Lv J/kg", "input w kg m-2 d-1", "output E W m-2",
                "output F mW m-2", "law evap: Lv * w = E + F").lawUnit("evap"));
        // nothing above the line: a negative power
        assertUnit("h-1", 1 / HOUR, parse("input tau h", "output k1 s-1", "output k2 Hz",
                "law rate: k1 + k2 = 1 / tau").lawUnit("rate"));
    }

    @Test
    void oneDeclaredUnitComesBeforeAProduct() {
        // Q alone is in kW: the product kg/s kJ/(kg K) K on the other side is not used
        assertUnit("kW", KILO, parse("input m kg/s", "input dT K", "const cp = 4.18 kJ/(kg K)", "output Q kW",
                "law heat: m * cp * dT = Q").lawUnit("heat"));
        // a sum of terms in one declared unit is in that unit
        assertUnit("kW", KILO, parse("input R ohm", "input I A", "output P1 kW", "output P2 kW",
                "law heat: P1 + P2 = R * I^2").lawUnit("heat"));
    }

    @Test
    void aVectorLawHasOneUnitForEveryElement() {
        LawSet laws = parse("input m[3] kg/s", "input dT[3] K", "const cp = 4.18 kJ/(kg K)", "output Q[3] kW",
                "output L[3] W", "law heat: Q + L = m * cp * dT");
        assertUnit("kJ/s", KILO, laws.lawUnit("heat"));
        for (int i = 0; i < 3; i++) {
            assertEquals(laws.lawUnit("heat"), laws.expand().unit(i), "element " + i);
        }
        // a vector literal counts when every element is in the same units
        assertUnit("kJ/s", KILO, parse("input m[2] kg/s", "input dT[2] K", "const cp = 4.18 kJ/(kg K)",
                "output Q[2] kW", "output L[2] W", "law heat: Q + L = [m[0], m[1]] * cp * dT").lawUnit("heat"));
    }

    @Test
    void definitionsCountAsDeclaredQuantities() {
        // given = m * cp * cooling, and cooling is a sum in K the user named: kg/s kJ/(kg K) K
        LawSet laws = parse("input m kg/s", "input Ts K", "output Tr K", "output Q kW", "output L W",
                "const cp = 4.18 kJ/(kg K)", "let cooling = Ts - Tr", "let given = m * cp * cooling",
                "law heat: given = Q + L");
        assertUnit("kJ/s", KILO, laws.lawUnit("heat"));
    }

    @Test
    void sumsOnBothSidesKeepTheCoherentUnit() {
        // no side is one declared unit or one product: the coherent SI unit, named where one matches
        assertUnit("mol s-1", 1, parse("input a mol/s", "input b kmol/h", "output c mol/s", "output d kmol/h",
                "law balance: c + d = a + b").lawUnit("balance"));
        // a sum written inside a product does not count either: W m-2, not J/(m2 d)
        assertUnit("W m-2", 1, parse("input Lv J/kg", "input w1 kg m-2 d-1", "input w2 kg m-2 d-1",
                "output E W m-2", "output F mW m-2", "law evap: Lv * (w1 - w2) = E + F").lawUnit("evap"));
        // nor does a function: a reduction is a sum
        assertUnit("W", 1, parse("input P[2] kW", "input L W", "output Q kW", "output M W",
                "law total: sum(P) + L = Q + M").lawUnit("total"));
    }
}
