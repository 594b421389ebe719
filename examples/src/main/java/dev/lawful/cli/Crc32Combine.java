package dev.lawful.cli;

/**
 * The CRC-32 of two byte strings one after the other, from the CRC-32 of each and the second's length, without
 * reading the bytes again: zlib's {@code crc32_combine}, by multiplication of polynomials over GF(2) modulo the
 * CRC-32 polynomial (reflected {@code 0xEDB88320}, as {@link java.util.zip.CRC32} and ZIP use). Appending
 * {@code n} bytes to a string multiplies its CRC by {@code x^(8n)} modulo the polynomial; the powers
 * {@code x^(2^k)} are tabulated once.
 */
final class Crc32Combine {
    private static final int POLY = 0xEDB88320;
    /** {@code x^(2^k)} modulo the polynomial, for k = 0 … 31 (bit 31 is the coefficient of x^0). */
    private static final int[] X2N = new int[32];

    static {
        int p = 1 << 30; // x^1
        X2N[0] = p;
        for (int k = 1; k < 32; k++) {
            p = multiply(p, p);
            X2N[k] = p;
        }
    }

    private Crc32Combine() {
    }

    /**
     * @param first        the CRC-32 of the first string (the low 32 bits are used)
     * @param second       the CRC-32 of the second string (the low 32 bits are used)
     * @param secondLength the second string's length in bytes, not negative
     * @return the CRC-32 of the first string followed by the second, in the low 32 bits
     * @throws IllegalArgumentException when the length is negative
     */
    static long combine(long first, long second, long secondLength) {
        if (secondLength < 0) {
            throw new IllegalArgumentException("a length of " + secondLength + " bytes; expected 0 or more");
        }
        return Integer.toUnsignedLong(multiply(powerOfX(secondLength, 3), (int) first) ^ (int) second);
    }

    /** @return {@code a × b} modulo the polynomial, both reflected; {@code a} must not be zero */
    private static int multiply(int a, int b) {
        int m = 1 << 31;
        int p = 0;
        for (;;) {
            if ((a & m) != 0) {
                p ^= b;
                if ((a & (m - 1)) == 0) {
                    break;
                }
            }
            m >>>= 1;
            b = (b & 1) != 0 ? (b >>> 1) ^ POLY : b >>> 1;
        }
        return p;
    }

    /** @return {@code x^(n × 2^k)} modulo the polynomial */
    private static int powerOfX(long n, int k) {
        int p = 1 << 31; // x^0
        for (long rest = n; rest != 0; rest >>>= 1, k++) {
            if ((rest & 1) != 0) {
                p = multiply(X2N[k & 31], p);
            }
        }
        return p;
    }
}
