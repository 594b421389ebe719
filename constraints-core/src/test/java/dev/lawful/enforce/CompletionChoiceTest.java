package dev.lawful.enforce;

import static dev.lawful.enforce.CompletionModelsTest.condition;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.plan.ReferencePoint;
import java.util.List;
import java.util.Locale;
import org.junit.jupiter.api.Test;

/**
 * Which outputs are completed: the automatic choice, its condition number against an independent SVD, and every
 * refusal (singular choice, dependent laws, wrong count, an output no law involves, a guess that uses a completed
 * output), with the messages word for word.
 */
class CompletionChoiceTest {

    /** Completing the first two outputs is singular: their columns (1, 2) and (1, 2) are equal. */
    private static final String NAIVE = String.join("\n",
            "input x[2]",
            "output y[4]",
            "law a: y[0] + y[1] + y[2] = x[0]",
            "law b: 2*y[0] + 2*y[1] + y[3] = x[1]",
            "");

    private static String message(Runnable build) {
        return assertThrows(LawException.class, build::run).getMessage();
    }

    @Test
    void automaticChoiceAvoidsTheSingularNaiveChoiceAndReportsItsConditionNumber() {
        LawSet laws = LawSet.parse("naive.law", NAIVE);
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
        double naive = condition(new double[][] {{1, 1}, {2, 2}});
        assertTrue(!(naive < 1e15), "the first two outputs are a singular choice (condition " + naive + ")");
        Completion c = Completion.of(laws);
        assertArrayEquals(new int[] {0, 2}, c.completedOutputs());
        assertEquals(List.of("completed outputs chosen automatically: y[0], y[2]"), c.warnings());
        // the condition number is that of the equilibrated block: rows over each law's natural scale (the sum of
        // the magnitudes of its terms), columns times the outputs' magnitudes, at the generic reference point
        double[] x = ReferencePoint.generic(laws).x();
        double[] y = ReferencePoint.generic(laws).y();
        double sa = y[0] + y[1] + y[2] + x[0];
        double sb = 2 * y[0] + 2 * y[1] + y[3] + x[1];
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
        double reference = condition(new double[][] {{y[0] / sa, y[2] / sa}, {2 * y[0] / sb, 0}});
        assertEquals(reference, c.condition(), 1e-12 * reference);
        assertTrue(c.condition() < 10, "well conditioned");
        // the same choice through the builder, and a restricted one
        assertArrayEquals(new int[] {0, 2}, Completion.builder(laws).automatic().build().completedOutputs());
        Completion restricted = Completion.builder(laws).allow("y[2]", "y[3]").build();
        assertArrayEquals(new int[] {2, 3}, restricted.completedOutputs());
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
        double restrictedReference = condition(new double[][] {{y[2] / sa, 0}, {0, y[3] / sb}});
        assertEquals(restrictedReference, restricted.condition(), 1e-12 * restrictedReference);
    }

    @Test
    void conditionNumberIsTakenAtTheReferencePoint() {
        // affine: A(x) = [[x0, 1], [1, -x2]] at the reference point x = (2, 1, 3)
        LawSet laws = LawSet.parse("<affine>", String.join("\n",
                "input x[3]",
                "output y[3]",
                "law p: x[0]*y[0] + y[1] = x[1]",
                "law q: y[0] - x[2]*y[1] + y[2] = 0",
                "complete y[0], y[1]",
                ""));
        Completion c = Completion.builder(laws).referencePoint(new double[] {2, 1, 3}, new double[] {1, 1, 1}).build();
        assertEquals(Tier.AFFINE, c.tier());
        // equilibrated at y = (1, 1, 1): rows over the laws' natural scales |x0 y0| + |y1| + |x1| = 4 and
        // |y0| + |x2 y1| + |y2| = 5, columns times |y0| = |y1| = 1
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
        double reference = condition(new double[][] {{2 / 4.0, 1 / 4.0}, {1 / 5.0, -3 / 5.0}});
        assertEquals(reference, c.condition(), 1e-12 * reference);
        // nonlinear: ∂(y0² + y0·y1)/∂(y0, y1) = (2 y0 + y1, y0), ∂(y1³ − y0)/∂(y0, y1) = (−1, 3 y1²) at y = (1.5, 0.5)
        LawSet nonlinear = LawSet.parse("<nonlinear>", String.join("\n",
                "input x[2]",
                "output y[2]",
                "law s: y[0]^2 + y[0]*y[1] = x[0]",
                "law t: y[1]^3 - y[0] = x[1]",
                ""));
        Completion n = Completion.builder(nonlinear).referencePoint(new double[] {1, 1}, new double[] {1.5, 0.5})
                .build();
        // equilibrated: natural scales y0² + y0 y1 + x0 = 4 and y1³ + y0 + x1 = 2.625, columns times 1.5 and 0.5
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
        double nref = condition(new double[][] {{3.5 * 1.5 / 4, 1.5 * 0.5 / 4}, {-1 * 1.5 / 2.625, 0.75 * 0.5 / 2.625}});
        assertEquals(nref, n.condition(), 1e-12 * nref);
    }

    @Test
    void aSingularChoiceIsRefusedWithTheAutomaticChoiceSuggested() {
        LawSet laws = LawSet.parse("naive.law", NAIVE);
        assertEquals("naive.law:1:1: the completed outputs y[0], y[1] make the laws singular at the reference point"
                        + " (no law system for them has a unique solution); a well-conditioned choice is: complete"
                        + " y[0], y[2]\n"
                        + "input x[2]\n"
                        + "^",
                message(() -> Completion.builder(laws).complete("y[0]", "y[1]").build()));
        LawSet written = LawSet.parse("naive.law", NAIVE + "complete y[1], y[0]\n");
        assertEquals("naive.law:5:1: the completed outputs y[1], y[0] make the laws singular at the reference point"
                        + " (no law system for them has a unique solution); a well-conditioned choice is: complete"
                        + " y[0], y[2]\n"
                        + "complete y[1], y[0]\n"
                        + "^^^^^^^^^^^^^^^^^^^",
                message(() -> Completion.of(written)));
    }

    @Test
    void redundantLawsAreRefusedByName() {
        LawSet laws = LawSet.parse("redundant.law", String.join("\n",
                "input x[2]",
                "output y[3]",
                "law a: y[0] + y[1] = x[0]",
                "law b: y[2] = x[1]",
                "law c: 2*y[0] + 2*y[1] = 2*x[0]",
                ""));
        // c − 2·a cancels outputs, inputs and constants alike: c says nothing new
        assertEquals("redundant.law:5:5: law 'c' is redundant: it is 2*a (outputs, inputs and constants alike, at"
                        + " every point tried), so it says nothing new; remove it\n"
                        + "law c: 2*y[0] + 2*y[1] = 2*x[0]\n"
                        + "    ^",
                message(() -> Completion.of(laws)));
    }

    @Test
    void contradictoryLawsAreRefusedByName() {
        LawSet laws = LawSet.parse("contradictory.law", String.join("\n",
                "input x[2]",
                "output y[3]",
                "law a: y[0] + y[1] = x[0]",
                "law b: y[0] + y[1] = x[1]",
                ""));
        // b − a leaves x0 − x1 over: no outputs satisfy both unless the inputs are equal
        double[] x = ReferencePoint.generic(laws).x();
        assertEquals("0.0869423", new java.math.BigDecimal(Math.abs(x[0] - x[1]))
                .round(new java.math.MathContext(6)).toPlainString());
        assertEquals("contradictory.law:4:5: laws 'a' and 'b' contradict each other: law 'a' has the same output"
                        + " terms as law 'b' but differs from it by 0.0869423 at the reference point, so no outputs"
                        + " satisfy them all; one of these laws is wrong: correct it\n"
                        + "law b: y[0] + y[1] = x[1]\n"
                        + "    ^",
                message(() -> Completion.of(laws)));
    }

    private static final String TWO_LAWS = String.join("\n",
            "input x[2]",
            "output y[3]",
            "law a: y[0] + y[1] = x[0]",
            "law b: y[0] - y[2] = x[1]",
            "");

    @Test
    void theNumberOfCompletedOutputsMustEqualTheNumberOfScalarLaws() {
        LawSet laws = LawSet.parse("count.law", TWO_LAWS + "complete y[0], y[1], y[2]\n");
        assertEquals("count.law:5:1: the laws give 2 scalar equations but 3 outputs are completed; complete exactly 2"
                        + " (one per scalar law)\n"
                        + "complete y[0], y[1], y[2]\n"
                        + "^^^^^^^^^^^^^^^^^^^^^^^^^",
                message(() -> Completion.of(laws)));
        LawSet none = LawSet.parse("count.law", TWO_LAWS);
        assertEquals("count.law:1:1: the laws give 2 scalar equations but 1 output is completed; complete exactly 2"
                        + " (one per scalar law)\n"
                        + "input x[2]\n"
                        + "^",
                message(() -> Completion.builder(none).complete("y[0]").build()));
    }

    @Test
    void aWrongCountFromTheBuilderDoesNotPointAtTheOverriddenStatement() {
        // the builder's list overrides the law text's complete statement, which is valid and not in use here;
        // pointing at that statement under "1 output is completed" misleads (it names two)
        LawSet laws = LawSet.parse("count.law", TWO_LAWS + "complete y[0], y[1]\n");
        assertEquals("count.law:1:1: the laws give 2 scalar equations but 1 output is completed; complete exactly 2"
                        + " (one per scalar law)\n"
                        + "input x[2]\n"
                        + "^",
                message(() -> Completion.builder(laws).complete("y[0]").build()));
    }

    @Test
    void aCompletedOutputNoLawInvolvesIsRefused() {
        LawSet laws = LawSet.parse("uninvolved.law", String.join("\n",
                "input x[2]",
                "output y[3]",
                "law a: y[0] + y[1] = x[0]",
                "law b: y[0] - y[1] = x[1]",
                "complete y[0], y[2]",
                ""));
        assertEquals("uninvolved.law:5:1: completed output y[2] is not involved in any law, so no law can determine"
                        + " it; complete an output that a law involves\n"
                        + "complete y[0], y[2]\n"
                        + "^^^^^^^^^^^^^^^^^^^",
                message(() -> Completion.of(laws)));
    }

    @Test
    void aGuessThatUsesACompletedOutputIsRefused() {
        LawSet laws = LawSet.parse("guess.law", String.join("\n",
                "input x",
                "output c",
                "output d",
                "output f",
                "law a: c^2 + d = x",
                "law b: d*c = f",
                "guess c = d",
                "complete c, d",
                ""));
        assertEquals("guess.law:7:1: the guess for c uses the completed output d; a guess may use inputs, constants"
                        + " and free outputs only\n"
                        + "guess c = d\n"
                        + "^^^^^^^^^^^",
                message(() -> Completion.of(laws)));
        // the same guess is fine when d is free
        Completion ok = Completion.builder(laws).complete("c", "f").build();
        assertEquals(Tier.NONLINEAR, ok.tier());
    }

    @Test
    void unknownOutputsAndEmptyLawSetsAreRefused() {
        LawSet laws = LawSet.parse("two.law", TWO_LAWS);
        assertEquals("two.law:1:1: no output element 'y[7]' for the completed output; the outputs are y[0], y[1],"
                        + " y[2]\n"
                        + "input x[2]\n"
                        + "^",
                message(() -> Completion.builder(laws).complete("y[0]", "y[7]").build()));
        assertEquals("two.law:1:1: output y[0] is named twice as completed output\n"
                        + "input x[2]\n"
                        + "^",
                message(() -> Completion.builder(laws).complete("y[0]", "y[0]").build()));
        LawSet empty = LawSet.parse("empty.law", "input x\noutput y\n");
        assertEquals("empty.law:1:1: the law set has no laws, so there is nothing to complete\n"
                        + "input x\n"
                        + "^",
                message(() -> Completion.of(empty)));
    }

    @Test
    void tooFewAllowedOutputsAreRefusedInGoodEnglish() {
        LawSet laws = LawSet.parse("two.law", TWO_LAWS);
        assertEquals("two.law:1:1: the laws give 2 scalar equations but only 1 output may be completed; allow at"
                        + " least 2 outputs\n"
                        + "input x[2]\n"
                        + "^",
                message(() -> Completion.builder(laws).allow("y[1]").build()));
    }

    private static final String ILL = String.join("\n",
            "input x[2]",
            "output y[3]",
            "law a: y[0] + y[1] + y[2] = x[0]",
            "law b: y[0] + 1.000000001*y[1] + 2*y[2] = x[1]",
            "complete y[0], y[1]",
            "");

    @Test
    void aLargeConditionNumberGivesAWarning() {
        LawSet ill = LawSet.parse("ill.law", ILL);
        Completion c = Completion.of(ill);
        double[] x = ReferencePoint.generic(ill).x();
        double[] y = ReferencePoint.generic(ill).y();
        double sa = y[0] + y[1] + y[2] + x[0];
        double sb = y[0] + 1.000000001 * y[1] + 2 * y[2] + x[1];
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition (of the equilibrated block)
        double reference = condition(new double[][] {{y[0] / sa, y[1] / sa}, {y[0] / sb, 1.000000001 * y[1] / sb}});
        assertEquals(reference, c.condition(), 1e-6 * reference);
        assertEquals(String.format(Locale.ROOT, "%.3g", reference), "5.17e+09");
        assertEquals(List.of("the completed outputs are ill-conditioned (condition number 5.17e+09 > 1e+08): errors of"
                + " the free outputs are amplified; consider the automatic choice"), c.warnings());
        // the automatic choice is well conditioned and gives no such warning
        Completion auto = Completion.builder(LawSet.parse("ill.law", ILL)).automatic().build();
        assertTrue(auto.condition() < 10, "automatic choice condition " + auto.condition());
        assertEquals(1, auto.warnings().size());
    }

    @Test
    void theWarningDoesNotDependOnTheDefaultLocale() {
        Locale saved = Locale.getDefault();
        try {
            Locale.setDefault(Locale.GERMANY);
            Completion c = Completion.of(LawSet.parse("ill.law", ILL));
            assertEquals(List.of("the completed outputs are ill-conditioned (condition number 5.17e+09 > 1e+08): errors"
                    + " of the free outputs are amplified; consider the automatic choice"), c.warnings());
        } finally {
            Locale.setDefault(saved);
        }
    }

    @Test
    void columnsNameEachColumnInBothLayouts() {
        LawSet laws = LawSet.parse("naive.law", NAIVE + "complete y[3], y[1]\n");
        Completion declared = Completion.of(laws);
        Completion freeFirst = Completion.builder(laws).layout(Completion.Layout.FREE_FIRST).build();
        assertEquals(List.of("y[0]", "y[1]", "y[2]", "y[3]"), declared.columns());
        assertEquals(List.of("y[0]", "y[2]", "y[3]", "y[1]"), freeFirst.columns());
        assertEquals(List.of("y[0]", "y[2]"), freeFirst.freeNames());
        assertEquals(List.of("y[3]", "y[1]"), freeFirst.completedNames());
        double[] x = {3, 5};
        double[] z = {0.5, 0.25};
        double[] a = new double[4];
        double[] b = new double[4];
        declared.forward(x, z, 1, a, null, declared.newWorkspace());
        freeFirst.forward(x, z, 1, b, null, freeFirst.newWorkspace());
        // the same numbers, permuted as columns() says
        assertArrayEquals(new double[] {a[0], a[2], a[3], a[1]}, b, 0.0);
        // y[1] = x0 − y0 − y2 and y[3] = x1 − 2 y0 − 2 y1
        assertEquals(3 - 0.5 - 0.25, a[1], 0.0);
        assertEquals(5 - 1 - 2 * a[1], a[3], 0.0);
    }
}
