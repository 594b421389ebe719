package dev.lawful.io;

import java.io.Flushable;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.HashSet;
import java.util.Objects;
import java.util.Set;

/**
 * A small streaming writer of one JSON text (RFC 8259): objects, arrays, strings, numbers, booleans and null,
 * written straight to an {@link Appendable} as the calls arrive.
 *
 * <pre>{@code
 * JsonWriter json = JsonWriter.pretty(out);
 * json.beginObject()
 *     .name("law").value("carbon")
 *     .name("residual").value(1.5e-17)
 *     .name("outputs").beginArray().value("out[0]").value("out[2]").endArray()
 *     .endObject();
 * }</pre>
 *
 * <p>Layout: {@linkplain #compact(Appendable) compact} writes no white space at all; {@linkplain #pretty(Appendable)
 * pretty} puts every member and element on its own line, indented by two spaces per level, with {@code ": "}
 * after a name, and writes an empty object or array as {@code {}} or {@code []}. Neither adds a line end after the
 * last token.
 *
 * <p>Strings: {@code "} and {@code \} are escaped as {@code \"} and {@code \\}, every control character
 * U+0000 to U+001F as <code>&#92;u00XX</code> (upper-case hex), as RFC 8259 section 7 requires. A surrogate that is not
 * part of a pair is written as a <code>&#92;uXXXX</code> escape too, so the text stays encodable in UTF-8; every other
 * character, {@code /} included, is written as it is.
 *
 * <p>Numbers: see {@link #number(double)}. JSON has no NaN or infinity, so a non-finite double is written as
 * {@code null}; a reader that needs to tell them apart must be given that information some other way.
 *
 * <p>The writer checks that the calls form one well-formed JSON value and throws {@link IllegalStateException}
 * at the first call that does not (a value where a member name is due, a closing call that does not match, a
 * second top-level value, a name used twice in one object). Errors of the underlying {@link Appendable} are
 * rethrown as {@link UncheckedIOException}. Not thread-safe.
 */
public final class JsonWriter implements Flushable {

    /**
     * Largest integer magnitude written without a fraction or exponent: 2^53 - 1, the end of the range RFC 8259
     * section 6 names as interoperable (every integer in it is exactly a double).
     */
    public static final double MAX_EXACT_INTEGER = 9007199254740991.0;

    private static final char[] HEX = "0123456789ABCDEF".toCharArray();

    /** One open object or array. */
    private static final class Frame {
        final boolean object;
        int count;
        boolean afterName;
        String lastName;
        final Set<String> names;

        Frame(boolean object) {
            this.object = object;
            this.names = object ? new HashSet<>() : null;
        }
    }

    private final Appendable out;
    private final boolean pretty;
    private final Deque<Frame> stack = new ArrayDeque<>();
    private boolean done;

    private JsonWriter(Appendable out, boolean pretty) {
        this.out = Objects.requireNonNull(out, "out");
        this.pretty = pretty;
    }

    /**
     * @param out receives the text
     * @return a writer without any white space between tokens
     */
    public static JsonWriter compact(Appendable out) {
        return new JsonWriter(out, false);
    }

    /**
     * @param out receives the text
     * @return a writer that puts each member and element on its own line, indented by two spaces per level
     */
    public static JsonWriter pretty(Appendable out) {
        return new JsonWriter(out, true);
    }

    // ---- structure -------------------------------------------------------------------------------------------

    /**
     * Opens an object, as a top-level value, an array element or the value of the last {@link #name(String)}.
     *
     * @return this writer
     * @throws IllegalStateException when a value is not allowed here
     */
    public JsonWriter beginObject() {
        beforeValue();
        write('{');
        stack.push(new Frame(true));
        return this;
    }

    /**
     * Closes the innermost open object.
     *
     * @return this writer
     * @throws IllegalStateException when the innermost open value is not an object, or a name awaits its value
     */
    public JsonWriter endObject() {
        return end(true);
    }

    /**
     * Opens an array, as a top-level value, an array element or the value of the last {@link #name(String)}.
     *
     * @return this writer
     * @throws IllegalStateException when a value is not allowed here
     */
    public JsonWriter beginArray() {
        beforeValue();
        write('[');
        stack.push(new Frame(false));
        return this;
    }

    /**
     * Closes the innermost open array.
     *
     * @return this writer
     * @throws IllegalStateException when the innermost open value is not an array
     */
    public JsonWriter endArray() {
        return end(false);
    }

    private JsonWriter end(boolean object) {
        Frame f = stack.peek();
        if (f == null || f.object != object) {
            String open = f == null ? "nothing is open" : "the innermost open value is an " + kind(f.object);
            throw new IllegalStateException("cannot close an " + kind(object) + " here: " + open);
        }
        if (f.afterName) {
            throw new IllegalStateException("cannot close the object: member '" + f.lastName + "' has no value");
        }
        stack.pop();
        if (f.count > 0) {
            newline();
        }
        write(object ? '}' : ']');
        if (stack.isEmpty()) {
            done = true;
        }
        return this;
    }

    private static String kind(boolean object) {
        return object ? "object" : "array";
    }

    /**
     * Writes the name of the next member of the innermost open object; the next call must write its value.
     *
     * @param name the member name (any string; it is escaped)
     * @return this writer
     * @throws IllegalStateException when no object is open, a name already awaits its value, or this object
     *                               already has a member of that name
     */
    public JsonWriter name(String name) {
        Objects.requireNonNull(name, "name");
        Frame f = stack.peek();
        if (f == null || !f.object) {
            throw new IllegalStateException("member name '" + name + "' written outside an object");
        }
        if (f.afterName) {
            throw new IllegalStateException("member '" + f.lastName + "' has no value before member '" + name + "'");
        }
        if (!f.names.add(name)) {
            throw new IllegalStateException("member '" + name + "' is written twice in one object");
        }
        if (f.count > 0) {
            write(',');
        }
        newline();
        writeString(name);
        write(':');
        if (pretty) {
            write(' ');
        }
        f.afterName = true;
        f.lastName = name;
        return this;
    }

    // ---- values ----------------------------------------------------------------------------------------------

    /**
     * Writes a string, escaped as described in the class comment, or {@code null} when {@code value} is null.
     *
     * @param value the string, or null
     * @return this writer
     * @throws IllegalStateException when a value is not allowed here
     */
    public JsonWriter value(String value) {
        beforeValue();
        if (value == null) {
            write("null");
        } else {
            writeString(value);
        }
        afterValue();
        return this;
    }

    /**
     * Writes a number in the form of {@link #number(double)}; NaN and the infinities become {@code null}.
     *
     * @param value the number
     * @return this writer
     * @throws IllegalStateException when a value is not allowed here
     */
    public JsonWriter value(double value) {
        beforeValue();
        write(number(value));
        afterValue();
        return this;
    }

    /**
     * Writes an integer in decimal, exactly (a reader that holds numbers as doubles may round it when its
     * magnitude exceeds {@link #MAX_EXACT_INTEGER}).
     *
     * @param value the integer
     * @return this writer
     * @throws IllegalStateException when a value is not allowed here
     */
    public JsonWriter value(long value) {
        beforeValue();
        write(Long.toString(value));
        afterValue();
        return this;
    }

    /**
     * Writes {@code true} or {@code false}.
     *
     * @param value the boolean
     * @return this writer
     * @throws IllegalStateException when a value is not allowed here
     */
    public JsonWriter value(boolean value) {
        beforeValue();
        write(value ? "true" : "false");
        afterValue();
        return this;
    }

    /**
     * Writes {@code null}.
     *
     * @return this writer
     * @throws IllegalStateException when a value is not allowed here
     */
    public JsonWriter nullValue() {
        beforeValue();
        write("null");
        afterValue();
        return this;
    }

    /** @return whether one complete top-level value has been written (no object or array is left open) */
    public boolean isComplete() {
        return done;
    }

    /**
     * Flushes the underlying {@link Appendable} when it is {@link Flushable}.
     *
     * @throws UncheckedIOException when flushing fails
     */
    @Override
    public void flush() {
        if (out instanceof Flushable f) {
            try {
                f.flush();
            } catch (IOException e) {
                throw new UncheckedIOException(e);
            }
        }
    }

    // ---- text forms ------------------------------------------------------------------------------------------

    /**
     * Formats a double as a JSON number that {@link Double#parseDouble(String)} reads back to the same value:
     * an integral value of magnitude at most {@link #MAX_EXACT_INTEGER} in plain decimal without {@code .0}
     * ({@code 3}, {@code -42}), negative zero as {@code -0.0} (so its sign survives), anything else as
     * {@link Double#toString(double)} gives it ({@code 0.1}, {@code 1.0E-5}, {@code 6.02214076E23}), which is
     * valid JSON. That form is the shortest that round-trips on Java 19 and later; Java 17 occasionally writes one
     * digit more, which still round-trips. NaN and the infinities are not JSON numbers: they give {@code null}.
     *
     * @param v the number
     * @return its JSON text
     */
    public static String number(double v) {
        if (!Double.isFinite(v)) {
            return "null";
        }
        if (v == Math.rint(v) && Math.abs(v) <= MAX_EXACT_INTEGER && !(v == 0 && 1 / v < 0)) {
            return Long.toString((long) v);
        }
        return Double.toString(v);
    }

    /**
     * @param s any string
     * @return {@code s} as a JSON string literal, quotes included, escaped as described in the class comment
     */
    public static String quote(String s) {
        StringBuilder sb = new StringBuilder(s.length() + 2);
        quote(s, sb);
        return sb.toString();
    }

    private static void quote(String s, StringBuilder sb) {
        sb.append('"');
        int n = s.length();
        for (int i = 0; i < n; i++) {
            char c = s.charAt(i);
            if (c == '"' || c == '\\') {
                sb.append('\\').append(c);
            } else if (c < 0x20) {
                hexEscape(c, sb);
            } else if (Character.isHighSurrogate(c) && i + 1 < n && Character.isLowSurrogate(s.charAt(i + 1))) {
                sb.append(c).append(s.charAt(++i));
            } else if (Character.isSurrogate(c)) {
                // a lone surrogate cannot be encoded in UTF-8; the escape keeps the text valid (RFC 8259 section 8.2)
                hexEscape(c, sb);
            } else {
                sb.append(c);
            }
        }
        sb.append('"');
    }

    private static void hexEscape(char c, StringBuilder sb) {
        sb.append("\\u").append(HEX[c >> 12 & 0xF]).append(HEX[c >> 8 & 0xF]).append(HEX[c >> 4 & 0xF])
                .append(HEX[c & 0xF]);
    }

    // ---- plumbing --------------------------------------------------------------------------------------------

    /** Checks that a value may start here, writes the separator before it and counts it in its container. */
    private void beforeValue() {
        if (done) {
            throw new IllegalStateException("a JSON text holds one top-level value, and it is already complete");
        }
        Frame f = stack.peek();
        if (f == null) {
            return;
        }
        if (f.object) {
            if (!f.afterName) {
                throw new IllegalStateException("a value inside an object needs a member name first");
            }
            f.afterName = false;
        } else {
            if (f.count > 0) {
                write(',');
            }
            newline();
        }
        f.count++;
    }

    /** Marks the text complete after a scalar written at the top level. */
    private void afterValue() {
        if (stack.isEmpty()) {
            done = true;
        }
    }

    private void newline() {
        if (pretty) {
            write('\n');
            for (int i = 0; i < stack.size(); i++) {
                write("  ");
            }
        }
    }

    private void writeString(String s) {
        write(quote(s));
    }

    private void write(char c) {
        try {
            out.append(c);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private void write(String s) {
        try {
            out.append(s);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
