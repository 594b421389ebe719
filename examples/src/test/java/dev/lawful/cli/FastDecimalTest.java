package dev.lawful.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.lawful.io.ShortestDecimal;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/** {@link FastDecimal} writes exactly what the project's {@link ShortestDecimal} writes, on every kind of double. */
class FastDecimalTest {

    private static void same(double v) {
        StringBuilder sb = new StringBuilder();
        FastDecimal.append(v, sb);
        // Source: dev.lawful.io.ShortestDecimal, itself checked against exhaustive searches in constraints-core
        assertEquals(ShortestDecimal.format(v), sb.toString(), "bits " + Long.toHexString(Double.doubleToRawLongBits(v)));
        assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits(Double.parseDouble(sb.toString())));
    }

    @Test
    void randomBitPatternsAndRandomValuesMatchTheProjectsPrinter() {
        SplittableRandom r = new SplittableRandom(3);
        for (int i = 0; i < 200_000; i++) {
            double v = Double.longBitsToDouble(r.nextLong());
            if (!Double.isNaN(v)) {
                same(v);
            }
            same(r.nextDouble() * Math.pow(10, r.nextInt(-12, 12)));
            same(Math.round(r.nextDouble() * 1e6) / 1e3);
        }
    }

    @Test
    void edgesMatch() {
        // values where the notation switches (1e-3, 1e7), subnormals, the extremes, values Java 17 writes too long
        // (Source: ShortestDecimal's class comment: 1e23 and 2.82879384806159e17)
        for (double v : new double[] {0, -0.0, Double.NaN, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY,
            Double.MIN_VALUE, Double.MIN_NORMAL, Double.MAX_VALUE, 1e-3, 0.00099999999999999, 1e7, 9999999.999999998,
            1e23, 2.82879384806159e17, 0.1, 0.30000000000000004, 123456.789, 1500000, -2.5e-5, 4.35, 1e22, 5e-324}) {
            same(v);
        }
    }
}
