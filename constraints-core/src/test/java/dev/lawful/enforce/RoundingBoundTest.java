package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;

import dev.lawful.algebra.LawSet;

/**
 * {@link RoundingBound}: completed outputs from the double and float entry points are inside the bound the
 * completion documents, an output moved by a few float ulps after enforcement is outside it, and a hand-computed
 * bound of an element balance.
 */
class RoundingBoundTest {
    private static final LawSet LAWS = LawSet.parse("bound.law", String.join("\n",
            "input a[2]",
            "output y[3]",
            "law weighted: (1 + a[0]^2)*y[2] + a[1]*y[0] = 1",
            "law cubic: y[1] + y[1]^3 = a[0] + y[2]*y[0]",
            "complete y[2], y[1]",
            ""));

    @Test
    void outputsOfBothEntryPointsAreInsideAndPerturbedOnesOutside() {
        Completion c = Completion.of(LAWS);
        RoundingBound bound = RoundingBound.of(c);
        assertEquals(2, bound.lawCount());
        SplittableRandom r = new SplittableRandom(3);
        int batch = 200;
        double[] x = new double[batch * 2];
        double[] z = new double[batch];
        for (int i = 0; i < x.length; i++) {
            x[i] = r.nextDouble(0.5, 3);
        }
        for (int i = 0; i < z.length; i++) {
            z[i] = r.nextDouble(-2, 2);
        }
        double[] y = new double[batch * 3];
        c.forward(x, z, batch, y, null, c.newWorkspace());
        double[] res = new double[batch * 2];
        double[] b = new double[batch * 2];
        // Source: constraints-core Completion class documentation, "Exactness" (the promise checked here)
        assertEquals(0, bound.evaluate(x, null, y, batch, null, res, b));
        float[] xf = new float[x.length];
        float[] zf = new float[z.length];
        for (int i = 0; i < x.length; i++) {
            xf[i] = (float) x[i];
        }
        for (int i = 0; i < z.length; i++) {
            zf[i] = (float) z[i];
        }
        float[] yf = new float[y.length];
        c.forward(xf, zf, batch, yf, null, c.newWorkspace());
        double[] yw = new double[yf.length];
        double[] xw = new double[xf.length];
        for (int i = 0; i < yf.length; i++) {
            yw[i] = yf[i];
        }
        for (int i = 0; i < xf.length; i++) {
            xw[i] = xf[i];
        }
        assertEquals(0, bound.evaluate(xw, null, yw, batch, RoundingBound.floatRounding(yw), res, b));
        // the float outputs miss the double bound on most samples: the float term is needed
        assertTrue(bound.evaluate(xw, null, yw, batch, null, res, b) > batch / 2);
        // judged against the double inputs the float outputs were not enforced for: the input term is needed
        double[] ex = RoundingBound.floatRounding(x);
        assertEquals(0, bound.evaluate(x, ex, yw, batch, RoundingBound.floatRounding(yw), res, b));
        assertTrue(bound.evaluate(x, null, yw, batch, RoundingBound.floatRounding(yw), res, b) > 0);
        // move a completed output by 8 float ulps: outside the float bound
        for (int s = 0; s < batch; s++) {
            yw[s * 3 + 2] += 8 * Math.ulp((float) yw[s * 3 + 2]);
        }
        assertEquals(batch, bound.evaluate(xw, null, yw, batch, RoundingBound.floatRounding(yw), res, b));
    }

    @Test
    void anElementBalanceHasFourUlpsOfItsTermsAsBound() {
        LawSet balance = LawSet.parse("carbon.law", String.join("\n",
                "input feed[2]",
                "output out[2]",
                "law carbon: out[0] + 2*out[1] = feed[0] + 2*feed[1]",
                "complete out[1]",
                ""));
        RoundingBound bound = RoundingBound.of(Completion.of(balance));
        double[] res = new double[1];
        double[] b = new double[1];
        bound.evaluate(new double[] {1, 2}, null, new double[] {0.5, 2.25}, 1, null, res, b);
        // By hand: rounding depth 1 (one product per addend), natural scale |0.5| + |2·2.25| + |1| + |2·2| = 10,
        // bound (1 + 3)·2⁻⁵³·10 (Source: constraints-core Completion class documentation, "Exactness")
        assertEquals(4 * 0x1p-53 * 10, b[0]);
        assertEquals(0, res[0]);
        assertThrows(IllegalArgumentException.class, () -> bound.evaluate(new double[] {1, 2}, null,
                new double[] {0.5, 2.5}, 1, null, new double[0], b));
    }
}
