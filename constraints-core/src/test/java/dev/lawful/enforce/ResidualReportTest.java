package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/** {@link ResidualReport}: units, relative residuals, counts, non-finite samples, both entry points, text and JSON. */
class ResidualReportTest {

    /** The steam reformer's element balances; species CH4, H2O, CO, CO2, H2, N2. */
    static final LawSet REFORMER = LawSet.parse("reformer.law", """
            input  feed[6] mol/s
            output out[6]  mol/s
            const C = [1, 0, 1, 1, 0, 0]
            const H = [4, 2, 0, 0, 2, 0]
            const O = [0, 1, 1, 2, 0, 0]
            const N = [0, 0, 0, 0, 0, 2]
            law carbon:   dot(C, out) = dot(C, feed)
            law hydrogen: dot(H, out) = dot(H, feed)
            law oxygen:   dot(O, out) = dot(O, feed)
            law nitrogen: dot(N, out) = dot(N, feed)
            """);

    /** A vector law in kW, so residuals are converted from W. */
    static final LawSet HEAT = LawSet.parse("heat.law", """
            input  a[3] kW
            output b[3] kW
            law energy: b = a
            """);

    /**
     * One balanced sample in whole numbers of mol/s (every residual exactly 0): 1 CH4 + 1 H2O reacted to 1 CO +
     * 3 H2, from a feed of 2 CH4, 3 H2O, 1 N2.
     */
    private static final double[] FEED = {2, 3, 0, 0, 0, 1};
    private static final double[] OUT = {1, 2, 1, 0, 3, 1};

    private static double[] repeat(double[] row, int times) {
        double[] out = new double[row.length * times];
        for (int i = 0; i < times; i++) {
            System.arraycopy(row, 0, out, i * row.length, row.length);
        }
        return out;
    }

    // ---- values --------------------------------------------------------------------------------------------

    @Test
    void balancedSamplesHaveZeroResidualsInTheFirstBin() {
        ResidualReport r = ResidualReport.of(REFORMER, repeat(FEED, 5), repeat(OUT, 5), 5, 1e-9);
        assertEquals(5, r.samples());
        assertTrue(r.withinTolerance());
        assertEquals(0, r.failingSamples());
        assertEquals(List.of("carbon", "hydrogen", "oxygen", "nitrogen"),
                r.laws().stream().map(LawResiduals::name).toList());
        for (LawResiduals l : r.laws()) {
            assertEquals(new ResidualStats(0, 0, 0), l.absolute(), l.name());
            assertEquals(new ResidualStats(0, 0, 0), l.relative(), l.name());
            assertEquals(5, l.histogram().get(0), l.name());
            assertEquals(5, l.finite());
            assertEquals("mol/s", l.unit().text());
            assertEquals(0, l.worstSample(), "the first of equals");
        }
    }

    @Test
    void residualIsReportedInTheLawUnitAndRelativeToTheEvaluatorScale() {
        // b = a + 2^-10 kW exactly; in SI 1000 a and 1000 a + 0.9765625 W are exact too, so the residual is exactly
        // 2^-10 kW whatever the rounding
        double[] a = {1, 2, 3, 4, 5, 6};
        double[] b = new double[6];
        for (int i = 0; i < 6; i++) {
            b[i] = a[i] + (i == 4 ? 0x1p-10 : 0);
        }
        ResidualReport r = ResidualReport.of(HEAT, a, b, 2, 1e-9);
        assertEquals(List.of("energy[0]", "energy[1]", "energy[2]"), r.laws().stream().map(LawResiduals::name).toList());
        LawResiduals e1 = r.law("energy[1]");
        assertEquals("energy", e1.law());
        assertEquals("kW", e1.unit().text());
        assertEquals(0x1p-10, e1.absolute().max());
        assertEquals(0x1p-11, e1.absolute().mean());
        assertEquals(0x1p-10, e1.absolute().p99(), "rank ceil(0.99 * 2) = 2: the larger one");
        // the relative residual is |r| / scale with the scale the evaluator computes (SI, like the residual)
        double[] residual = new double[2 * 3];
        double[] scale = new double[2 * 3];
        HEAT.evaluator().residuals(a, b, 2, residual, scale);
        assertEquals(0.9765625, residual[3 + 1], "the residual in W");
        assertEquals(Math.abs(residual[3 + 1]) / scale[3 + 1], e1.relative().max());
        assertEquals(1, e1.worstSample());
        assertEquals(1, e1.overTolerance());
        assertEquals(List.of(e1), r.exceeding());
        assertEquals(1, r.failingSamples());
        assertFalse(r.withinTolerance());
        assertTrue(r.law("energy[0]").withinTolerance());
        assertThrows(IllegalArgumentException.class, () -> r.law("energy"));
    }

    @Test
    void countsOverToleranceUseAtMostTheTolerance() {
        SplittableRandom random = new SplittableRandom(0x70_1E7AL);
        int batch = 300;
        double[] a = new double[batch * 3];
        double[] b = new double[batch * 3];
        for (int i = 0; i < a.length; i++) {
            a[i] = random.nextDouble(0.5, 2);
            b[i] = a[i] * (1 + Math.scalb(random.nextDouble(-1, 1), -random.nextInt(10, 60)));
        }
        double[] residual = new double[batch * 3];
        double[] scale = new double[batch * 3];
        HEAT.evaluator().residuals(a, b, batch, residual, scale);
        // the tolerance exactly at one sample's relative residual: that sample is within it
        double at = Math.abs(residual[3 * 17 + 2]) / scale[3 * 17 + 2];
        for (double tol : new double[] {at, Math.nextDown(at), 1e-9, 0}) {
            ResidualReport r = ResidualReport.of(HEAT, a, b, batch, tol);
            int failing = 0;
            for (int s = 0; s < batch; s++) {
                boolean fails = false;
                for (int i = 0; i < 3; i++) {
                    double rel = scale[3 * s + i] == 0 ? 0 : Math.abs(residual[3 * s + i]) / scale[3 * s + i];
                    fails |= rel > tol;
                }
                failing += fails ? 1 : 0;
            }
            int expected = 0;
            for (int s = 0; s < batch; s++) {
                double rel = Math.abs(residual[3 * s + 2]) / scale[3 * s + 2];
                expected += rel > tol ? 1 : 0;
            }
            assertEquals(expected, r.law("energy[2]").overTolerance(), "tolerance " + tol);
            assertEquals(failing, r.failingSamples(), "tolerance " + tol);
        }
        assertEquals(ResidualReport.of(HEAT, a, b, batch, at).law("energy[2]").overTolerance() + 1,
                ResidualReport.of(HEAT, a, b, batch, Math.nextDown(at)).law("energy[2]").overTolerance());
    }

    @Test
    void histogramCountsEachFiniteSampleInTheBinOfItsRelativeResidual() {
        SplittableRandom random = new SplittableRandom(0xB1_75L);
        int batch = 2000;
        double[] a = new double[batch * 3];
        double[] b = new double[batch * 3];
        for (int i = 0; i < a.length; i++) {
            a[i] = random.nextDouble(0.5, 2);
            int kind = random.nextInt(4);
            b[i] = kind == 0 ? a[i] : a[i] * (1 + Math.scalb(random.nextDouble(-1, 1), -random.nextInt(0, 60)));
        }
        ResidualReport r = ResidualReport.of(HEAT, a, b, batch, 1e-9);
        double[] residual = new double[batch * 3];
        double[] scale = new double[batch * 3];
        HEAT.evaluator().residuals(a, b, batch, residual, scale);
        for (int i = 0; i < 3; i++) {
            // counted independently: against the decimal literals 1e-16 .. 1e0, closed above
            int[] expected = new int[ResidualHistogram.BINS];
            for (int s = 0; s < batch; s++) {
                double rel = Math.abs(residual[3 * s + i]) / scale[3 * s + i];
                int bin = ResidualHistogram.BINS - 1;
                if (rel == 0) {
                    bin = 0;
                } else {
                    for (int k = -16; k <= 0; k++) {
                        if (rel <= Double.parseDouble("1e" + k)) {
                            bin = k + 17;
                            break;
                        }
                    }
                }
                expected[bin]++;
            }
            List<Integer> counts = new ArrayList<>();
            for (int c : expected) {
                counts.add(c);
            }
            assertEquals(counts, r.laws().get(i).histogram(), "energy[" + i + "]");
            assertEquals(batch, r.laws().get(i).histogram().stream().mapToInt(Integer::intValue).sum());
        }
    }

    @Test
    void nonFiniteResidualsAreCountedAndLeftOutOfTheStatistics() {
        double[] feed = repeat(FEED, 4);
        double[] out = repeat(OUT, 4);
        out[6 + 0] = Double.NaN;                      // sample 1: CH4 NaN -> carbon and hydrogen NaN
        out[18 + 3] = Double.POSITIVE_INFINITY;       // sample 3: CO2 infinite -> carbon and oxygen not finite
        out[12 + 4] = 3 + 0x1p-20;                    // sample 2: H2 off by 2^-20 mol/s -> hydrogen 2^-19 mol/s
        ResidualReport r = ResidualReport.of(REFORMER, feed, out, 4, 1e-9);
        LawResiduals carbon = r.law("carbon");
        // an infinite addend may come out of a compensated sum as NaN (its error term is inf - inf), so only
        // the total of the two is fixed here; the infinite class is checked on its own below
        assertEquals(2, carbon.nonFinite());
        assertTrue(carbon.notANumber() >= 1);
        assertEquals(2, carbon.finite());
        assertEquals(2, carbon.nonFinite());
        assertEquals(2, carbon.overTolerance());
        assertEquals(1, carbon.worstSample(), "the first non-finite sample is the worst");
        assertEquals(new ResidualStats(0, 0, 0), carbon.absolute(), "statistics of the finite samples only");
        assertEquals(2, carbon.histogram().get(0));
        LawResiduals hydrogen = r.law("hydrogen");
        assertEquals(1, hydrogen.notANumber());
        assertEquals(0, hydrogen.infinite());
        assertEquals(0x1p-19, hydrogen.absolute().max(), "2 H per H2 times 2^-20 mol/s");
        assertEquals(0x1p-19 / 3, hydrogen.absolute().mean(), 1e-22);
        assertEquals(1, hydrogen.worstSample());
        LawResiduals nitrogen = r.law("nitrogen");
        assertTrue(nitrogen.withinTolerance());
        assertEquals(0.0, nitrogen.absolute().max());
        assertEquals(3, r.failingSamples(), "samples 1, 2 and 3");
    }

    @Test
    void infiniteResidualIsCountedAsInfinite() {
        // a residual that is not a sum (exp(y) - 0 is exp(y)), so nothing turns the overflow into NaN
        LawSet growth = LawSet.parse("growth.law", "output y\nlaw grow: exp(y) = 0\n");
        ResidualReport r = ResidualReport.of(growth, null, new double[] {0, 1000, Double.NaN}, 3, 1e-9);
        LawResiduals grow = r.law("grow");
        assertEquals(1, grow.notANumber());
        assertEquals(1, grow.infinite(), "exp(1000) overflows");
        assertEquals(1, grow.finite());
        assertEquals(3, grow.overTolerance(), "exp(0) = 1 is off by all of its scale, and the two non-finite");
        assertEquals(1, grow.worstSample(), "the first non-finite sample");
    }

    @Test
    void samplesWithoutAFiniteResidualHaveNaNStatistics() {
        double[] out = OUT.clone();
        out[0] = Double.NaN;
        LawResiduals carbon = ResidualReport.of(REFORMER, FEED, out, 1, 1e-9).law("carbon");
        assertEquals(ResidualStats.NONE, carbon.absolute());
        assertTrue(Double.isNaN(carbon.relative().p99()));
        assertEquals(0, carbon.histogram().stream().mapToInt(Integer::intValue).sum());
    }

    @Test
    void emptyBatchIsWithinToleranceWithNothingCounted() {
        ResidualReport r = ResidualReport.of(REFORMER, new double[0], new double[0], 0, 1e-9);
        assertTrue(r.withinTolerance());
        for (LawResiduals l : r.laws()) {
            assertEquals(-1, l.worstSample());
            assertEquals(ResidualStats.NONE, l.relative());
            assertEquals(0, l.samples());
        }
    }

    @Test
    void floatEntryPointIsTheDoubleOneOnWidenedValues() {
        SplittableRandom random = new SplittableRandom(0xF10A7L);
        int batch = 777;    // several chunks, the last one partial
        float[] xf = new float[batch * 6];
        float[] yf = new float[batch * 6];
        double[] x = new double[xf.length];
        double[] y = new double[yf.length];
        for (int i = 0; i < xf.length; i++) {
            xf[i] = (float) random.nextDouble(0, 3);
            yf[i] = (float) random.nextDouble(0, 3);
            x[i] = xf[i];
            y[i] = yf[i];
        }
        ResidualReport f = ResidualReport.of(REFORMER, xf, yf, batch, 1e-7);
        ResidualReport d = ResidualReport.of(REFORMER, x, y, batch, 1e-7);
        assertEquals(d.toJson(), f.toJson());
        assertEquals(d.laws(), f.laws());
    }

    @Test
    void chunkingDoesNotChangeTheResult() {
        // the same samples evaluated one by one give the same per-sample classes as one call over every chunk
        SplittableRandom random = new SplittableRandom(0xC4C4L);
        int batch = 3 * ResidualReport.CHUNK + 5;
        double[] x = new double[batch * 6];
        double[] y = new double[batch * 6];
        for (int i = 0; i < x.length; i++) {
            x[i] = random.nextDouble(0, 3);
            y[i] = random.nextInt(50) == 0 ? Double.NaN : random.nextDouble(0, 3);
        }
        ResidualReport r = ResidualReport.of(REFORMER, x, y, batch, 0.1);
        LawEvaluator ev = REFORMER.evaluator();
        double[] res = new double[4];
        double[] sc = new double[4];
        int nan = 0;
        int over = 0;
        List<Double> rel = new ArrayList<>();
        for (int s = 0; s < batch; s++) {
            double[] xs = java.util.Arrays.copyOfRange(x, 6 * s, 6 * s + 6);
            double[] ys = java.util.Arrays.copyOfRange(y, 6 * s, 6 * s + 6);
            ev.residuals(xs, ys, 1, res, sc);
            if (Double.isNaN(res[0])) {
                nan++;
                over++;
            } else {
                double v = Math.abs(res[0]) / sc[0];
                rel.add(v);
                over += v > 0.1 ? 1 : 0;
            }
        }
        LawResiduals carbon = r.law("carbon");
        assertEquals(nan, carbon.notANumber());
        assertEquals(over, carbon.overTolerance());
        assertEquals(Collections.max(rel), carbon.relative().max());
    }

    @Test
    void badArgumentsAreRefused() {
        assertThrows(IllegalArgumentException.class, () -> ResidualReport.of(REFORMER, FEED, OUT, 1, -1));
        assertThrows(IllegalArgumentException.class, () -> ResidualReport.of(REFORMER, FEED, OUT, 1, Double.NaN));
        assertThrows(IllegalArgumentException.class, () -> ResidualReport.of(REFORMER, FEED, OUT, -1, 1e-9));
        IllegalArgumentException shortX = assertThrows(IllegalArgumentException.class,
                () -> ResidualReport.of(REFORMER, FEED, repeat(OUT, 2), 2, 1e-9));
        assertEquals("x (inputs) must hold at least 12 values for this batch, found 6", shortX.getMessage());
        assertThrows(IllegalArgumentException.class, () -> ResidualReport.of(REFORMER, repeat(FEED, 2), OUT, 2, 1e-9));
        assertThrows(IllegalArgumentException.class, () -> ResidualReport.of(REFORMER, (float[]) null, new float[6],
                1, 1e-9));
    }

    // ---- text and JSON -------------------------------------------------------------------------------------

    @Test
    void tableIsAlignedAndEndsWithTheVerdict() {
        double[] out = repeat(OUT, 3);
        out[6 + 0] = Double.NaN;
        ResidualReport r = ResidualReport.of(REFORMER, repeat(FEED, 3), out, 3, 1e-9);
        assertEquals("""
                                 |r| in the law's unit         |r| / scale
                law       unit        max      mean       p99       max      mean       p99  over tol  non-finite
                carbon    mol/s         0         0         0         0         0         0         1           1
                hydrogen  mol/s         0         0         0         0         0         0         1           1
                oxygen    mol/s         0         0         0         0         0         0         0           0
                nitrogen  mol/s         0         0         0         0         0         0         0           0

                relative residual, samples per bin (bins empty for every law left out)
                law       0
                carbon    2
                hydrogen  2
                oxygen    3
                nitrogen  3

                3 samples, relative tolerance 1e-9: 1 sample over tolerance for at least one law
                  carbon: 1 sample over tolerance; worst line 11 (1 NaN or infinite)
                  hydrogen: 1 sample over tolerance; worst line 11 (1 NaN or infinite)
                """, r.toTable(k -> "line " + (10 + k)));
        assertTrue(r.toTable().contains("worst sample 1 (1 NaN or infinite)"), r.toTable());
        assertEquals(r.toTable(), r.toString());
    }

    @Test
    void tableNumbersHaveThreeSignificantDigitsInTheirColumns() {
        double[] a = {1, 2, 3};
        double[] b = {1 + 0x1p-30, 2, 3};
        ResidualReport r = ResidualReport.of(HEAT, a, b, 1, 1e-12);
        List<String> lines = r.toTable().lines().toList();
        String head = lines.get(1);
        String row = lines.get(2);
        assertTrue(row.startsWith("energy[0]  kW "), row);
        // 2^-30 kW = 9.31e-10 kW, right-aligned under "max"
        int end = head.indexOf("max") + 3;
        assertEquals("9.31e-10", row.substring(end - 8, end), row);
        assertEquals(" ", row.substring(end - 9, end - 8), row);
        assertTrue(lines.get(0).indexOf("|r| in the law's unit") <= head.indexOf("max"), lines.get(0));
        assertTrue(r.toTable().endsWith("1 sample, relative tolerance 1e-12: 1 sample over tolerance for at least"
                + " one law\n  energy[0]: 1 sample over tolerance; worst sample 0 (relative residual "
                + ResidualTable.number(r.law("energy[0]").relative().max()) + ")\n"), r.toTable());
        assertEquals("1 sample, relative tolerance 1e-12: every law within tolerance\n",
                ResidualReport.of(HEAT, a, a, 1, 1e-12).toTable().lines().reduce((p, q) -> q).orElseThrow() + "\n");
    }

    @Test
    void jsonHasTheDocumentedKeys() {
        double[] out = repeat(OUT, 2);
        out[3] = Double.NaN;
        ResidualReport r = ResidualReport.of(REFORMER, repeat(FEED, 2), out, 2, 1e-9);
        String json = r.toJson();
        String bins = String.join(",\n    ", List.of("\"0\"", "\"(0, 1e-16]\"", "\"(1e-16, 1e-15]\"",
                "\"(1e-15, 1e-14]\"", "\"(1e-14, 1e-13]\"", "\"(1e-13, 1e-12]\"", "\"(1e-12, 1e-11]\"",
                "\"(1e-11, 1e-10]\"", "\"(1e-10, 1e-9]\"", "\"(1e-9, 1e-8]\"", "\"(1e-8, 1e-7]\"", "\"(1e-7, 1e-6]\"",
                "\"(1e-6, 1e-5]\"", "\"(1e-5, 1e-4]\"", "\"(1e-4, 1e-3]\"", "\"(1e-3, 0.01]\"", "\"(0.01, 0.1]\"",
                "\"(0.1, 1]\"", "\"> 1\""));
        assertTrue(json.startsWith("""
                {
                  "samples": 2,
                  "tolerance": 1.0E-9,
                  "withinTolerance": false,
                  "failingSamples": 1,
                  "percentile": {
                    "percent": 99,
                    "method": "nearest-rank",
                    "relativeError": 0
                  },
                  "histogramBins": [
                """ + "    " + bins + "\n  ],\n"), json);
        assertTrue(json.contains("""
                    {
                      "name": "carbon",
                      "law": "carbon",
                      "unit": "mol/s",
                      "finite": 1,
                      "nan": 1,
                      "infinite": 0,
                      "overTolerance": 1,
                      "worstSample": 0,
                      "absolute": {
                        "max": 0,
                        "mean": 0,
                        "p99": 0
                      },
                      "relative": {
                        "max": 0,
                        "mean": 0,
                        "p99": 0
                      },
                      "histogram": [
                        1,
                        0,
                """), json);
        ResidualReport none = ResidualReport.of(REFORMER, new double[0], new double[0], 0, 1e-9);
        assertTrue(none.toJson().contains("\"max\": null"), "NaN statistics are null in JSON");
    }
}
