package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.lawful.algebra.LawSet;
import org.junit.jupiter.api.Test;

/** Tier classification for each kind of law, for mixed sets (the hardest tier decides), and per choice. */
class CompletionTierTest {

    /** The tier of completing {@code completed} in a law set over inputs x[3] and outputs y[3]. */
    private static Tier tier(String completed, String... laws) {
        StringBuilder text = new StringBuilder("input x[3]\noutput y[3]\n");
        for (int i = 0; i < laws.length; i++) {
            text.append("law l").append(i).append(": ").append(laws[i]).append('\n');
        }
        text.append("complete ").append(completed).append('\n');
        return Completion.of(LawSet.parse("<tier>", text.toString())).tier();
    }

    @Test
    void constantCoefficientsAreConstantAffine() {
        assertEquals(Tier.CONSTANT_AFFINE, tier("y[1]", "y[0] + 2*y[1] = x[0]"));
        assertEquals(Tier.CONSTANT_AFFINE, tier("y[1], y[2]", "y[0] - y[1] = 3*x[0] - x[1]", "y[2] = 0.5*y[1] + 1"));
        assertEquals(Tier.CONSTANT_AFFINE, tier("y[1]", "-(y[1] - y[0])/4 = x[2]"));
        // a power of one is the output itself
        assertEquals(Tier.CONSTANT_AFFINE, tier("y[1]", "y[1]^1 = x[0]"));
        // unit factors are constants too
        LawSet units = LawSet.parse("<units>", "input a kmol/h\noutput b mol/s\noutput c mmol/s\nlaw m: b + c = a\n"
                + "complete b\n");
        assertEquals(Tier.CONSTANT_AFFINE, Completion.of(units).tier());
        assertEquals("constant-affine", Tier.CONSTANT_AFFINE.label());
    }

    @Test
    void coefficientsFromInputsOrFreeOutputsAreAffine() {
        assertEquals(Tier.AFFINE, tier("y[1]", "x[0]*y[1] = x[1]"));
        assertEquals(Tier.AFFINE, tier("y[1]", "sin(x[0])*y[1] + y[0] = 1"));
        assertEquals(Tier.AFFINE, tier("y[1]", "y[0]*y[1] = x[0]"), "a free output as coefficient");
        assertEquals(Tier.AFFINE, tier("y[1]", "y[1]/x[2] = y[0]"));
        // linear in the completed output with a constant coefficient, but not linear in the rest: no fold exists
        assertEquals(Tier.AFFINE, tier("y[1]", "y[1] = exp(x[0]) + y[0]^2"));
        assertEquals(Tier.AFFINE, tier("y[1]", "y[1] = x[0]*x[1]"));
        assertEquals("affine", Tier.AFFINE.label());
    }

    @Test
    void nonlinearInTheCompletedOutputsIsNonlinear() {
        assertEquals(Tier.NONLINEAR, tier("y[1]", "y[1]^2 = x[0] + 1"));
        assertEquals(Tier.NONLINEAR, tier("y[1], y[2]", "y[1]*y[2] = x[0]", "y[1] - y[2] = x[1]"));
        assertEquals(Tier.NONLINEAR, tier("y[1]", "exp(y[1]) = x[0] + 1"));
        assertEquals(Tier.NONLINEAR, tier("y[1]", "x[0]/y[1] = 1"));
        assertEquals(Tier.NONLINEAR, tier("y[1]", "sqrt(y[1]^2 + 1) = x[0]"));
        assertEquals(Tier.NONLINEAR, tier("y[1]", "y[1]^0.5 = x[0]"));
        assertEquals("nonlinear", Tier.NONLINEAR.label());
    }

    @Test
    void theTierDependsOnWhichOutputsAreCompleted() {
        // y0 enters squared, y1 linearly: completing y1 is affine, completing y0 is nonlinear
        assertEquals(Tier.AFFINE, tier("y[1]", "y[0]^2 + y[1] = x[0]"));
        assertEquals(Tier.NONLINEAR, tier("y[0]", "y[0]^2 + y[1] = x[0] + 4"));
    }

    @Test
    void mixedSetsTakeTheHardestTier() {
        String constant = "y[0] + y[1] + y[2] = x[0]";
        String affine = "x[1]*y[1] - y[2] = 1";
        String nonlinear = "y[2]^2 + y[1] = x[2] + 5";
        assertEquals(Tier.AFFINE, tier("y[1], y[2]", constant, affine));
        assertEquals(Tier.NONLINEAR, tier("y[1], y[2]", constant, nonlinear));
        assertEquals(Tier.NONLINEAR, tier("y[1], y[2]", affine, nonlinear));
        assertEquals(Tier.NONLINEAR, tier("y[0], y[1], y[2]", constant, affine, nonlinear));
    }

    @Test
    void eachTierComputesTheClosedForm() {
        // the tier is not only a label: the three solve paths give the closed-form solutions
        double[] x = {3, 2, 5};
        double[] z = {1.5, 0.25};
        LawSet constant = LawSet.parse("<c>", "input x[3]\noutput y[3]\nlaw l: y[0] + 2*y[1] + y[2] = x[0]\n"
                + "complete y[1]\n");
        LawSet affine = LawSet.parse("<a>", "input x[3]\noutput y[3]\nlaw l: x[1]*y[1] + y[0]*y[2] = x[0]\n"
                + "complete y[1]\n");
        LawSet nonlinear = LawSet.parse("<n>", "input x[3]\noutput y[3]\nlaw l: y[1]^2 = x[2] + y[0] + y[2]\n"
                + "guess y[1] = x[1]\ncomplete y[1]\n");
        double[] y = new double[3];
        Completion c = Completion.of(constant);
        c.forward(x, z, 1, y, null, c.newWorkspace());
        assertEquals((3 - 1.5 - 0.25) / 2, y[1], 0.0);
        Completion a = Completion.of(affine);
        a.forward(x, z, 1, y, null, a.newWorkspace());
        assertEquals((3 - 1.5 * 0.25) / 2, y[1], 0.0);
        Completion n = Completion.of(nonlinear);
        n.forward(x, z, 1, y, null, n.newWorkspace());
        assertEquals(Math.sqrt(5 + 1.5 + 0.25), y[1], Math.ulp(Math.sqrt(6.75)));
    }
}
