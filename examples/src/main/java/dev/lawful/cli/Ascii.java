package dev.lawful.cli;

import java.lang.invoke.MethodHandles;
import java.lang.invoke.VarHandle;
import java.nio.ByteOrder;
import java.util.Arrays;

/**
 * A growable byte buffer for formatting rows on a worker: ASCII text (without a {@code StringBuilder} and the two
 * copies its text costs on the way to bytes) or little-endian float64 values. Characters beyond Latin-1 are refused (numbers and status words
 * are ASCII; a header goes through {@link dev.lawful.io.CsvWriter}).
 */
final class Ascii {
    /** Writes a double's 8 bytes at once (its raw bits: a NaN keeps its payload), whatever the platform's order. */
    private static final VarHandle LITTLE_ENDIAN_DOUBLE =
            MethodHandles.byteArrayViewVarHandle(double[].class, ByteOrder.LITTLE_ENDIAN);

    private byte[] bytes;
    private int length;

    /** @param capacity the initial capacity in bytes */
    Ascii(int capacity) {
        bytes = new byte[Math.max(16, capacity)];
    }

    private void room(int more) {
        if (length + more > bytes.length) {
            bytes = Arrays.copyOf(bytes, Math.max(length + more, 2 * bytes.length));
        }
    }

    /** @return this buffer, with {@code c} appended */
    Ascii append(char c) {
        room(1);
        bytes[length++] = (byte) c;
        return this;
    }

    /** @return this buffer, with {@code count} characters of {@code chars} from {@code from} appended */
    Ascii append(char[] chars, int from, int count) {
        room(count);
        for (int i = 0; i < count; i++) {
            bytes[length++] = (byte) chars[from + i];
        }
        return this;
    }

    /** @return this buffer, with {@code s} appended (each character below 256) */
    Ascii append(String s) {
        room(s.length());
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            if (c > 0xFF) {
                throw new IllegalArgumentException("not Latin-1: " + s);
            }
            bytes[length++] = (byte) c;
        }
        return this;
    }

    /** @return this buffer, with the decimal digits of {@code v} appended */
    Ascii append(int v) {
        return append(Integer.toString(v));
    }

    /**
     * Writes the bytes written so far.
     *
     * @param out receives them
     * @throws java.io.IOException when {@code out} fails
     */
    void writeTo(java.io.OutputStream out) throws java.io.IOException {
        out.write(bytes, 0, length);
    }

    /**
     * Writes part of the bytes written so far.
     *
     * @param out    receives them
     * @param from   the first byte
     * @param count  how many bytes
     * @throws java.io.IOException when {@code out} fails
     * @throws IndexOutOfBoundsException when the range is not within the bytes written
     */
    void writeTo(java.io.OutputStream out, int from, int count) throws java.io.IOException {
        java.util.Objects.checkFromIndexSize(from, count, length);
        out.write(bytes, from, count);
    }

    /** @return the number of bytes written so far */
    int length() {
        return length;
    }

    /** Empties the buffer, keeping its capacity. */
    void clear() {
        length = 0;
    }

    /** @return this buffer, with the 8 bytes of {@code v} appended in little-endian order (a .npy float64) */
    Ascii appendLittleEndian(double v) {
        room(8);
        LITTLE_ENDIAN_DOUBLE.set(bytes, length, v);
        length += 8;
        return this;
    }

    /**
     * Reserves room for {@code count} more float64 values, so that {@link #putLittleEndian} may follow without a
     * check per value.
     *
     * @return this buffer
     */
    Ascii reserveDoubles(int count) {
        room(count * 8);
        return this;
    }

    /** Appends {@code v}'s 8 bytes in little-endian order into room made by {@link #reserveDoubles}. */
    void putLittleEndian(double v) {
        LITTLE_ENDIAN_DOUBLE.set(bytes, length, v);
        length += 8;
    }

    @Override
    public String toString() {
        return new String(bytes, 0, length, java.nio.charset.StandardCharsets.ISO_8859_1);
    }
}
