package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Limits: parsing and printing, expansion into scalar limits g &ge; 0, their analysis and their evaluator. */
class LawSetLimitTest {
    private static final String TEXT = """
            input  feed_total mol/s
            input  dt s
            output P W
            output q[2] mol
            output dqdt[2] mol/s
            output out[2] mol/s
            output T K
            const T_max = 400 K
            law split: sum(out) = feed_total
            limit rain: P >= 0
            limit dry: q + dqdt * dt >= 0
            limit share: 0 <= out <= feed_total
            limit cap: T <= T_max
            limit hot: 300 K >= T
            """.replace("300 K", "T_max - 100 * T_max / 400");

    private static LawSet laws() {
        return LawSet.parse("limits.law", TEXT);
    }

    private static ExpandedLaws expanded() {
        return laws().expand();
    }

    @Test
    void printedTextParsesBackEqual() {
        LawSet laws = laws();
        LawSet again = LawSet.parse("again.law", laws.toString());
        assertEquals(laws, again);
        assertEquals(laws.toString(), again.toString());
        assertTrue(laws.toString().contains("limit share: 0 <= out <= feed_total\n"), laws.toString());
        assertEquals(5, laws.limits().size());
    }

    @Test
    void theBuilderWritesTheSameLimits() {
        LawSet built = LawSet.builder().output("x", "m").output("y", "m").constant("one", 1, "m")
                .law("same", "x = y").limit("pos", "x >= 0").limitBetween("range", "0", "y", "one")
                .limit("cap", "y", "<=", "2 * one").build();
        LawSet parsed = LawSet.parse("f.law", "output x m\noutput y m\nconst one = 1 m\nlaw same: x = y\n"
                + "limit pos: x >= 0\nlimit range: 0 <= y <= one\nlimit cap: y <= 2 * one\n");
        assertEquals(parsed, built);
        LawException bad = assertThrows(LawException.class, () -> LawSet.builder().output("x", "m")
                .limit("odd", "x", "<", "0").build());
        assertTrue(bad.getMessage().contains("a limit's relation is '<=' or '>=', found '<'"), bad.getMessage());
    }

    @Test
    void scalarLimitsAreNamedAndOrderedAsDocumented() {
        ExpandedLaws e = expanded();
        List<String> names = new ArrayList<>();
        for (int j = 0; j < e.limitCount(); j++) {
            names.add(e.limit(j).name());
        }
        assertEquals(List.of("rain", "dry[0]", "dry[1]", "share[0] (lower)", "share[0] (upper)", "share[1] (lower)",
                "share[1] (upper)", "cap", "hot"), names);
        assertEquals(2, laws().limitShape("share"));
        assertEquals(0, laws().limitShape("rain"));
    }

    @Test
    void aConstantBoundOnOneOutputIsRecognised() {
        ExpandedLaws e = expanded();
        LawSet laws = laws();
        ScalarLimit rain = e.limit(0);
        assertEquals(laws.outputOffset("P"), rain.singleOutput());
        assertEquals(0.0, rain.bound());
        assertTrue(rain.lower());
        assertEquals("W", rain.unit().text());
        ScalarLimit cap = e.limit(7);
        assertEquals(laws.outputOffset("T"), cap.singleOutput());
        assertEquals(400.0, cap.bound());
        assertFalse(cap.lower());
        ScalarLimit hot = e.limit(8);
        assertEquals(300.0, hot.bound());
        assertFalse(hot.lower());
        // the upper piece of share depends on an input: one output, but no constant bound
        ScalarLimit upper = e.limit(4);
        assertEquals(laws.outputOffset("out"), upper.singleOutput());
        assertTrue(Double.isNaN(upper.bound()));
        assertFalse(upper.lower());
        assertTrue(e.limit(3).lower());
        assertEquals(0.0, e.limit(3).bound());
    }

    @Test
    void aLimitOfSeveralOutputsHasNoSingleOutput() {
        ExpandedLaws e = expanded();
        LawSet laws = laws();
        ScalarLimit dry1 = e.limit(2);
        assertEquals(-1, dry1.singleOutput());
        assertTrue(Double.isNaN(dry1.bound()));
        assertTrue(dry1.lower());
        assertArrayEquals(new int[] {laws.outputOffset("q") + 1, laws.outputOffset("dqdt") + 1}, dry1.outputs());
        assertEquals("mol", dry1.unit().text());
    }

    @Test
    void aBoundInAnotherUnitIsGivenInTheOutputsUnit() {
        LawSet laws = LawSet.parse("km.law", "output d km\nconst most = 2500 m\nlimit far: d <= most\n");
        ScalarLimit far = laws.expand().limit(0);
        assertEquals(2.5, far.bound(), 1e-15);
        assertFalse(far.lower());
        // g is in SI: 2500 m - 1000 m/km * d
        assertEquals(500.0, far.value().evaluate(new double[] {2.0}), 1e-12);
    }

    @Test
    void theEvaluatorGivesValuesAndJacobians() {
        ExpandedLaws e = expanded();
        LawEvaluator ev = e.limitEvaluator();
        assertEquals(e.limitCount(), ev.lawCount());
        assertEquals("dry[1]", ev.lawName(2));
        LawSet laws = laws();
        double[] x = {3.0, 0.5};
        double[] y = new double[laws.outputWidth()];
        y[laws.outputOffset("P")] = -2;
        y[laws.outputOffset("q") + 1] = 1;
        y[laws.outputOffset("dqdt") + 1] = -4;
        y[laws.outputOffset("out")] = 1;
        y[laws.outputOffset("T")] = 350;
        double[] g = new double[ev.lawCount()];
        double[] scales = new double[ev.lawCount()];
        double[] jy = new double[ev.outputNonzeros()];
        double[] jx = new double[ev.inputNonzeros()];
        ev.evaluate(x, y, 1, g, scales, jy, jx);
        assertEquals(-2.0, g[0]);
        assertEquals(1 - 4 * 0.5, g[2], 1e-15);
        assertEquals(1.0, g[3]);
        assertEquals(2.0, g[4]);
        assertEquals(50.0, g[7]);
        // d dry[1] / d dqdt[1] = dt, d dry[1] / d dt = dqdt[1]
        int[] cols = ev.outputColumns(2);
        int k = java.util.Arrays.binarySearch(cols, laws.outputOffset("dqdt") + 1);
        assertEquals(0.5, jy[ev.outputOffset(2) + k]);
        assertArrayEquals(new int[] {1}, ev.inputColumns(2));
        assertEquals(-4.0, jx[ev.inputOffset(2)]);
        for (int j = 0; j < e.limitCount(); j++) {
            double[] vars = new double[laws.inputWidth() + laws.outputWidth()];
            System.arraycopy(x, 0, vars, 0, x.length);
            System.arraycopy(y, 0, vars, x.length, y.length);
            assertEquals(e.limit(j).value().evaluate(vars), g[j], 1e-12, e.limit(j).name());
        }
    }

    @Test
    void aLawSetWithoutLimitsHasNone() {
        ExpandedLaws e = LawSet.parse("f.law", "output y m\nlaw z: y = 0\n").expand();
        assertEquals(0, e.limitCount());
        assertEquals(0, e.limitEvaluator().lawCount());
    }

    @Test
    void severalLimitErrorsAreReportedInOnePass() {
        LawException ex = assertThrows(LawException.class, () -> LawSet.parse("f.law",
                "input a m\noutput y m\noutput z s\nlimit u: a >= 0\nlimit u: y >= 0\nlimit w: y >= z\n"));
        assertEquals(3, ex.errors().size(), ex.getMessage());
        // what needs the expanded terms is judged in a second pass, again all at once
        LawException later = assertThrows(LawException.class, () -> LawSet.parse("f.law",
                "output y m\noutput z\nlimit v: y * z >= 0\nlimit lo: z >= 2\nlimit hi: 1 >= z\n"));
        assertEquals(List.of(3, 5), later.errors().stream().map(Diagnostic::line).toList(), later.getMessage());
    }

    @Test
    void aVariableCannotTakeALimitsName() {
        LawException ex = assertThrows(LawException.class, () -> LawSet.parse("f.law",
                "output y m\nconst one = 1 m\nlimit pos: y >= 0\nlaw pos: y = one\n"));
        assertEquals("law 'pos' has the name of the limit at line 3; laws and limits share one namespace",
                ex.errors().get(0).message());
    }

    @Test
    void theLimitRecordRefusesMixedChains() {
        Expr x = new Expr.Name("x");
        assertThrows(IllegalArgumentException.class, () -> new Declaration.Limit("m", List.of(x, x, x),
                List.of(Declaration.Relation.AT_MOST, Declaration.Relation.AT_LEAST)));
        assertThrows(IllegalArgumentException.class, () -> new Declaration.Limit("m", List.of(x),
                List.of()));
    }
}
