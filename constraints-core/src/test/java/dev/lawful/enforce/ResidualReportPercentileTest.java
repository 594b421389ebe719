package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.lawful.algebra.LawSet;
import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.stat.descriptive.moment.Mean;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.junit.jupiter.api.Test;

/** The nearest-rank percentile, the report's statistics, and the histogram bins, against outside references. */
class ResidualReportPercentileTest {

    private static double commons(double[] values, double percent) {
        // Source: Apache Commons Math 3.6.1 Percentile (estimation type R_1, the inverse empirical distribution)
        return new Percentile(percent).withEstimationType(EstimationType.R_1).evaluate(values);
    }

    @Test
    void nearestRankMatchesCommonsMathR1() {
        SplittableRandom random = new SplittableRandom(0x9E5C_E471L);
        for (int n = 1; n <= 1200; n++) {
            double[] values = new double[n];
            for (int i = 0; i < n; i++) {
                // ties now and then, and magnitudes over many decades
                values[i] = random.nextInt(5) == 0 ? 1.0 : Math.scalb(random.nextDouble(), -random.nextInt(60));
            }
            double[] sorted = values.clone();
            Arrays.sort(sorted);
            for (double p : new double[] {1, 25, 50, 90, 99, 100}) {
                assertEquals(commons(values, p), NearestRank.of(sorted, n, p), "n = " + n + ", p = " + p);
            }
        }
        for (int n : new int[] {10_000, 100_000, 1_000_001}) {
            double[] values = new double[n];
            for (int i = 0; i < n; i++) {
                values[i] = random.nextDouble();
            }
            double[] sorted = values.clone();
            Arrays.sort(sorted);
            assertEquals(commons(values, 99), NearestRank.of(sorted, n, 99), "n = " + n);
        }
    }

    @Test
    void nearestRankIsTheValueOfRankCeilingOfPTimesN() {
        double[] v = {10, 20, 30, 40, 50, 60, 70, 80, 90, 100};
        assertEquals(10, NearestRank.of(v, 10, 0));
        assertEquals(10, NearestRank.of(v, 10, 10));     // rank 1
        assertEquals(20, NearestRank.of(v, 10, 10.5));   // rank ceil(1.05) = 2
        assertEquals(100, NearestRank.of(v, 10, 99));    // rank ceil(9.9) = 10
        assertEquals(90, NearestRank.of(v, 10, 90));
        assertEquals(99, NearestRank.index(100, 100));
        assertEquals(98, NearestRank.index(100, 99));
        assertEquals(99, NearestRank.index(101, 99), "ceil(99.99) = 100");
        assertThrows(IllegalArgumentException.class, () -> NearestRank.index(0, 50));
        assertThrows(IllegalArgumentException.class, () -> NearestRank.index(5, 100.5));
        assertThrows(IllegalArgumentException.class, () -> NearestRank.index(5, Double.NaN));
    }

    @Test
    void reportStatisticsMatchCommonsMathOnTheEvaluatorResiduals() {
        LawSet laws = LawSet.parse("flow.law", "input q[2] L/s\noutput p[2] L/s\nlaw split: sum(p) = sum(q)\n");
        SplittableRandom random = new SplittableRandom(0x57A75L);
        for (int batch : new int[] {1, 2, 99, 100, 101, 257, 5000}) {
            double[] x = new double[batch * 2];
            double[] y = new double[batch * 2];
            for (int s = 0; s < batch; s++) {
                x[2 * s] = random.nextDouble(1, 5);
                x[2 * s + 1] = random.nextDouble(1, 5);
                y[2 * s] = x[2 * s] + Math.scalb(random.nextDouble(-1, 1), -random.nextInt(5, 50));
                y[2 * s + 1] = x[2 * s + 1];
            }
            double[] residual = new double[batch];
            double[] scale = new double[batch];
            laws.evaluator().residuals(x, y, batch, residual, scale);
            double factor = laws.lawUnit("split").factor();   // L/s in m3/s
            double[] absolute = new double[batch];
            double[] relative = new double[batch];
            for (int s = 0; s < batch; s++) {
                absolute[s] = Math.abs(residual[s]) / factor;
                relative[s] = Math.abs(residual[s]) / scale[s];
            }
            LawResiduals r = ResidualReport.of(laws, x, y, batch, 1e-9).law("split");
            assertEquals(commons(absolute, 99), r.absolute().p99(), "batch " + batch);
            assertEquals(commons(relative, 99), r.relative().p99(), "batch " + batch);
            assertEquals(Arrays.stream(absolute).max().orElseThrow(), r.absolute().max());
            // Source: Apache Commons Math 3.6.1 Mean (a corrected two-pass mean); ours is a compensated sum
            double mean = new Mean().evaluate(absolute);
            assertEquals(mean, r.absolute().mean(), 1e-15 * mean, "batch " + batch);
            assertEquals(new Mean().evaluate(relative), r.relative().mean(), 1e-15 * r.relative().max());
        }
    }

    @Test
    void histogramBinOfEveryBinadeAndRandomValuesMatchesTheDecimalEdges() {
        // Source: the same specification of the bins, applied directly: the bin of v > 0 is 1 + the number of
        // decimal edges 1e-16, 1e-15 ... 1 (each the double of its literal) that lie below v
        SplittableRandom random = new SplittableRandom(7);
        for (int e = -70; e <= 3; e++) {
            double p = Math.scalb(1.0, e);
            for (double v : new double[] {p, Math.nextDown(p), Math.nextUp(p),
                Math.scalb(1.0 + random.nextDouble(), e)}) {
                assertEquals(byDefinition(v), ResidualHistogram.bin(v), "bin of " + v);
            }
        }
        for (int i = 0; i < 100_000; i++) {
            double v = Math.pow(10, -18 + 19 * random.nextDouble());
            assertEquals(byDefinition(v), ResidualHistogram.bin(v), "bin of " + v);
        }
    }

    private static int byDefinition(double v) {
        int bin = 1;
        for (int k = -16; k <= 0; k++) {
            bin += Double.parseDouble("1e" + k) < v ? 1 : 0;
        }
        return bin;
    }

    @Test
    void histogramBinsAreClosedAboveAtThePowersOfTen() {
        // Source: the bins specified for the residual report, [0], (0, 1e-16], (1e-16, 1e-15] ... (0.1, 1], > 1,
        // each edge the double of the decimal literal
        assertEquals(19, ResidualHistogram.BINS);
        assertEquals(0, ResidualHistogram.bin(0));
        assertEquals(0, ResidualHistogram.bin(-0.0));
        assertEquals(1, ResidualHistogram.bin(Double.MIN_VALUE));
        for (int k = -16; k <= 0; k++) {
            double edge = Double.parseDouble("1e" + k);
            int bin = k + 17;
            assertEquals(edge, ResidualHistogram.upperEdge(bin));
            assertEquals(bin, ResidualHistogram.bin(edge), "1e" + k);
            assertEquals(bin, ResidualHistogram.bin(Math.nextDown(edge)), "below 1e" + k);
            assertEquals(bin + 1, ResidualHistogram.bin(Math.nextUp(edge)), "above 1e" + k);
        }
        assertEquals(2, ResidualHistogram.bin(1.5e-16));
        assertEquals(18, ResidualHistogram.bin(2));
        assertEquals(18, ResidualHistogram.bin(Double.POSITIVE_INFINITY));
        assertEquals(Double.POSITIVE_INFINITY, ResidualHistogram.upperEdge(18));
        assertEquals("0", ResidualHistogram.label(0));
        assertEquals("(0, 1e-16]", ResidualHistogram.label(1));
        assertEquals("(1e-16, 1e-15]", ResidualHistogram.label(2));
        assertEquals("(0.1, 1]", ResidualHistogram.label(17));
        assertEquals("> 1", ResidualHistogram.label(18));
        assertEquals("<=1e-16", ResidualHistogram.heading(1));
        assertEquals(">1", ResidualHistogram.heading(18));
        assertThrows(IllegalArgumentException.class, () -> ResidualHistogram.bin(Double.NaN));
        assertThrows(IllegalArgumentException.class, () -> ResidualHistogram.bin(-1e-20));
        assertThrows(IndexOutOfBoundsException.class, () -> ResidualHistogram.label(19));
    }
}
