package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

class PartialEvaluationTest {
    /** A column whose layers' masses depend on the input ps: free outputs with constant and varying coefficients. */
    private static final String LAWS = String.join("\n",
            "input ps Pa",
            "input E kg m-2 s-1",
            "output dq[3] 1/s",
            "output P kg m-2 s-1",
            "output F W m-2",
            "const g = 9.80665 m s-2",
            "const w = [0.25, 0.25, 0.5]",
            "law water: dot(w * ps / g, dq) = E - P",
            "const Lv = 2.5e6 J/kg",
            "const Q = 7 W m-2",
            "law heat: Lv * P + 3 * F = Q",
            "");

    @Test
    void constantEntriesAreWhatEverySampleEvaluatesTo() {
        LawEvaluator ev = LawSet.parse("<column>", LAWS).evaluator();
        double[] constant = ev.constantOutputEntries();
        assertEquals(ev.outputNonzeros(), constant.length);
        int batch = 50;
        double[][] xy = random(ev, batch);
        double[] jy = new double[batch * ev.outputNonzeros()];
        ev.evaluate(xy[0], xy[1], batch, null, null, jy, null, ev.newWorkspace());
        int constants = 0;
        for (int e = 0; e < constant.length; e++) {
            boolean varies = false;
            for (int s = 0; s < batch; s++) {
                if (!Double.isNaN(constant[e])) {
                    assertEquals(constant[e], jy[s * ev.outputNonzeros() + e], 0.0, "entry " + e + ", sample " + s);
                }
                varies |= jy[s * ev.outputNonzeros() + e] != jy[e];
            }
            if (!Double.isNaN(constant[e])) {
                constants++;
            } else {
                assertTrue(varies, "entry " + e + " is marked as varying but is the same for every random sample");
            }
        }
        // the derivatives by hand: water by dq[k] is w_k·ps/g (varies with ps), by P is 1; heat by P is 2.5e6,
        // by F is 3: three constant entries, three varying ones
        assertEquals(3, constants);
    }

    @Test
    void chosenEntriesEqualTheWholeEvaluationAndTheOthersAreLeftAlone() {
        LawEvaluator ev = LawSet.parse("<column>", LAWS).evaluator();
        int batch = 70;
        double[][] xy = random(ev, batch);
        int nnz = ev.outputNonzeros();
        double[] jy = new double[batch * nnz];
        double[] jx = new double[batch * ev.inputNonzeros()];
        ev.evaluate(xy[0], xy[1], batch, null, null, jy, jx, ev.newWorkspace());
        boolean[] chosen = new boolean[nnz];
        for (int e = 0; e < nnz; e += 2) {
            chosen[e] = true;
        }
        double[] partY = new double[batch * nnz];
        Arrays.fill(partY, -7.5);
        double[] partX = new double[batch * ev.inputNonzeros()];
        ev.partialEntries(chosen).evaluate(xy[0], xy[1], batch, null, null, partY, partX, ev.newWorkspace());
        for (int s = 0; s < batch; s++) {
            for (int e = 0; e < nnz; e++) {
                assertEquals(chosen[e] ? jy[s * nnz + e] : -7.5, partY[s * nnz + e], 0.0, "entry " + e);
            }
        }
        assertArrayEquals(jx, partX);
        IllegalArgumentException wrong = assertThrows(IllegalArgumentException.class,
                () -> ev.partialEntries(new boolean[nnz + 1]));
        assertEquals("one flag per dC/dy entry: expected " + nnz + ", found " + (nnz + 1), wrong.getMessage());
        assertFalse(Arrays.equals(partY, jy));
    }

    private static void assertArrayEquals(double[] expected, double[] actual) {
        assertEquals(expected.length, actual.length);
        for (int i = 0; i < expected.length; i++) {
            assertEquals(expected[i], actual[i], 0.0, "element " + i);
        }
    }

    private static double[][] random(LawEvaluator ev, int batch) {
        SplittableRandom r = new SplittableRandom(21);
        double[] x = new double[batch * ev.inputWidth()];
        double[] y = new double[batch * ev.outputWidth()];
        for (int i = 0; i < x.length; i++) {
            x[i] = 1e5 * (0.5 + r.nextDouble());
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = r.nextDouble() - 0.5;
        }
        return new double[][] {x, y};
    }
}
