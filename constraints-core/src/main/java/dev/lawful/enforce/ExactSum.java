package dev.lawful.enforce;

import java.io.DataInput;
import java.io.DataOutput;
import java.io.IOException;
import java.math.BigInteger;
import java.util.Arrays;

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
    /** Additions between carry propagations: each adds below 2^32 to a digit, so 2^30 of them fit a long. */
    private static final int PENDING_LIMIT = 1 << 30;

    private final long[] digit = new long[DIGITS];
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
        long bits = Double.doubleToRawLongBits(v);
        int exponent = (int) (bits >>> 52);
        if (exponent == 0x7FF) {
            infinite++;
            return;
        }
        long mantissa = bits & ((1L << 52) - 1);
        // v = m * 2^(p - 1074) with m < 2^53: a subnormal has p = 0, a normal value the hidden bit and p = exponent - 1
        long m = exponent == 0 ? mantissa : mantissa | (1L << 52);
        int p = exponent == 0 ? 0 : exponent - 1;
        int i = p >>> 5;
        int shift = p & 31;
        long low = m << shift;
        digit[i] += low & MASK;
        digit[i + 1] += low >>> 32;
        if (shift != 0) {
            digit[i + 2] += m >>> (64 - shift);
        }
        if (++pending == PENDING_LIMIT) {
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
        long[] d = Arrays.copyOf(digit, DIGITS);
        carry(d);
        for (long v : d) {
            out.writeInt((int) v);
        }
        out.writeLong(infinite);
    }

    /** Reads what {@link #write} wrote into this empty sum. */
    void read(DataInput in) throws IOException {
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
