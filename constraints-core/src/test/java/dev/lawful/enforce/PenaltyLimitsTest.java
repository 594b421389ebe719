package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.lawful.algebra.LawSet;
import org.junit.jupiter.api.Test;

/**
 * The soft penalty of a law set with limits adds each limit's squared violation in its unit (the squared hinge,
 * common practice for inequality penalties), and nothing for a limit that holds.
 */
class PenaltyLimitsTest {
    private static final LawSet SPLIT = LawSet.parse("<split>", String.join("\n",
            "input  x      kg/s",
            "output a      kg/s",
            "output c      g/s",
            "law balance: a + c = x",
            "limit dry: c >= 0",
            "const top = 2 kg/s",
            "limit cap: a <= top",
            ""));

    @Test
    void aViolatedLimitAddsItsSquaredViolationInItsUnitAndAHeldOneNothing() {
        Penalty pe = Penalty.of(SPLIT);
        assertEquals(3, pe.termCount());
        // x = 1 kg/s, a = 2.5 kg/s, c = −300 g/s: balance residual a + c − x = 2.5 − 0.3 − 1 = 1.2 kg/s (law unit
        // kg/s); dry violated by −300 g/s (its unit g/s); cap violated by top − a = −0.5 kg/s
        double[] x = {1};
        double[] y = {2.5, -300};
        double[] rho = new double[3];
        pe.weightedResiduals(x, y, 1, rho, null);
        assertArrayEquals(new double[] {1.2, -300, -0.5}, rho, 1e-12);
        double[] gy = new double[2];
        double[] gx = new double[1];
        double value = pe.gradient(x, y, 1, gy, gx, null);
        assertEquals(1.2 * 1.2 + 300 * 300 + 0.5 * 0.5, value, 1e-9);
        // dP/da = 2·1.2·1 + 2·(−0.5)·(−1) (the cap's value top − a falls with a); dP/dc (per g/s) = 2·1.2·0.001
        // (the balance in kg/s) + 2·(−300)·1
        assertArrayEquals(new double[] {2 * 1.2 + 1, 2 * 1.2 * 0.001 - 600}, gy, 1e-9);
        assertArrayEquals(new double[] {-2 * 1.2}, gx, 1e-12);
        // inside both limits only the law counts
        double[] inside = {1.5, 200};
        assertEquals(0.7 * 0.7, pe.value(x, inside, 1, null), 1e-12);
        pe.weightedResiduals(x, inside, 1, rho, null);
        assertArrayEquals(new double[] {0.7, 0, 0}, rho, 1e-12);
    }
}
