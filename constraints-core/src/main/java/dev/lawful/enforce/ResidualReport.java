package dev.lawful.enforce;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.io.JsonWriter;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;
import java.util.function.IntFunction;

/**
 * How well a batch of inputs x and outputs y obeys a law set, law by law: for each scalar law (a law, or element
 * {@code name[i]} of a vector law) the largest, mean and 99th-percentile residual |lhs - rhs| in the law's unit
 * and relative to the law's natural scale, how many samples are over a tolerance, how many residuals are NaN or
 * infinite, and a histogram of the relative residual by decade. See {@link LawResiduals} for the exact
 * definitions, {@link NearestRank} for the percentile and {@link ResidualHistogram} for the bins.
 *
 * <p>Units: x and y are in the declared units, as everywhere in Lawful. The evaluator gives residuals and scales in
 * coherent SI units; a residual is reported in the law's unit ({@link LawSet#lawUnit(String)}) as
 * residual_SI / unit.factor(), and the relative residual |residual_SI| / scale_SI is a pure number.
 *
 * <p>A sample is judged by its relative residual: it is within tolerance t when |lhs - rhs| / scale ≤ t, and a NaN
 * or infinite residual never is. The report is within tolerance when every sample is, for every law.
 *
 * <p>Cost: one evaluation of the residuals in blocks of {@value #CHUNK} samples (work arrays allocated once per
 * report), plus two doubles per sample and scalar law held until the percentiles are taken, and a sort of each.
 * Immutable once made.
 */
public final class ResidualReport {
    /** The percentile reported as {@code p99}. */
    public static final double PERCENT = 99;
    /** Samples evaluated per call of the evaluator. */
    static final int CHUNK = 256;

    private final int samples;
    private final double tolerance;
    private final List<LawResiduals> laws;
    private final int failingSamples;

    private ResidualReport(int samples, double tolerance, List<LawResiduals> laws, int failingSamples) {
        this.samples = samples;
        this.tolerance = tolerance;
        this.laws = List.copyOf(laws);
        this.failingSamples = failingSamples;
    }

    /**
     * Evaluates every law on a batch and summarises the residuals.
     *
     * @param laws      the law set
     * @param x         inputs, row-major, {@code batch * laws.inputWidth()} values in the declared units (may be
     *                  null when there are no inputs); not modified
     * @param y         outputs, row-major, {@code batch * laws.outputWidth()} values; not modified
     * @param batch     the number of samples, at least 0
     * @param tolerance the largest relative residual that is within tolerance, at least 0
     * @return the report
     * @throws IllegalArgumentException when the batch is negative, an array is too short, or the tolerance is
     *                                  negative or NaN
     */
    public static ResidualReport of(LawSet laws, double[] x, double[] y, int batch, double tolerance) {
        Collector c = new Collector(laws, batch, tolerance);
        c.check(x == null ? -1 : x.length, y == null ? -1 : y.length);
        for (int from = 0; from < batch; from += CHUNK) {
            int n = Math.min(CHUNK, batch - from);
            if (c.inputWidth > 0) {
                System.arraycopy(x, from * c.inputWidth, c.x, 0, n * c.inputWidth);
            }
            System.arraycopy(y, from * c.outputWidth, c.y, 0, n * c.outputWidth);
            c.add(from, n);
        }
        return c.finish();
    }

    /**
     * Like {@link #of(LawSet, double[], double[], int, double)} for float32 batches: each value is widened to
     * double exactly and everything is computed in double.
     *
     * @param laws      the law set
     * @param x         inputs, row-major, {@code batch * laws.inputWidth()} values (may be null when there are no
     *                  inputs); not modified
     * @param y         outputs, row-major, {@code batch * laws.outputWidth()} values; not modified
     * @param batch     the number of samples, at least 0
     * @param tolerance the largest relative residual that is within tolerance, at least 0
     * @return the report
     * @throws IllegalArgumentException when the batch is negative, an array is too short, or the tolerance is
     *                                  negative or NaN
     */
    public static ResidualReport of(LawSet laws, float[] x, float[] y, int batch, double tolerance) {
        Collector c = new Collector(laws, batch, tolerance);
        c.check(x == null ? -1 : x.length, y == null ? -1 : y.length);
        for (int from = 0; from < batch; from += CHUNK) {
            int n = Math.min(CHUNK, batch - from);
            widen(x, from * c.inputWidth, c.x, n * c.inputWidth);
            widen(y, from * c.outputWidth, c.y, n * c.outputWidth);
            c.add(from, n);
        }
        return c.finish();
    }

    private static void widen(float[] from, int offset, double[] to, int n) {
        for (int i = 0; i < n; i++) {
            to[i] = from[offset + i];
        }
    }

    // ---- results ---------------------------------------------------------------------------------------------

    /** @return the number of samples in the batch */
    public int samples() {
        return samples;
    }

    /** @return the tolerance on the relative residual the report judges against */
    public double tolerance() {
        return tolerance;
    }

    /** @return one entry per scalar law, in the order of {@link ExpandedLaws} */
    public List<LawResiduals> laws() {
        return laws;
    }

    /**
     * @param name a scalar law name, {@code name} or {@code name[i]}
     * @return its entry
     * @throws IllegalArgumentException when there is no scalar law of that name
     */
    public LawResiduals law(String name) {
        for (LawResiduals l : laws) {
            if (l.name().equals(name)) {
                return l;
            }
        }
        throw new IllegalArgumentException("no scalar law named '" + name + "'");
    }

    /** @return whether every sample is within tolerance for every law */
    public boolean withinTolerance() {
        return failingSamples == 0;
    }

    /** @return the number of samples over tolerance for at least one law */
    public int failingSamples() {
        return failingSamples;
    }

    /** @return the scalar laws with at least one sample over tolerance, in law order */
    public List<LawResiduals> exceeding() {
        List<LawResiduals> out = new ArrayList<>();
        for (LawResiduals l : laws) {
            if (!l.withinTolerance()) {
                out.add(l);
            }
        }
        return out;
    }

    // ---- text forms ------------------------------------------------------------------------------------------

    /**
     * The report as aligned text: a table of the statistics (one row per scalar law), a table of the histogram
     * (bins that are empty for every law left out), and a closing verdict line. Samples are named
     * {@code sample k} (0-based) in the verdict.
     *
     * @return the text, lines ended by {@code \n}
     */
    public String toTable() {
        return toTable(k -> "sample " + k);
    }

    /**
     * Like {@link #toTable()}, with the caller's name for a sample in the verdict (for example its line in a
     * file).
     *
     * @param sampleName gives the name of the 0-based sample k, such as {@code "line 12"}
     * @return the text, lines ended by {@code \n}
     */
    public String toTable(IntFunction<String> sampleName) {
        return ResidualTable.render(this, Objects.requireNonNull(sampleName, "sampleName"));
    }

    /**
     * Writes the report as one JSON object: {@code samples}, {@code tolerance}, {@code withinTolerance},
     * {@code failingSamples}, {@code percentile} ({@code {percent: 99, method: "nearest-rank"}}),
     * {@code histogramBins} (the bin labels of {@link ResidualHistogram#label(int)}) and {@code laws}, one object
     * per scalar law with {@code name}, {@code law}, {@code unit} (as written, {@code ""} for a pure number),
     * {@code finite}, {@code nan}, {@code infinite}, {@code overTolerance}, {@code worstSample} (0-based, -1 for an
     * empty batch), {@code absolute} and {@code relative} (each {@code {max, mean, p99}}; a statistic that is NaN or
     * infinite is written as {@code null}, JSON having neither) and {@code histogram} (the counts per bin).
     *
     * @param json receives one object, as a value where the writer expects one
     * @throws IllegalStateException when the writer does not expect a value here
     */
    public void writeJson(JsonWriter json) {
        json.beginObject()
                .name("samples").value(samples)
                .name("tolerance").value(tolerance)
                .name("withinTolerance").value(withinTolerance())
                .name("failingSamples").value(failingSamples);
        json.name("percentile").beginObject().name("percent").value(PERCENT).name("method").value("nearest-rank")
                .endObject();
        json.name("histogramBins").beginArray();
        for (int b = 0; b < ResidualHistogram.BINS; b++) {
            json.value(ResidualHistogram.label(b));
        }
        json.endArray();
        json.name("laws").beginArray();
        for (LawResiduals l : laws) {
            json.beginObject()
                    .name("name").value(l.name())
                    .name("law").value(l.law())
                    .name("unit").value(l.unit().text())
                    .name("finite").value(l.finite())
                    .name("nan").value(l.notANumber())
                    .name("infinite").value(l.infinite())
                    .name("overTolerance").value(l.overTolerance())
                    .name("worstSample").value(l.worstSample());
            stats(json.name("absolute"), l.absolute());
            stats(json.name("relative"), l.relative());
            json.name("histogram").beginArray();
            for (int count : l.histogram()) {
                json.value(count);
            }
            json.endArray().endObject();
        }
        json.endArray().endObject();
    }

    private static void stats(JsonWriter json, ResidualStats s) {
        json.beginObject().name("max").value(s.max()).name("mean").value(s.mean()).name("p99").value(s.p99())
                .endObject();
    }

    /** @return {@link #writeJson(JsonWriter)} as pretty-printed text, without a final line end */
    public String toJson() {
        StringBuilder sb = new StringBuilder();
        writeJson(JsonWriter.pretty(sb));
        return sb.toString();
    }

    @Override
    public String toString() {
        return toTable();
    }

    // ---- the one kernel both entry points feed ---------------------------------------------------------------

    /** Work arrays and running counts of one report. */
    private static final class Collector {
        final LawSet set;
        final LawEvaluator evaluator;
        final LawEvaluator.Workspace workspace;
        final int inputWidth;
        final int outputWidth;
        final int lawCount;
        final int batch;
        final double tolerance;
        final double[] factor;
        /** One chunk of inputs and outputs, widened or copied. */
        final double[] x;
        final double[] y;
        final double[] residual;
        final double[] scale;
        /** Per law: |r| in the law's unit and the relative residual of each finite sample, in sample order. */
        final double[][] absolute;
        final double[][] relative;
        final int[] finite;
        final int[] notANumber;
        final int[] infinite;
        final int[] over;
        final int[] worst;
        final double[] worstRelative;
        final boolean[] worstNonFinite;
        final int[][] histogram;
        final boolean[] failing;

        Collector(LawSet set, int batch, double tolerance) {
            Objects.requireNonNull(set, "laws");
            if (batch < 0) {
                throw new IllegalArgumentException("batch must be >= 0, found " + batch);
            }
            if (!(tolerance >= 0)) {
                throw new IllegalArgumentException("the tolerance must be >= 0, found " + tolerance);
            }
            this.set = set;
            this.evaluator = set.evaluator();
            this.workspace = evaluator.newWorkspace();
            this.inputWidth = set.inputWidth();
            this.outputWidth = set.outputWidth();
            this.lawCount = evaluator.lawCount();
            this.batch = batch;
            this.tolerance = tolerance;
            ExpandedLaws expanded = set.expand();
            this.factor = new double[lawCount];
            for (int i = 0; i < lawCount; i++) {
                factor[i] = expanded.unit(i).factor();
            }
            int chunk = Math.min(CHUNK, batch);
            this.x = new double[chunk * inputWidth];
            this.y = new double[chunk * outputWidth];
            this.residual = new double[chunk * lawCount];
            this.scale = new double[chunk * lawCount];
            this.absolute = new double[lawCount][batch];
            this.relative = new double[lawCount][batch];
            this.finite = new int[lawCount];
            this.notANumber = new int[lawCount];
            this.infinite = new int[lawCount];
            this.over = new int[lawCount];
            this.worst = new int[lawCount];
            Arrays.fill(worst, -1);
            this.worstRelative = new double[lawCount];
            Arrays.fill(worstRelative, -1);
            this.worstNonFinite = new boolean[lawCount];
            this.histogram = new int[lawCount][ResidualHistogram.BINS];
            this.failing = new boolean[batch];
        }

        void check(int xLength, int yLength) {
            long needX = (long) batch * inputWidth;
            long needY = (long) batch * outputWidth;
            if (needX > 0 && xLength < needX) {
                throw new IllegalArgumentException("x (inputs) must hold at least " + needX + " values for this"
                        + " batch, found " + Math.max(0, xLength));
            }
            if (needY > 0 && yLength < needY) {
                throw new IllegalArgumentException("y (outputs) must hold at least " + needY + " values for this"
                        + " batch, found " + Math.max(0, yLength));
            }
        }

        /** Adds samples {@code first .. first+n-1}, whose values are in {@link #x} and {@link #y}. */
        void add(int first, int n) {
            evaluator.residuals(x, y, n, residual, scale, workspace);
            for (int s = 0; s < n; s++) {
                int sample = first + s;
                int row = s * lawCount;
                for (int i = 0; i < lawCount; i++) {
                    double r = residual[row + i];
                    if (Double.isNaN(r) || Double.isInfinite(r)) {
                        if (Double.isNaN(r)) {
                            notANumber[i]++;
                        } else {
                            infinite[i]++;
                        }
                        over[i]++;
                        failing[sample] = true;
                        if (!worstNonFinite[i]) {
                            worstNonFinite[i] = true;
                            worst[i] = sample;
                        }
                        continue;
                    }
                    double magnitude = Math.abs(r);
                    double sc = scale[row + i];
                    double rel = sc == 0 ? (magnitude == 0 ? 0 : Double.POSITIVE_INFINITY) : magnitude / sc;
                    int k = finite[i]++;
                    absolute[i][k] = magnitude / factor[i];
                    relative[i][k] = rel;
                    histogram[i][ResidualHistogram.bin(rel)]++;
                    if (!(rel <= tolerance)) {
                        over[i]++;
                        failing[sample] = true;
                    }
                    if (!worstNonFinite[i] && rel > worstRelative[i]) {
                        worstRelative[i] = rel;
                        worst[i] = sample;
                    }
                }
            }
        }

        ResidualReport finish() {
            ExpandedLaws expanded = set.expand();
            List<LawResiduals> out = new ArrayList<>(lawCount);
            for (int i = 0; i < lawCount; i++) {
                List<Integer> bins = new ArrayList<>(ResidualHistogram.BINS);
                for (int count : histogram[i]) {
                    bins.add(count);
                }
                out.add(new LawResiduals(expanded.name(i), expanded.law(i).name(), expanded.unit(i), batch,
                        notANumber[i], infinite[i], over[i], worst[i], ResidualStats.of(absolute[i], finite[i]),
                        ResidualStats.of(relative[i], finite[i]), bins));
            }
            int failed = 0;
            for (boolean f : failing) {
                if (f) {
                    failed++;
                }
            }
            return new ResidualReport(batch, tolerance, out, failed);
        }
    }
}
