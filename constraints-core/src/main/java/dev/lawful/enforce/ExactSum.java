package dev.lawful.enforce;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.math.BigInteger;
import java.util.Arrays;
import java.util.Objects;

/**
 * The exact sum of non-negative doubles, kept as one long fixed-point integer, so that the result does not depend on
 * the order of the additions nor on how the values were split between partial sums: adding values one by one, or
 * summing parts and {@link #merge merging} them in any order, gives the same integer and so the same bits.
 *
 * <p>Every finite double is an integer multiple of 2<sup>-1074</sup> (the smallest subnormal), below
 * 2<sup>1024</sup>, so the sum of any number of them is an integer N times 2<sup>-1074</sup>. N is held in base
 * 2<sup>32</sup> digits, each in a {@code long} so that carries are propagated only every 2<sup>30</sup> additions
 * (the style of a "superaccumulator", the fixed-point accumulator of Kulisch; from memory). Each addition costs a
 * few integer operations and no allocation.
 *
 * <p>{@link #mean(long)} divides the exact sum by a count and rounds once, to the nearest double with ties to even
 * (the result is exact in the sense of IEEE 754 rounding of the true quotient, except when that quotient is below
 * 2<sup>-1022</sup>, where the subnormal result can be one unit of 2<sup>-1074</sup> off). Positive infinity is
 * counted apart: a sum with one is infinite. Not thread-safe; each thread keeps its own and merges.
 */
public final class ExactSum {
    /** Digits of 32 bits: 2098 bits for one double's range, plus 63 bits of growth for up to 2^63 additions. */
    private static final int DIGITS = 68;
    private static final long MASK = 0xFFFF_FFFFL;
    /** Digit additions between carry propagations: each adds below 2^32 to a digit, so 2^30 of them fit a long. */
    private static final int PENDING_LIMIT = 1 << 30;
    /** Additions staged at most: 1024 significands below 2^53 sum below 2^63. */
    private static final int STAGE_LIMIT = 1024;

    /**
     * Values staged before they reach the digits: per biased exponent, the sum of the significands of the values
     * added with it (the hidden bit included; slot 0 sums the subnormals' significands, whose unit is the same
     * 2<sup>-1074</sup> as slot 1's). An addition is then one integer add to one slot; {@value #STAGE_LIMIT}
     * significands below 2<sup>53</sup> sum below 2<sup>63</sup>, so after that many additions the slots move into
     * the digits. Bit g of {@link #groups} says slots 32g to 32g + 31 may be in use, so that moving them visits
     * only those (residuals span a few binades, not the 2047 slots).
     */
    private final long[] staged = new long[0x7FF];
    private long groups;
    private int stagedCount;
    private final long[] digit = new long[DIGITS];
    /** Additions of less than 2^32 to some digit since the carries were last propagated. */
    private int pending;
    private long infinite;

    /** Creates an empty sum (zero). */
    public ExactSum() {
    }

    /**
     * Adds one value.
     *
     * @param v a value ≥ 0 or positive infinity
     * @throws IllegalArgumentException when {@code v} is negative or NaN
     */
    public void add(double v) {
        if (!(v >= 0)) {
            throw new IllegalArgumentException("ExactSum adds values >= 0, found " + v);
        }
        stage(v);
        if (++stagedCount == STAGE_LIMIT) {
            flush();
        }
    }

    /**
     * Adds {@code v[from .. from + count)}, as {@link #add} one by one would (the same sum, faster: the loop has no
     * bookkeeping but one bit mask).
     *
     * @param v     values ≥ 0 or positive infinity; not modified
     * @param from  the first index
     * @param count how many values
     * @throws IllegalArgumentException when a value is negative or NaN (the values before it are added)
     */
    public void addAll(double[] v, int from, int count) {
        Objects.checkFromIndexSize(from, count, v.length);
        long[] slot = staged;
        int end = from + count;
        for (int k = from; k < end; ) {
            int stop = Math.min(end, k + STAGE_LIMIT - stagedCount);
            int start = k;
            long g = groups;
            try {
                for (; k < stop; k++) {
                    double x = v[k];
                    if (!(x >= 0)) {
                        throw new IllegalArgumentException("ExactSum adds values >= 0, found " + x + " at index " + k);
                    }
                    // the sign bit cleared: -0.0 is zero
                    long bits = Double.doubleToRawLongBits(x) & Long.MAX_VALUE;
                    int exponent = (int) (bits >>> 52);
                    if (exponent == 0x7FF) {
                        infinite++;
                        continue;
                    }
                    slot[exponent] += (bits & ((1L << 52) - 1)) | ((long) Integer.signum(exponent) << 52);
                    g |= 1L << (exponent >>> 5);
                }
            } finally {
                groups = g;
                stagedCount += k - start;
            }
            if (stagedCount == STAGE_LIMIT) {
                flush();
            }
        }
    }

    /** Stages one value ≥ 0 (the count is the caller's). */
    private void stage(double v) {
        long bits = Double.doubleToRawLongBits(v) & Long.MAX_VALUE;
        int exponent = (int) (bits >>> 52);
        if (exponent == 0x7FF) {
            infinite++;
            return;
        }
        staged[exponent] += (bits & ((1L << 52) - 1)) | ((long) Integer.signum(exponent) << 52);
        groups |= 1L << (exponent >>> 5);
    }

    /** Moves the staged significand sums into the digits. */
    private void flush() {
        for (long g = groups; g != 0; g &= g - 1) {
            int first = 32 * Long.numberOfTrailingZeros(g);
            for (int e = first; e < Math.min(first + 32, staged.length); e++) {
                long m = staged[e];
                if (m != 0) {
                    staged[e] = 0;
                    // the sum is m * 2^(p - 1074) with m < 2^63: p = 0 for the subnormals, the exponent - 1 otherwise
                    deposit(m, e == 0 ? 0 : e - 1);
                }
            }
        }
        groups = 0;
        stagedCount = 0;
    }

    /** Adds m·2<sup>p</sup> units (m < 2<sup>63</sup>) to the digits: each of three digits gets less than 2^32 twice. */
    private void deposit(long m, int p) {
        int i = p >>> 5;
        int shift = p & 31;
        long low = (m & MASK) << shift;
        long high = (m >>> 32) << shift;
        digit[i] += low & MASK;
        digit[i + 1] += (low >>> 32) + (high & MASK);
        digit[i + 2] += high >>> 32;
        pending += 2;
        if (pending >= PENDING_LIMIT) {
            carry();
        }
    }

    /**
     * Adds another sum to this one (the other is not modified). The result is the same, bit for bit, whatever the
     * order in which sums are merged.
     *
     * @param other a sum
     */
    public void merge(ExactSum other) {
        // flushing the other's staged values changes how it holds its sum, not the sum
        other.flush();
        flush();
        carry();
        long[] theirs = Arrays.copyOf(other.digit, DIGITS);
        carry(theirs);
        for (int i = 0; i < DIGITS; i++) {
            digit[i] += theirs[i];
        }
        infinite += other.infinite;
        carry();
    }

    /** @return whether a positive infinity was added */
    public boolean isInfinite() {
        return infinite > 0;
    }

    /**
     * @return the exact sum as N, the integer such that the sum is N·2<sup>-1074</sup> (without any infinity)
     */
    public BigInteger units() {
        flush();
        long[] d = Arrays.copyOf(digit, DIGITS);
        carry(d);
        BigInteger n = BigInteger.ZERO;
        for (int i = DIGITS - 1; i >= 0; i--) {
            n = n.shiftLeft(32).or(BigInteger.valueOf(d[i]));
        }
        return n;
    }

    /**
     * @param count the number of values the mean is over, at least 1
     * @return the sum divided by {@code count}, rounded once to the nearest double (ties to even); positive infinity
     *         when an infinity was added
     * @throws IllegalArgumentException when {@code count} is less than 1
     */
    public double mean(long count) {
        if (count < 1) {
            throw new IllegalArgumentException("a mean needs a count of at least 1, found " + count);
        }
        if (infinite > 0) {
            return Double.POSITIVE_INFINITY;
        }
        BigInteger num = units();
        if (num.signum() == 0) {
            return 0;
        }
        BigInteger den = BigInteger.valueOf(count);
        // scale so that the integer quotient has 55 or 56 bits: 53 kept, a rounding bit and a sticky bit below them
        int shift = 55 - (num.bitLength() - den.bitLength());
        BigInteger[] qr = shift >= 0 ? num.shiftLeft(shift).divideAndRemainder(den)
                : num.divideAndRemainder(den.shiftLeft(-shift));
        long q = qr[0].longValueExact();
        if (qr[1].signum() != 0) {
            q |= 1;
        }
        // long to double rounds to nearest, ties to even; the sticky bit makes that the rounding of the true quotient
        return Math.scalb((double) q, -shift - 1074);
    }

    /** Writes the sum for {@link #read}: its digits with the carries propagated, then the count of infinities. */
    void write(DataOutput out) throws IOException {
        flush();
        long[] d = Arrays.copyOf(digit, DIGITS);
        carry(d);
        for (long v : d) {
            out.writeInt((int) v);
        }
        out.writeLong(infinite);
    }

    /** Reads what {@link #write} wrote into this empty sum. */
    void read(DataInput in) throws IOException {
        Arrays.fill(staged, 0);
        groups = 0;
        stagedCount = 0;
        for (int i = 0; i < DIGITS; i++) {
            digit[i] = in.readInt() & MASK;
        }
        pending = 0;
        infinite = in.readLong();
    }

    private void carry() {
        carry(digit);
        pending = 0;
    }

    private static void carry(long[] d) {
        long c = 0;
        for (int i = 0; i < DIGITS; i++) {
            long v = d[i] + c;
            d[i] = v & MASK;
            c = v >>> 32;
        }
    }
}
