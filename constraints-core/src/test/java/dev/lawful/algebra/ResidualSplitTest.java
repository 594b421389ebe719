package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.CollisionLaws;
import java.math.BigDecimal;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

class ResidualSplitTest {
    @Test
    void theTwoPartsAddUpToTheWholeLawAndItsDerivatives() {
        LawSet laws = LawSet.parse("<collision>", CollisionLaws.TEXT);
        LawEvaluator whole = laws.evaluator();
        ResidualSplit split = ResidualSplit.of(laws.expand(), whole, new int[] {0, 1, 2, 3});
        // each law's right-hand side: two addends that involve no completed output (m1*u1[0] and m2*u2[0]; the
        // products 0.5*m1*dot(u1, u1) and 0.5*m2*dot(u2, u2); n[0]*u1[1] and -n[1]*u1[0])
        assertEquals(8, split.fixedAddends());
        int batch = 300;
        int n = whole.lawCount();
        SplittableRandom r = new SplittableRandom(3);
        double[] x = new double[batch * whole.inputWidth()];
        double[] y = new double[batch * whole.outputWidth()];
        for (int i = 0; i < x.length; i++) {
            x[i] = -5 + 10 * r.nextDouble();
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = -5 + 10 * r.nextDouble();
        }
        double[] fixedR = new double[batch * n];
        double[] fixedS = new double[batch * n];
        double[] res = new double[batch * n];
        double[] scale = new double[batch * n];
        double[] jy = new double[batch * whole.outputNonzeros()];
        ResidualSplit.Workspace w = split.newWorkspace();
        split.fixed(x, y, batch, fixedR, fixedS, w);
        split.evaluate(x, y, batch, fixedR, fixedS, res, scale, jy, w);
        double[] refRes = new double[batch * n];
        double[] refScale = new double[batch * n];
        double[] refJy = new double[batch * whole.outputNonzeros()];
        whole.evaluate(x, y, batch, refRes, refScale, refJy, null, whole.newWorkspace());
        for (int s = 0; s < batch; s++) {
            for (int i = 0; i < n; i++) {
                int k = s * n + i;
                // Source: java.math.BigDecimal (exact subtraction): the split residual adds two rounded parts, so it
                // may differ from the whole law's evaluation by a few roundings of the scale, no more
                double gap = new BigDecimal(res[k]).subtract(new BigDecimal(refRes[k])).abs().doubleValue();
                assertTrue(gap <= 4 * 0x1p-53 * refScale[k], "law " + i + " sample " + s + ": " + res[k] + " vs "
                        + refRes[k]);
                assertEquals(refScale[k], scale[k], 4 * 0x1p-53 * refScale[k], "scale of law " + i);
            }
            for (int i = 0; i < n; i++) {
                int[] cols = whole.outputColumns(i);
                for (int p = 0; p < cols.length; p++) {
                    int at = s * whole.outputNonzeros() + whole.outputOffset(i) + p;
                    assertEquals(refJy[at], jy[at], 0.0, "dC" + i + "/dy" + cols[p] + " of sample " + s);
                }
            }
        }
        ResidualSplit other = ResidualSplit.of(laws.expand(), whole, new int[] {0});
        assertThrows(IllegalArgumentException.class, () -> split.fixed(x, y, batch, fixedR, fixedS,
                other.newWorkspace()));
        assertThrows(IllegalArgumentException.class, () -> ResidualSplit.of(laws.expand(), whole, new int[] {4}));
    }
}
