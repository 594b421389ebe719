package dev.lawful.enforce;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.util.Arrays;
import java.util.Objects;

/**
 * A mergeable, deterministic percentile of non-negative doubles in bounded memory: exact (the nearest-rank value,
 * {@link NearestRank}) while it holds at most {@value #EXACT_LIMIT} values, and beyond that the nearest-rank value
 * located in log-spaced buckets, with a documented bound on its relative error.
 *
 * <p><b>Buckets.</b> A non-negative double's bit pattern orders like its value; its top {@value #SUB_BITS} mantissa
 * bits with its exponent name its bucket, so each binade [2<sup>e</sup>, 2<sup>e+1</sup>) is cut into
 * 2<sup>{@value #SUB_BITS}</sup> buckets of equal width 2<sup>e-{@value #SUB_BITS}</sup>. A bucket keeps how many
 * values fell in it and the largest of them. The percentile of rank k = ⌈p·n/100⌉ is the largest value of the
 * bucket that holds the k-th smallest value v<sub>k</sub>: a value some sample really has, never below v<sub>k</sub>
 * (so at least p % of the values are at or below it), and above it by less than 2<sup>-{@value #SUB_BITS}</sup>
 * of v<sub>k</sub> (about 0.1 %; for subnormal values, below 2.2e-308, by less than 2<sup>-1064</sup>). Buckets
 * are allocated one binade at a time as values arrive, so memory grows with the range of the values, never with
 * their number.
 *
 * <p><b>Merging.</b> Counts add and maxima combine, and the exact values are kept exactly when both sides hold
 * them and their total stays within {@value #EXACT_LIMIT}: the result depends only on the multiset of values,
 * never on the order of additions or merges, so partial sketches of any partition give the bits of one sketch of
 * the whole. Not thread-safe.
 */
public final class PercentileSketch {
    /** Values kept exactly; beyond this count, the percentile comes from the buckets. */
    public static final int EXACT_LIMIT = 8192;
    /** Mantissa bits that name a bucket within a binade. */
    public static final int SUB_BITS = 10;
    /** The bound on the relative error of a percentile from the buckets: 2<sup>-{@value #SUB_BITS}</sup>. */
    public static final double RELATIVE_ERROR = 0x1p-10;
    private static final int BINADES = 2048;
    private static final int PER_BINADE = 1 << SUB_BITS;

    /**
     * Per binade, the buckets interleaved: slot 2s holds bucket s's count and slot 2s + 1 the raw bits of its largest
     * value (for values ≥ 0 the bits order like the values), so adding a value touches one cache line, not two.
     */
    private final long[][] buckets = new long[BINADES][];
    private long n;
    /** The values themselves while {@code n <= EXACT_LIMIT}; null once more have been seen. */
    private double[] exact = new double[16];

    /** Creates an empty sketch. */
    public PercentileSketch() {
    }

    /**
     * Adds one value.
     *
     * @param v a value ≥ 0 or positive infinity
     * @throws IllegalArgumentException when {@code v} is negative or NaN
     */
    public void add(double v) {
        if (!(v >= 0)) {
            throw new IllegalArgumentException("PercentileSketch adds values >= 0, found " + v);
        }
        // the sign bit cleared: -0.0 is zero
        long bits = Double.doubleToRawLongBits(v) & Long.MAX_VALUE;
        long key = bits >>> (52 - SUB_BITS);
        long[] b = binade((int) (key >>> SUB_BITS));
        int sub = (int) (key & (PER_BINADE - 1));
        b[2 * sub]++;
        if (bits > b[2 * sub + 1]) {
            b[2 * sub + 1] = bits;
        }
        keep(Math.abs(v));
        n++;
    }

    /**
     * Adds {@code v[from .. from + count)}, as {@link #add} one by one would.
     *
     * @param v     values ≥ 0 or positive infinity; not modified
     * @param from  the first index
     * @param count how many values
     * @throws IllegalArgumentException when a value is negative or NaN (the values before it are added)
     */
    public void addAll(double[] v, int from, int count) {
        Objects.checkFromIndexSize(from, count, v.length);
        int k = from;
        int end = from + count;
        for (; k < end && exact != null; k++) {
            add(v[k]);
        }
        if (k == end) {
            return;
        }
        long added = 0;
        try {
            for (; k < end; k++) {
                double x = v[k];
                if (!(x >= 0)) {
                    throw new IllegalArgumentException("PercentileSketch adds values >= 0, found " + x + " at index "
                            + k);
                }
                long bits = Double.doubleToRawLongBits(x) & Long.MAX_VALUE;
                long key = bits >>> (52 - SUB_BITS);
                long[] b = binade((int) (key >>> SUB_BITS));
                int at = 2 * (int) (key & (PER_BINADE - 1));
                b[at]++;
                b[at + 1] = Math.max(b[at + 1], bits);
                added++;
            }
        } finally {
            n += added;
        }
    }

    /** @return the buckets of a binade, allocated on first use */
    private long[] binade(int binade) {
        long[] b = buckets[binade];
        if (b == null) {
            b = new long[2 * PER_BINADE];
            buckets[binade] = b;
        }
        return b;
    }

    private void keep(double v) {
        if (exact == null) {
            return;
        }
        if (n >= EXACT_LIMIT) {
            exact = null;
            return;
        }
        if (n == exact.length) {
            exact = Arrays.copyOf(exact, Math.min(EXACT_LIMIT, 2 * exact.length));
        }
        exact[(int) n] = v;
    }

    /**
     * Adds another sketch's values to this one (the other is not modified).
     *
     * @param other a sketch
     */
    public void merge(PercentileSketch other) {
        for (int b = 0; b < BINADES; b++) {
            long[] theirs = other.buckets[b];
            if (theirs == null) {
                continue;
            }
            if (buckets[b] == null) {
                buckets[b] = new long[2 * PER_BINADE];
            }
            long[] mine = buckets[b];
            for (int s = 0; s < PER_BINADE; s++) {
                mine[2 * s] += theirs[2 * s];
                mine[2 * s + 1] = Math.max(mine[2 * s + 1], theirs[2 * s + 1]);
            }
        }
        if (exact != null && other.exact != null && n + other.n <= EXACT_LIMIT) {
            double[] both = Arrays.copyOf(exact, (int) (n + other.n));
            System.arraycopy(other.exact, 0, both, (int) n, (int) other.n);
            exact = both;
        } else {
            exact = null;
        }
        n += other.n;
    }

    /**
     * Writes the sketch for {@link #read}: the count, the exact values while kept, and the non-empty buckets only
     * (binade, position, count, largest value), so the size grows with the buckets used, not with the range.
     */
    void write(DataOutput out) throws IOException {
        out.writeLong(n);
        out.writeBoolean(exact != null);
        if (exact != null) {
            for (int i = 0; i < n; i++) {
                out.writeDouble(exact[i]);
            }
        }
        int used = 0;
        for (long[] c : buckets) {
            used += c == null ? 0 : 1;
        }
        out.writeInt(used);
        for (int b = 0; b < BINADES; b++) {
            long[] mine = buckets[b];
            if (mine == null) {
                continue;
            }
            int filled = 0;
            for (int s = 0; s < PER_BINADE; s++) {
                filled += mine[2 * s] == 0 ? 0 : 1;
            }
            out.writeShort(b);
            out.writeShort(filled);
            for (int s = 0; s < PER_BINADE; s++) {
                if (mine[2 * s] != 0) {
                    out.writeShort(s);
                    out.writeLong(mine[2 * s]);
                    out.writeDouble(Double.longBitsToDouble(mine[2 * s + 1]));
                }
            }
        }
    }

    /**
     * Reads what {@link #write} wrote into this empty sketch.
     *
     * @throws IOException when the data are not a sketch's
     */
    void read(DataInput in) throws IOException {
        n = in.readLong();
        boolean kept = in.readBoolean();
        if (n < 0 || kept && n > EXACT_LIMIT) {
            throw new IOException("not a percentile sketch: " + n + " values" + (kept ? " kept exactly" : ""));
        }
        exact = kept ? new double[(int) Math.max(16, n)] : null;
        for (int i = 0; kept && i < n; i++) {
            exact[i] = in.readDouble();
        }
        int used = in.readInt();
        for (int k = 0; k < used; k++) {
            int b = in.readUnsignedShort();
            int filled = in.readUnsignedShort();
            if (b >= BINADES || filled > PER_BINADE || buckets[b] != null) {
                throw new IOException("not a percentile sketch: binade " + b + " with " + filled + " buckets");
            }
            long[] mine = new long[2 * PER_BINADE];
            buckets[b] = mine;
            for (int j = 0; j < filled; j++) {
                int s = in.readUnsignedShort();
                if (s >= PER_BINADE) {
                    throw new IOException("not a percentile sketch: bucket " + s + " of " + PER_BINADE);
                }
                mine[2 * s] = in.readLong();
                mine[2 * s + 1] = Double.doubleToRawLongBits(in.readDouble());
            }
        }
    }

    /** @return the number of values added */
    public long count() {
        return n;
    }

    /** @return whether {@link #percentile} is exact: at most {@value #EXACT_LIMIT} values were added */
    public boolean isExact() {
        return exact != null;
    }

    /**
     * @param percent p, from 0 to 100
     * @return the nearest-rank p-th percentile: exact while {@link #isExact()}, otherwise the largest value of the
     *         bucket holding it (see the class comment); NaN when no value was added
     * @throws IllegalArgumentException when {@code percent} is not in [0, 100]
     */
    public double percentile(double percent) {
        if (n == 0) {
            NearestRank.rank(1, percent);
            return Double.NaN;
        }
        long rank = NearestRank.rank(n, percent);
        if (exact != null) {
            double[] sorted = Arrays.copyOf(exact, (int) n);
            Arrays.sort(sorted);
            return sorted[(int) rank - 1];
        }
        long seen = 0;
        for (int b = 0; b < BINADES; b++) {
            long[] mine = buckets[b];
            if (mine == null) {
                continue;
            }
            for (int s = 0; s < PER_BINADE; s++) {
                seen += mine[2 * s];
                if (seen >= rank) {
                    return Double.longBitsToDouble(mine[2 * s + 1]);
                }
            }
        }
        throw new IllegalStateException("the buckets hold fewer values than were added");
    }
}
