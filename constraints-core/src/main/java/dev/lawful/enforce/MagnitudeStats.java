package dev.lawful.enforce;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;

/**
 * The running summaries of one law's residual magnitudes (absolute or relative) behind a {@link ResidualStats}: the
 * largest, an {@link ExactSum} for the mean and a {@link PercentileSketch} for the 99th percentile. Every piece
 * merges exactly, so the summaries of a whole do not depend on how it was split or in which order the parts were
 * merged. Not thread-safe.
 */
final class MagnitudeStats {
    private final ExactSum sum = new ExactSum();
    private final PercentileSketch sketch = new PercentileSketch();
    private double max;

    /** @param v a magnitude ≥ 0 or positive infinity */
    void add(double v) {
        if (sketch.count() == 0 || v > max) {
            max = v;
        }
        sum.add(v);
        sketch.add(v);
    }

    /**
     * Adds {@code v[from .. from + count)}, as {@link #add} one by one would.
     *
     * @param v magnitudes ≥ 0 or positive infinity; not modified
     */
    void addAll(double[] v, int from, int count) {
        if (count == 0) {
            return;
        }
        double m = sketch.count() == 0 ? v[from] : max;
        for (int k = from; k < from + count; k++) {
            m = v[k] > m ? v[k] : m;
        }
        max = m;
        sum.addAll(v, from, count);
        sketch.addAll(v, from, count);
    }

    void merge(MagnitudeStats other) {
        if (other.sketch.count() == 0) {
            return;
        }
        if (sketch.count() == 0 || other.max > max) {
            max = other.max;
        }
        sum.merge(other.sum);
        sketch.merge(other.sketch);
    }

    /** Writes the summaries for {@link #read}. */
    void write(DataOutput out) throws IOException {
        out.writeDouble(max);
        sum.write(out);
        sketch.write(out);
    }

    /** Reads what {@link #write} wrote into these empty summaries. */
    void read(DataInput in) throws IOException {
        max = in.readDouble();
        sum.read(in);
        sketch.read(in);
    }

    /** @return whether the percentile is exact (see {@link PercentileSketch#isExact()}) */
    boolean exact() {
        return sketch.isExact();
    }

    /** @return the summaries, {@link ResidualStats#NONE} when nothing was added */
    ResidualStats stats() {
        long n = sketch.count();
        return n == 0 ? ResidualStats.NONE
                : new ResidualStats(max, sum.mean(n), sketch.percentile(ResidualReport.PERCENT));
    }
}
