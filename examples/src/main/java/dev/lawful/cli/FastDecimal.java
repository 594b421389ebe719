package dev.lawful.cli;

import com.fasterxml.jackson.core.io.schubfach.DoubleToDecimal;
import dev.lawful.io.ShortestDecimal;

/**
 * The text of {@link ShortestDecimal#format(double)}, the shortest decimal that reads back to the same double, found
 * about thirty times faster for the values that need many digits: the digits come from jackson-core's port of
 * Giulietti's Schubfach algorithm ({@code DoubleToDecimal}, the algorithm of Java 19's {@code Double.toString}),
 * which finds the shortest round-trip decimal with at least two digits, and are laid out in
 * {@code ShortestDecimal}'s notation. Only when it gives two digits or fewer (where Java's rule of at least two
 * digits can differ from the fewest digits, as {@code 4.9E-324} against {@code 5e-324}) and for zeros, NaN and the
 * infinities is {@code ShortestDecimal} asked itself. The two agree on every double; the tests compare them.
 */
final class FastDecimal {
    /** Plain notation from 10^-3 up to, not including, 10^7, as in {@link ShortestDecimal}. */
    private static final int PLAIN_LOW = -3;
    private static final int PLAIN_HIGH = 7;
    private static final ThreadLocal<FastDecimal> PER_THREAD = ThreadLocal.withInitial(FastDecimal::new);

    /** Schubfach's writer, reused (null when jackson-core's internals are not as expected). */
    private final Object writer;
    private final char[] digits = new char[24];
    private byte[] text;
    private int textLength;

    private FastDecimal() {
        Object w = null;
        if (MAKE != null) {
            try {
                w = MAKE.invoke();
            } catch (Throwable e) {
                w = null;
            }
        }
        this.writer = w;
    }

    /** @return this thread's formatter (it keeps work buffers, so it is not shared between threads) */
    static FastDecimal perThread() {
        return PER_THREAD.get();
    }

    /**
     * Like {@link #append(double, Ascii)}, into a {@code StringBuilder}.
     *
     * @param v  any double
     * @param sb receives the text
     */
    static void append(double v, StringBuilder sb) {
        Ascii a = new Ascii(32);
        perThread().append(v, a);
        sb.append(a.toString());
    }

    /**
     * Appends the shortest round-trip text of {@code v}, the same as {@link ShortestDecimal#format(double)}.
     *
     * @param v  any double
     * @param sb receives the text
     */
    void append(double v, Ascii out) {
        if (v == 0 || !Double.isFinite(v)) {
            out.append(ShortestDecimal.format(v));
            return;
        }
        text(v);
        // digits and the decimal exponent of the first one, from "123.45", "0.00123" or "1.2345E-5"
        int n = 0;
        int point = -1;
        int exponent = 0;
        for (int i = 0; i < textLength; i++) {
            int c = text[i];
            if (c >= '0' && c <= '9') {
                digits[n++] = (char) c;
            } else if (c == '.') {
                point = n;
            } else if (c == 'E') {
                exponent = exponent(text, i + 1, textLength);
                break;
            }
        }
        int e = exponent + (point < 0 ? n : point) - 1;
        int first = 0;
        while (first < n - 1 && digits[first] == '0') {
            first++;
            e--;
        }
        int last = n;
        while (last > first + 1 && digits[last - 1] == '0') {
            last--;
        }
        if (last - first <= 2) {
            out.append(ShortestDecimal.format(v));
            return;
        }
        if (v < 0) {
            out.append('-');
        }
        layout(digits, first, last, e, out);
    }

    private static int exponent(byte[] b, int from, int to) {
        boolean negative = b[from] == '-';
        int value = 0;
        for (int i = negative ? from + 1 : from; i < to; i++) {
            value = 10 * value + (b[i] - '0');
        }
        return negative ? -value : value;
    }

    /**
     * Puts Schubfach's text of a finite nonzero {@code v} in {@link #text}: written by the reused writer into its own
     * buffer when jackson-core's internals are as expected (no allocation per number, which keeps the collector's
     * heap small on files of millions of rows: docs/design-notes.md), else from its public {@code toString}.
     */
    private void text(double v) {
        if (writer != null) {
            try {
                if ((int) TO_DECIMAL.invoke(writer, v) == 0) {
                    text = (byte[]) BYTES.get(writer);
                    textLength = (int) INDEX.get(writer) + 1;
                    return;
                }
            } catch (Throwable e) {
                // fall through to the public entry point
            }
        }
        text = DoubleToDecimal.toString(v).getBytes(java.nio.charset.StandardCharsets.ISO_8859_1);
        textLength = text.length;
    }

    private static final java.lang.invoke.MethodHandle TO_DECIMAL;
    private static final java.lang.invoke.VarHandle BYTES;
    private static final java.lang.invoke.VarHandle INDEX;
    private static final java.lang.invoke.MethodHandle MAKE;

    static {
        java.lang.invoke.MethodHandle toDecimal = null;
        java.lang.invoke.VarHandle bytes = null;
        java.lang.invoke.VarHandle index = null;
        java.lang.invoke.MethodHandle make = null;
        try {
            java.lang.invoke.MethodHandles.Lookup lookup = java.lang.invoke.MethodHandles.privateLookupIn(
                    DoubleToDecimal.class, java.lang.invoke.MethodHandles.lookup());
            toDecimal = lookup.findVirtual(DoubleToDecimal.class, "toDecimal",
                    java.lang.invoke.MethodType.methodType(int.class, double.class));
            bytes = lookup.findVarHandle(DoubleToDecimal.class, "bytes", byte[].class);
            index = lookup.findVarHandle(DoubleToDecimal.class, "index", int.class);
            make = lookup.findConstructor(DoubleToDecimal.class, java.lang.invoke.MethodType.methodType(void.class));
        } catch (ReflectiveOperationException | RuntimeException e) {
            make = null;
        }
        TO_DECIMAL = toDecimal;
        BYTES = bytes;
        INDEX = index;
        MAKE = make;
    }

    private static void layout(char[] d, int first, int last, int e, Ascii sb) {
        int count = last - first;
        if (e >= PLAIN_LOW && e < PLAIN_HIGH) {
            if (e < 0) {
                sb.append("0.");
                for (int i = -1; i > e; i--) {
                    sb.append('0');
                }
                sb.append(d, first, count);
            } else if (count <= e + 1) {
                sb.append(d, first, count);
                for (int i = count; i <= e; i++) {
                    sb.append('0');
                }
            } else {
                sb.append(d, first, e + 1).append('.').append(d, first + e + 1, count - e - 1);
            }
            return;
        }
        sb.append(d[first]);
        if (count > 1) {
            sb.append('.').append(d, first + 1, count - 1);
        }
        sb.append('e').append(e);
    }
}
