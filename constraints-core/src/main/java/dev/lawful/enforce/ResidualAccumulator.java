package dev.lawful.enforce;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;

/**
 * Builds a {@link ResidualReport} piece by piece, in constant memory, and merges partial reports exactly: the way
 * to judge data that do not fit in memory (a file read in chunks), on several threads (one accumulator each), or on
 * several machines (one per partition, merged at the end).
 *
 * <pre>{@code
 * ResidualAccumulator a = new ResidualAccumulator(laws, 1e-9);      // one per thread or partition
 * a.add(x, y, rows, firstSample, null);                            // any number of chunks
 * a.merge(b);                                                      // partials, in any order
 * ResidualReport report = a.report();
 * }</pre>
 *
 * <p><b>Merging is exact.</b> Whatever the partition of the samples into chunks and accumulators, and whatever the
 * order of the merges, the report has the same bits as one accumulator given every sample: counts and histograms
 * add; maxima and the worst sample (the largest relative residual, a NaN or infinite one first, the lowest sample
 * index among equals) combine by comparison; the mean is the exact sum ({@link ExactSum}) divided by the count and
 * rounded once; the 99th percentile is exact nearest-rank up to {@value PercentileSketch#EXACT_LIMIT} finite
 * samples per law, and beyond that the nearest-rank value located in log-spaced buckets, never below the exact one
 * and above it by less than 2<sup>-10</sup> of it ({@link PercentileSketch}); the report says which
 * ({@link ResidualReport#exactPercentile()}). The samples of different {@code add} calls must have distinct
 * indices (give each chunk the index of its first sample in the whole); the indices only name the worst sample.
 *
 * <p>Memory: the work arrays of one block of {@value ResidualReport#CHUNK} samples, and per scalar law the exact
 * values (up to the limit above) and the buckets (one array of 1024 counts and maxima per binade the residuals
 * reach). Not thread-safe: give each thread its own and merge.
 *
 * <p><b>Between machines.</b> {@link #writeTo} writes the partial report (counts, sums, sketches and worst samples,
 * not the law set) and {@link #readFrom} reads it back for the same law set, so partials can travel from the
 * machines that built them to the one that merges them; a partial read back merges exactly like the original.
 */
public final class ResidualAccumulator {
    /** "LRA" and a version: the layout of {@link #writeTo}. */
    private static final int FORMAT = 0x4C524101;

    private final LawSet set;
    private final LawEvaluator evaluator;
    private final LawEvaluator.Workspace workspace;
    private final int inputWidth;
    private final int outputWidth;
    private final int lawCount;
    private final double tolerance;
    private final double[] factor;
    private final double[] x;
    private final double[] y;
    private final double[] residual;
    private final double[] scale;
    private final double[] absoluteOf;
    private final double[] relativeOf;
    private final int[] finiteCount;
    private final MagnitudeStats[] absolute;
    private final MagnitudeStats[] relative;
    private final long[] notANumber;
    private final long[] infinite;
    private final long[] over;
    private final long[] worst;
    private final long[] worstTag;
    private final double[] worstRelative;
    private final boolean[] worstNonFinite;
    private final long[][] histogram;
    private long samples;
    private long failing;

    /**
     * Creates an empty accumulator.
     *
     * @param laws      the law set
     * @param tolerance the largest relative residual that is within tolerance, at least 0
     * @throws IllegalArgumentException when the tolerance is negative or NaN
     */
    public ResidualAccumulator(LawSet laws, double tolerance) {
        this.set = Objects.requireNonNull(laws, "laws");
        if (!(tolerance >= 0)) {
            throw new IllegalArgumentException("the tolerance must be >= 0, found " + tolerance);
        }
        this.evaluator = laws.evaluator();
        this.workspace = evaluator.newWorkspace();
        this.inputWidth = laws.inputWidth();
        this.outputWidth = laws.outputWidth();
        this.lawCount = evaluator.lawCount();
        this.tolerance = tolerance;
        ExpandedLaws expanded = laws.expand();
        this.factor = new double[lawCount];
        this.absolute = new MagnitudeStats[lawCount];
        this.relative = new MagnitudeStats[lawCount];
        for (int i = 0; i < lawCount; i++) {
            factor[i] = expanded.unit(i).factor();
            absolute[i] = new MagnitudeStats();
            relative[i] = new MagnitudeStats();
        }
        int chunk = ResidualReport.CHUNK;
        this.x = new double[chunk * inputWidth];
        this.y = new double[chunk * outputWidth];
        this.residual = new double[chunk * lawCount];
        this.scale = new double[chunk * lawCount];
        this.absoluteOf = new double[chunk * lawCount];
        this.relativeOf = new double[chunk * lawCount];
        this.finiteCount = new int[lawCount];
        this.notANumber = new long[lawCount];
        this.infinite = new long[lawCount];
        this.over = new long[lawCount];
        this.worst = new long[lawCount];
        Arrays.fill(worst, -1);
        this.worstTag = new long[lawCount];
        Arrays.fill(worstTag, -1);
        this.worstRelative = new double[lawCount];
        Arrays.fill(worstRelative, -1);
        this.worstNonFinite = new boolean[lawCount];
        this.histogram = new long[lawCount][ResidualHistogram.BINS];
    }

    /**
     * Evaluates every law on a chunk of samples and adds the residuals.
     *
     * @param x           inputs, row-major, {@code n * laws.inputWidth()} values in the declared units (may be null
     *                    when there are no inputs); not modified
     * @param y           outputs, row-major, {@code n * laws.outputWidth()} values; not modified
     * @param n           the number of samples, at least 0
     * @param firstSample the index of the chunk's first sample in the whole data, at least 0
     * @param tags        optional (null allowed): a number per sample kept for the worst sample of each law, such
     *                    as its line in a file ({@link #worstTag(int)}); not modified
     * @throws IllegalArgumentException when {@code n} or {@code firstSample} is negative or an array is too short
     */
    public void add(double[] x, double[] y, int n, long firstSample, long[] tags) {
        check(x == null ? -1 : x.length, y == null ? -1 : y.length, n, firstSample, tags);
        for (int from = 0; from < n; from += ResidualReport.CHUNK) {
            int m = Math.min(ResidualReport.CHUNK, n - from);
            if (inputWidth > 0) {
                System.arraycopy(x, from * inputWidth, this.x, 0, m * inputWidth);
            }
            System.arraycopy(y, from * outputWidth, this.y, 0, m * outputWidth);
            block(m, firstSample + from, tags, from);
        }
    }

    /**
     * Like {@link #add(double[], double[], int, long, long[])} for float32 values: each is widened to double
     * exactly and everything is computed in double.
     *
     * @param x           inputs, row-major (may be null when there are no inputs); not modified
     * @param y           outputs, row-major; not modified
     * @param n           the number of samples, at least 0
     * @param firstSample the index of the chunk's first sample in the whole data, at least 0
     * @param tags        optional (null allowed): a number per sample kept for the worst sample; not modified
     * @throws IllegalArgumentException when {@code n} or {@code firstSample} is negative or an array is too short
     */
    public void add(float[] x, float[] y, int n, long firstSample, long[] tags) {
        check(x == null ? -1 : x.length, y == null ? -1 : y.length, n, firstSample, tags);
        for (int from = 0; from < n; from += ResidualReport.CHUNK) {
            int m = Math.min(ResidualReport.CHUNK, n - from);
            for (int i = 0; i < m * inputWidth; i++) {
                this.x[i] = x[from * inputWidth + i];
            }
            for (int i = 0; i < m * outputWidth; i++) {
                this.y[i] = y[from * outputWidth + i];
            }
            block(m, firstSample + from, tags, from);
        }
    }

    private void check(int xLength, int yLength, int n, long firstSample, long[] tags) {
        if (n < 0 || firstSample < 0) {
            throw new IllegalArgumentException("the batch and the first sample index must be >= 0, found " + n
                    + " and " + firstSample);
        }
        long needX = (long) n * inputWidth;
        long needY = (long) n * outputWidth;
        if (needX > 0 && xLength < needX) {
            throw new IllegalArgumentException("x (inputs) must hold at least " + needX + " values for this batch,"
                    + " found " + Math.max(0, xLength));
        }
        if (needY > 0 && yLength < needY) {
            throw new IllegalArgumentException("y (outputs) must hold at least " + needY + " values for this batch,"
                    + " found " + Math.max(0, yLength));
        }
        if (tags != null && tags.length < n) {
            throw new IllegalArgumentException("tags must hold at least " + n + " values, found " + tags.length);
        }
    }

    /** Adds the {@code n} samples in the work arrays: indices {@code first ..}, tags from {@code tags[tagAt ..]}. */
    private void block(int n, long first, long[] tags, int tagAt) {
        evaluator.residuals(x, y, n, residual, scale, workspace);
        // the finite magnitudes of law i go to absoluteOf/relativeOf[i * CHUNK ..] and are added law by law below:
        // a statistic's loop over one array keeps its running state in registers
        Arrays.fill(finiteCount, 0);
        for (int s = 0; s < n; s++) {
            long sample = first + s;
            long tag = tags == null ? -1 : tags[tagAt + s];
            boolean failed = false;
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
                    failed = true;
                    worse(i, true, Double.POSITIVE_INFINITY, sample, tag);
                    continue;
                }
                double magnitude = Math.abs(r);
                double sc = scale[row + i];
                double rel = sc == 0 ? (magnitude == 0 ? 0 : Double.POSITIVE_INFINITY) : magnitude / sc;
                int at = i * ResidualReport.CHUNK + finiteCount[i]++;
                absoluteOf[at] = magnitude / factor[i];
                relativeOf[at] = rel;
                histogram[i][ResidualHistogram.bin(rel)]++;
                if (!(rel <= tolerance)) {
                    over[i]++;
                    failed = true;
                }
                if (rel >= worstRelative[i]) {
                    worse(i, false, rel, sample, tag);
                }
            }
            if (failed) {
                failing++;
            }
        }
        for (int i = 0; i < lawCount; i++) {
            absolute[i].addAll(absoluteOf, i * ResidualReport.CHUNK, finiteCount[i]);
            relative[i].addAll(relativeOf, i * ResidualReport.CHUNK, finiteCount[i]);
        }
        samples += n;
    }

    /** Makes the given sample law i's worst when it is worse: non-finite first, then larger, then lower index. */
    private void worse(int i, boolean nonFinite, double rel, long sample, long tag) {
        boolean take;
        if (worst[i] < 0) {
            take = true;
        } else if (nonFinite != worstNonFinite[i]) {
            take = nonFinite;
        } else if (nonFinite || rel == worstRelative[i]) {
            take = sample < worst[i];
        } else {
            take = rel > worstRelative[i];
        }
        if (take) {
            worst[i] = sample;
            worstTag[i] = tag;
            worstRelative[i] = rel;
            worstNonFinite[i] = nonFinite;
        }
    }

    /**
     * Adds another accumulator's samples to this one (the other is not modified). The result does not depend on the
     * order of merges (see the class comment).
     *
     * @param other an accumulator of the same law set and tolerance, over samples of other indices
     * @throws IllegalArgumentException when the law set or the tolerance differ
     */
    public void merge(ResidualAccumulator other) {
        if (!other.set.equals(set) || Double.compare(other.tolerance, tolerance) != 0) {
            throw new IllegalArgumentException("only accumulators of the same law set and tolerance merge");
        }
        for (int i = 0; i < lawCount; i++) {
            absolute[i].merge(other.absolute[i]);
            relative[i].merge(other.relative[i]);
            notANumber[i] += other.notANumber[i];
            infinite[i] += other.infinite[i];
            over[i] += other.over[i];
            for (int b = 0; b < ResidualHistogram.BINS; b++) {
                histogram[i][b] += other.histogram[i][b];
            }
            if (other.worst[i] >= 0) {
                worse(i, other.worstNonFinite[i], other.worstRelative[i], other.worst[i], other.worstTag[i]);
            }
        }
        samples += other.samples;
        failing += other.failing;
    }

    /**
     * Writes this partial report in a compact binary form, for {@link #readFrom} with the same law set: the
     * tolerance, a fingerprint of the law set, and per scalar law the counts, histogram, worst sample and summaries
     * (the percentile sketches write only the buckets they use). The accumulator is not modified.
     *
     * @param out where to write
     * @throws IOException when {@code out} fails
     */
    public void writeTo(DataOutput out) throws IOException {
        out.writeInt(FORMAT);
        out.writeInt(fingerprint(set));
        out.writeInt(lawCount);
        out.writeDouble(tolerance);
        out.writeLong(samples);
        out.writeLong(failing);
        for (int i = 0; i < lawCount; i++) {
            out.writeLong(notANumber[i]);
            out.writeLong(infinite[i]);
            out.writeLong(over[i]);
            out.writeLong(worst[i]);
            out.writeLong(worstTag[i]);
            out.writeDouble(worstRelative[i]);
            out.writeBoolean(worstNonFinite[i]);
            for (long count : histogram[i]) {
                out.writeLong(count);
            }
            absolute[i].write(out);
            relative[i].write(out);
        }
    }

    /**
     * Reads a partial report written by {@link #writeTo}: the result reports and merges exactly as the accumulator
     * that wrote it, and can go on adding samples.
     *
     * @param laws the law set the writer had (equal, not necessarily the same object)
     * @param in   where to read
     * @return a new accumulator holding the partial report
     * @throws IOException when {@code in} fails, or holds no partial report of this law set (a different law set, or
     *                     another version of Lawful wrote it)
     */
    public static ResidualAccumulator readFrom(LawSet laws, DataInput in) throws IOException {
        int format = in.readInt();
        if (format != FORMAT) {
            throw new IOException("not a partial residual report of this version of Lawful (format "
                    + Integer.toHexString(format) + ", expected " + Integer.toHexString(FORMAT)
                    + "); write and read it with the same version");
        }
        int print = in.readInt();
        int count = in.readInt();
        if (print != fingerprint(laws) || count != laws.evaluator().lawCount()) {
            throw new IOException("the partial residual report was written for another law set (" + count
                    + " scalar laws); read it with the law set that wrote it");
        }
        ResidualAccumulator a = new ResidualAccumulator(laws, in.readDouble());
        a.samples = in.readLong();
        a.failing = in.readLong();
        for (int i = 0; i < count; i++) {
            a.notANumber[i] = in.readLong();
            a.infinite[i] = in.readLong();
            a.over[i] = in.readLong();
            a.worst[i] = in.readLong();
            a.worstTag[i] = in.readLong();
            a.worstRelative[i] = in.readDouble();
            a.worstNonFinite[i] = in.readBoolean();
            for (int b = 0; b < ResidualHistogram.BINS; b++) {
                a.histogram[i][b] = in.readLong();
            }
            a.absolute[i].read(in);
            a.relative[i].read(in);
        }
        return a;
    }

    /** A check that a partial is read with the law set that wrote it: the hash of the set's printed text. */
    private static int fingerprint(LawSet laws) {
        return laws.toString().hashCode();
    }

    /** @return the number of samples added so far */
    public long samples() {
        return samples;
    }

    /**
     * @param law a scalar law index, in the order of {@link ExpandedLaws}
     * @return the tag given with law {@code law}'s worst sample, or -1 without samples or tags
     */
    public long worstTag(int law) {
        return worstTag[law];
    }

    /**
     * @return the report of every sample added so far; the accumulator can go on adding
     * @throws ArithmeticException when more than {@link Integer#MAX_VALUE} samples were added (the report counts
     *                             in {@code int})
     */
    public ResidualReport report() {
        ExpandedLaws expanded = set.expand();
        List<LawResiduals> out = new ArrayList<>(lawCount);
        boolean exact = true;
        int n = Math.toIntExact(samples);
        for (int i = 0; i < lawCount; i++) {
            List<Integer> bins = new ArrayList<>(ResidualHistogram.BINS);
            for (long count : histogram[i]) {
                bins.add(Math.toIntExact(count));
            }
            exact &= absolute[i].exact() && relative[i].exact();
            out.add(new LawResiduals(expanded.name(i), expanded.law(i).name(), expanded.unit(i), n,
                    Math.toIntExact(notANumber[i]), Math.toIntExact(infinite[i]), Math.toIntExact(over[i]),
                    Math.toIntExact(worst[i]), absolute[i].stats(), relative[i].stats(), bins));
        }
        return new ResidualReport(n, tolerance, out, Math.toIntExact(failing), exact);
    }
}
