package dev.lawful.enforce;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawSet;
import dev.lawful.io.JsonWriter;
import java.util.ArrayList;
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
 * report). Built by a {@link ResidualAccumulator}, which also builds one from chunks, threads or machines in
 * constant memory and merges partial reports exactly: the mean is the exact sum rounded once, and the 99th
 * percentile is exact up to {@value PercentileSketch#EXACT_LIMIT} finite samples per law, beyond which it comes
 * from log-spaced buckets with a relative error below 2<sup>-10</sup> ({@link #exactPercentile()}). Immutable
 * once made.
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
    private final boolean exactPercentile;

    ResidualReport(int samples, double tolerance, List<LawResiduals> laws, int failingSamples,
                   boolean exactPercentile) {
        this.samples = samples;
        this.tolerance = tolerance;
        this.laws = List.copyOf(laws);
        this.failingSamples = failingSamples;
        this.exactPercentile = exactPercentile;
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
        ResidualAccumulator a = new ResidualAccumulator(laws, tolerance);
        a.add(x, y, batch, 0, null);
        return a.report();
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
        ResidualAccumulator a = new ResidualAccumulator(laws, tolerance);
        a.add(x, y, batch, 0, null);
        return a.report();
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

    /**
     * @return whether every p99 of the report is the exact nearest-rank value: true when no law had more than
     *         {@value PercentileSketch#EXACT_LIMIT} finite samples; otherwise some p99 comes from the log-spaced
     *         buckets of {@link PercentileSketch}, at most 2<sup>-10</sup> of itself above the exact value
     */
    public boolean exactPercentile() {
        return exactPercentile;
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
     * {@code failingSamples}, {@code percentile} ({@code {percent: 99, method: "nearest-rank", relativeError: 0}} when every p99 is
     * exact, {@code method: "nearest-rank-log-buckets", relativeError: 2^-10} when some come from the buckets of
     * {@link PercentileSketch}; see {@link #exactPercentile()}),
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
        json.name("percentile").beginObject().name("percent").value(PERCENT).name("method")
                .value(exactPercentile ? "nearest-rank" : "nearest-rank-log-buckets").name("relativeError");
        if (exactPercentile) {
            json.value(0);
        } else {
            json.value(PercentileSketch.RELATIVE_ERROR);
        }
        json.endObject();
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
}
