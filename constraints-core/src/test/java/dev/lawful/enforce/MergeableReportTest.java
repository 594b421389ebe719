package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.math.BigDecimal;
import java.math.BigInteger;
import java.math.MathContext;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The pieces that make a residual report mergeable: the exact sum, the percentile sketch, and the accumulator, whose
 * partial reports merged in any order must give the bits of one report over everything.
 */
class MergeableReportTest {

    private static final LawSet JUNCTION = LawSet.parse("junction.law", """
            input  a[2]  L/s
            output q[3]  L/s
            law volume: sum(q) = sum(a)
            law split: q[0] = 2 * q[1]
            """);

    /** Magnitudes over many decades, with exact zeros and subnormals, so sums and buckets see every case. */
    private static double[] magnitudes(SplittableRandom r, int n) {
        double[] v = new double[n];
        for (int i = 0; i < n; i++) {
            int kind = r.nextInt(20);
            v[i] = kind == 0 ? 0 : kind == 1 ? Double.MIN_VALUE * r.nextInt(1000)
                    : r.nextDouble() * Math.pow(10, r.nextInt(-30, 30));
        }
        return v;
    }

    // ---- ExactSum ----------------------------------------------------------------------------------------------

    @Test
    void theExactSumIsTheBigDecimalSumAndTheMeanItsRounding() {
        SplittableRandom r = new SplittableRandom(11);
        for (int trial = 0; trial < 50; trial++) {
            double[] v = magnitudes(r, 1 + r.nextInt(2000));
            ExactSum sum = new ExactSum();
            BigDecimal exact = BigDecimal.ZERO;
            for (double d : v) {
                sum.add(d);
                exact = exact.add(new BigDecimal(d));
            }
            // Source: java.math.BigDecimal, whose new BigDecimal(double) and add are exact (its class documentation)
            assertEquals(0, exact.compareTo(new BigDecimal(sum.units()).multiply(new BigDecimal(Double.MIN_VALUE))),
                    "trial " + trial);
            // Source: BigDecimal.divide to 60 digits, then doubleValue (the nearest double); 60 digits leave no
            // double-rounding case short of a tie within 1e-44 of the value
            double reference = exact.divide(BigDecimal.valueOf(v.length), new MathContext(60)).doubleValue();
            assertEquals(reference, sum.mean(v.length), 0.0, "trial " + trial);
        }
    }

    @Test
    void valuesAddedInBulkSumExactlyAsOneByOne() {
        SplittableRandom r = new SplittableRandom(14);
        for (int trial = 0; trial < 20; trial++) {
            double[] v = magnitudes(r, 1 + r.nextInt(6000));
            v[r.nextInt(v.length)] = -0.0;
            ExactSum sum = new ExactSum();
            BigDecimal exact = BigDecimal.ZERO;
            for (int at = 0; at < v.length; ) {
                int len = Math.min(v.length - at, r.nextInt(3000));
                if (r.nextBoolean()) {
                    sum.addAll(v, at, len);
                } else {
                    for (int i = at; i < at + len; i++) {
                        sum.add(v[i]);
                    }
                }
                for (int i = at; i < at + len; i++) {
                    exact = exact.add(new BigDecimal(v[i]));
                }
                at += len;
            }
            // Source: java.math.BigDecimal, exact for these additions (its class documentation)
            assertEquals(0, exact.compareTo(new BigDecimal(sum.units()).multiply(new BigDecimal(Double.MIN_VALUE))),
                    "trial " + trial);
        }
        ExactSum bad = new ExactSum();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> bad.addAll(new double[] {1, 2, -3}, 0, 3));
        assertEquals("ExactSum adds values >= 0, found -3.0 at index 2", e.getMessage());
        assertEquals(BigInteger.valueOf(3).shiftLeft(1074), bad.units(), "the values before the bad one are added");
    }

    @Test
    void theMeanIsRoundedOnceWhereAPlainSumIsNot() {
        // 0.1 + 0.2 + 0.3 in doubles is 0.6000000000000001, whose third is 0.20000000000000004; the exact sum of the
        // three doubles is 0.6000000000000000055511151231257827..., whose third rounds to 0.2
        // Source: the doubles' exact decimal values, java.math.BigDecimal(double)
        ExactSum sum = new ExactSum();
        for (double d : new double[] {0.1, 0.2, 0.3}) {
            sum.add(d);
        }
        assertEquals(0.2, sum.mean(3), 0.0);
        assertEquals(0.20000000000000004, (0.1 + 0.2 + 0.3) / 3, 0.0);
        ExactSum inf = new ExactSum();
        inf.add(1);
        inf.add(Double.POSITIVE_INFINITY);
        assertEquals(Double.POSITIVE_INFINITY, inf.mean(2));
        assertThrows(IllegalArgumentException.class, () -> inf.add(-1));
        assertThrows(IllegalArgumentException.class, () -> inf.add(Double.NaN));
        // the largest doubles: their sum exceeds the double range, their mean does not
        ExactSum big = new ExactSum();
        big.add(Double.MAX_VALUE);
        big.add(Double.MAX_VALUE);
        assertEquals(Double.MAX_VALUE, big.mean(2), 0.0);
    }

    @Test
    void exactSumsMergedInAnyOrderHaveTheSameBits() {
        SplittableRandom r = new SplittableRandom(12);
        double[] v = magnitudes(r, 5000);
        ExactSum whole = new ExactSum();
        for (double d : v) {
            whole.add(d);
        }
        for (int trial = 0; trial < 10; trial++) {
            List<ExactSum> parts = new ArrayList<>();
            int at = 0;
            while (at < v.length) {
                int len = 1 + r.nextInt(700);
                ExactSum p = new ExactSum();
                for (int i = at; i < Math.min(v.length, at + len); i++) {
                    p.add(v[i]);
                }
                parts.add(p);
                at += len;
            }
            Collections.shuffle(parts, new Random(trial));
            ExactSum merged = new ExactSum();
            for (ExactSum p : parts) {
                merged.merge(p);
            }
            assertEquals(whole.units(), merged.units());
            assertEquals(Double.doubleToRawLongBits(whole.mean(v.length)),
                    Double.doubleToRawLongBits(merged.mean(v.length)));
        }
    }

    // ---- PercentileSketch ----------------------------------------------------------------------------------

    @Test
    void valuesAddedToTheSketchInBulkGiveItsPercentilesOneByOne() {
        SplittableRandom r = new SplittableRandom(15);
        for (int n : new int[] {10, PercentileSketch.EXACT_LIMIT + 5, 40_000}) {
            double[] v = magnitudes(r, n);
            v[0] = -0.0;
            PercentileSketch one = new PercentileSketch();
            PercentileSketch bulk = new PercentileSketch();
            for (double d : v) {
                one.add(d);
            }
            for (int at = 0; at < n; ) {
                int len = Math.min(n - at, r.nextInt(5000));
                bulk.addAll(v, at, len);
                at += len;
            }
            assertEquals(one.count(), bulk.count());
            assertEquals(one.isExact(), bulk.isExact());
            for (double p : new double[] {0, 1, 50, 99, 100}) {
                assertEquals(Double.doubleToRawLongBits(one.percentile(p)), Double.doubleToRawLongBits(bulk.percentile(p)),
                        n + " values, p" + p);
            }
            if (one.isExact()) {
                // -0.0 is kept as zero, the smallest value (no value here is below zero)
                assertEquals(Double.doubleToRawLongBits(0.0), Double.doubleToRawLongBits(one.percentile(0)));
            }
        }
    }

    @Test
    void theSketchIsExactUpToItsLimitAndWithinItsBoundBeyond() {
        SplittableRandom r = new SplittableRandom(13);
        for (int n : new int[] {1, 2, 100, PercentileSketch.EXACT_LIMIT, PercentileSketch.EXACT_LIMIT + 1, 50_000}) {
            double[] v = magnitudes(r, n);
            PercentileSketch sketch = new PercentileSketch();
            for (double d : v) {
                sketch.add(d);
            }
            double[] sorted = v.clone();
            Arrays.sort(sorted);
            for (double p : new double[] {0, 50, 99, 100}) {
                // Source: the nearest-rank definition, v of rank ceil(p n / 100) (Hyndman and Fan 1996, definition 1)
                double exact = sorted[(int) Math.max(1, Math.ceil(p * n / 100)) - 1];
                double got = sketch.percentile(p);
                if (n <= PercentileSketch.EXACT_LIMIT) {
                    assertTrue(sketch.isExact());
                    assertEquals(exact, got, 0.0, n + " values, p" + p);
                } else {
                    assertFalse(sketch.isExact());
                    assertTrue(got >= exact, n + " values, p" + p + ": " + got + " < " + exact);
                    assertTrue(got <= exact + exact * PercentileSketch.RELATIVE_ERROR || exact < Double.MIN_NORMAL
                            && got - exact < 0x1p-1064, n + " values, p" + p + ": " + got + " vs " + exact);
                    assertTrue(Arrays.binarySearch(sorted, got) >= 0, "a value some sample has: " + got);
                }
            }
        }
        assertTrue(Double.isNaN(new PercentileSketch().percentile(99)));
    }

    @Test
    void sketchesMergedInAnyOrderGiveTheSamePercentiles() {
        SplittableRandom r = new SplittableRandom(14);
        for (int n : new int[] {3000, 30_000}) {
            double[] v = magnitudes(r, n);
            PercentileSketch whole = new PercentileSketch();
            for (double d : v) {
                whole.add(d);
            }
            List<PercentileSketch> parts = new ArrayList<>();
            for (int at = 0; at < n; at += 977) {
                PercentileSketch p = new PercentileSketch();
                for (int i = at; i < Math.min(n, at + 977); i++) {
                    p.add(v[i]);
                }
                parts.add(p);
            }
            Collections.shuffle(parts, new Random(n));
            PercentileSketch merged = new PercentileSketch();
            for (PercentileSketch p : parts) {
                merged.merge(p);
            }
            assertEquals(whole.isExact(), merged.isExact());
            for (double p : new double[] {1, 50, 99, 99.9}) {
                assertEquals(whole.percentile(p), merged.percentile(p), 0.0, n + " values, p" + p);
            }
        }
    }

    // ---- ResidualAccumulator -------------------------------------------------------------------------------

    @Test
    void partialReportsMergedInAnyOrderAreTheReportOfTheWhole() {
        SplittableRandom r = new SplittableRandom(15);
        for (int n : new int[] {500, 3 * PercentileSketch.EXACT_LIMIT}) {
            double[] x = new double[2 * n];
            double[] y = new double[3 * n];
            for (int s = 0; s < n; s++) {
                double a = r.nextDouble();
                double b = r.nextDouble();
                double q1 = r.nextDouble();
                x[2 * s] = a;
                x[2 * s + 1] = b;
                y[3 * s] = 2 * q1 * (1 + (r.nextInt(10) == 0 ? 1e-12 * r.nextDouble() : 0));
                y[3 * s + 1] = q1;
                y[3 * s + 2] = a + b - 3 * q1;
                if (r.nextInt(500) == 0) {
                    y[3 * s + 2] = Double.NaN;
                }
            }
            String whole = ResidualReport.of(JUNCTION, x, y, n, 1e-13).toJson();
            for (int trial = 0; trial < 4; trial++) {
                List<ResidualAccumulator> parts = new ArrayList<>();
                int at = 0;
                while (at < n) {
                    int len = Math.min(n - at, 1 + r.nextInt(n / 3));
                    ResidualAccumulator p = new ResidualAccumulator(JUNCTION, 1e-13);
                    p.add(Arrays.copyOfRange(x, 2 * at, 2 * (at + len)), Arrays.copyOfRange(y, 3 * at, 3 * (at + len)),
                            len, at, null);
                    parts.add(p);
                    at += len;
                }
                Collections.shuffle(parts, new Random(trial));
                ResidualAccumulator merged = parts.get(0);
                for (ResidualAccumulator p : parts.subList(1, parts.size())) {
                    merged.merge(p);
                }
                assertEquals(whole, merged.report().toJson(), n + " samples in " + parts.size() + " parts");
            }
            assertEquals(n <= PercentileSketch.EXACT_LIMIT, ResidualReport.of(JUNCTION, x, y, n, 1e-13)
                    .exactPercentile());
        }
    }

    @Test
    void partialsWrittenAndReadBackMergeToTheReportOfTheWhole() throws IOException {
        SplittableRandom r = new SplittableRandom(16);
        for (int n : new int[] {700, 3 * PercentileSketch.EXACT_LIMIT}) {
            double[] x = new double[2 * n];
            double[] y = new double[3 * n];
            for (int s = 0; s < n; s++) {
                x[2 * s] = r.nextDouble();
                x[2 * s + 1] = r.nextInt(50) == 0 ? Double.POSITIVE_INFINITY : r.nextDouble();
                y[3 * s + 1] = r.nextDouble();
                y[3 * s] = 2 * y[3 * s + 1] * (1 + 1e-12 * r.nextDouble() * r.nextInt(2));
                y[3 * s + 2] = x[2 * s] + x[2 * s + 1] - 3 * y[3 * s + 1];
                if (r.nextInt(300) == 0) {
                    y[3 * s] = Double.NaN;
                }
            }
            // the reference: the single-accumulator report over every sample, never written or read
            String whole = ResidualReport.of(JUNCTION, x, y, n, 1e-13).toJson();
            ResidualAccumulator merged = readBack(new ResidualAccumulator(JUNCTION, 1e-13));
            for (int at = 0, part = 0; at < n; part++) {
                int len = Math.min(n - at, 1 + r.nextInt(n / 3));
                ResidualAccumulator p = new ResidualAccumulator(JUNCTION, 1e-13);
                p.add(Arrays.copyOfRange(x, 2 * at, 2 * (at + len)), Arrays.copyOfRange(y, 3 * at, 3 * (at + len)),
                        len, at, null);
                ResidualAccumulator back = readBack(p);
                assertEquals(p.report().toJson(), back.report().toJson(), "part " + part + " read back");
                merged.merge(back);
                merged = readBack(merged);
                at += len;
            }
            assertEquals(whole, merged.report().toJson(), n + " samples");
        }
    }

    @Test
    void aPartialReadWithAnotherLawSetIsRefused() throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        new ResidualAccumulator(JUNCTION, 0).writeTo(new DataOutputStream(bytes));
        LawSet other = LawSet.parse("other.law", "output q[3]\nlaw volume: sum(q) = 1\nlaw split: q[0] = q[1]\n");
        IOException e = assertThrows(IOException.class, () -> ResidualAccumulator.readFrom(other,
                new DataInputStream(new ByteArrayInputStream(bytes.toByteArray()))));
        assertEquals("the partial residual report was written for another law set (2 scalar laws); read it with the"
                + " law set that wrote it", e.getMessage());
        byte[] wrong = bytes.toByteArray();
        wrong[3] ^= 1;
        assertThrows(IOException.class, () -> ResidualAccumulator.readFrom(JUNCTION,
                new DataInputStream(new ByteArrayInputStream(wrong))));
    }

    /** @return {@code a} written with {@link ResidualAccumulator#writeTo} and read back */
    private static ResidualAccumulator readBack(ResidualAccumulator a) throws IOException {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        a.writeTo(new DataOutputStream(bytes));
        return ResidualAccumulator.readFrom(JUNCTION, new DataInputStream(new ByteArrayInputStream(bytes.toByteArray())));
    }

    @Test
    void theWorstSampleCarriesItsTagAndTheFirstOfEqualsWins() {
        ResidualAccumulator a = new ResidualAccumulator(JUNCTION, 0);
        // rows 0 and 2 break 'split' by the same amount, row 1 is exact: the worst is row 0, tag 100
        double[] x = {1, 1, 1, 1, 1, 1};
        double[] y = {1, 1, 0, 1, 0.5, 0.5, 1, 1, 0};
        a.add(x, y, 3, 0, new long[] {100, 101, 102});
        assertEquals(0, a.report().law("split").worstSample());
        assertEquals(100, a.worstTag(1));
        ResidualAccumulator b = new ResidualAccumulator(JUNCTION, 0);
        b.add(x, y, 3, 3, new long[] {103, 104, 105});
        b.merge(a);
        assertEquals(0, b.report().law("split").worstSample());
        assertEquals(100, b.worstTag(1));
        assertThrows(IllegalArgumentException.class, () -> a.merge(new ResidualAccumulator(JUNCTION, 1)));
    }
}
