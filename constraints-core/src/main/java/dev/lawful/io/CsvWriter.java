package dev.lawful.io;

import java.io.Flushable;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.List;
import java.util.Objects;

/**
 * Writes a CSV table that {@link CsvReader} reads back exactly: a header row, then rows of values, each line ended
 * by {@code \n}, values separated by {@code ,} without spaces.
 *
 * <pre>{@code
 * CsvWriter csv = new CsvWriter(out).header(List.of("x", "y[0]", "status"));
 * csv.value(0.1).value(1e23).value("ok").endRow();    // 0.1,1e23,ok
 * }</pre>
 *
 * <p>Numbers are written by {@link ShortestDecimal#format(double)}: the fewest significant digits that
 * {@link Double#parseDouble(String)} reads back to the same double, {@code NaN}, {@code Infinity} and
 * {@code -Infinity} for the non-finite values. Text (header names and text values) is written as it is, unless it
 * contains a comma or a quote, starts or ends with white space, is empty in the header, or starts with {@code #}
 * (which a reader would take for a comment): then it is quoted, with every {@code "} doubled. Text with a line
 * break is refused, because {@link CsvReader} keeps every row on one line.
 *
 * <p>The writer checks that the header comes first and that every row has one value per column, and throws
 * {@link IllegalStateException} otherwise. Errors of the {@link Appendable} are rethrown as
 * {@link UncheckedIOException}. Not thread-safe.
 */
public final class CsvWriter implements Flushable {
    private final Appendable out;
    private int width = -1;
    private int count;

    /**
     * @param out receives the text
     */
    public CsvWriter(Appendable out) {
        this.out = Objects.requireNonNull(out, "out");
    }

    /**
     * Writes the header row.
     *
     * @param names the column names, at least one
     * @return this writer
     * @throws IllegalStateException    when a header was already written
     * @throws IllegalArgumentException when there are no names, or a name holds a line break
     */
    public CsvWriter header(List<String> names) {
        if (width >= 0) {
            throw new IllegalStateException("the header was already written");
        }
        if (names.isEmpty()) {
            throw new IllegalArgumentException("a CSV header needs at least one column");
        }
        width = names.size();
        for (int i = 0; i < names.size(); i++) {
            if (i > 0) {
                write(",");
            }
            String name = names.get(i);
            write(name.isEmpty() ? "\"\"" : quote(name));
        }
        write("\n");
        return this;
    }

    /**
     * Writes the next value of the current row in shortest round-trip form.
     *
     * @param v the value
     * @return this writer
     * @throws IllegalStateException when no header was written or the row already has one value per column
     */
    public CsvWriter value(double v) {
        separator();
        write(ShortestDecimal.format(v));
        return this;
    }

    /**
     * Writes the next value of the current row as text, quoted when needed.
     *
     * @param text the text
     * @return this writer
     * @throws IllegalStateException    when no header was written or the row already has one value per column
     * @throws IllegalArgumentException when the text holds a line break
     */
    public CsvWriter value(String text) {
        separator();
        write(quote(Objects.requireNonNull(text, "text")));
        return this;
    }

    /**
     * Writes {@code count} values of {@code values} from {@code offset} in shortest round-trip form.
     *
     * @param values the array holding the values (not modified)
     * @param offset index of the first value to write
     * @param count  how many values to write
     * @return this writer
     * @throws IndexOutOfBoundsException when the range is not inside {@code values}
     * @throws IllegalStateException when the row would get more values than there are columns
     */
    public CsvWriter values(double[] values, int offset, int count) {
        Objects.checkFromIndexSize(offset, count, values.length);
        for (int i = 0; i < count; i++) {
            value(values[offset + i]);
        }
        return this;
    }

    /**
     * Ends the current row.
     *
     * @return this writer
     * @throws IllegalStateException when the row does not have one value per column
     */
    public CsvWriter endRow() {
        if (width < 0) {
            throw new IllegalStateException("write the header first");
        }
        if (count != width) {
            throw new IllegalStateException("a row needs " + width + " values, found " + count);
        }
        write("\n");
        count = 0;
        return this;
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

    /**
     * @param text any text
     * @return the text as a CSV value: as it is, or quoted with {@code "} doubled when the class comment says so
     * @throws IllegalArgumentException when the text holds a line break
     */
    public static String quote(String text) {
        if (text.indexOf('\n') >= 0 || text.indexOf('\r') >= 0) {
            throw new IllegalArgumentException("a CSV value cannot hold a line break here: " + JsonWriter.quote(text));
        }
        boolean plain = !text.isEmpty() ? text.charAt(0) != '#' && !Character.isWhitespace(text.charAt(0))
                && !Character.isWhitespace(text.charAt(text.length() - 1)) : true;
        for (int i = 0; plain && i < text.length(); i++) {
            char c = text.charAt(i);
            plain = c != ',' && c != '"';
        }
        return plain ? text : '"' + text.replace("\"", "\"\"") + '"';
    }

    private void separator() {
        if (width < 0) {
            throw new IllegalStateException("write the header first");
        }
        if (count == width) {
            throw new IllegalStateException("the row already has " + width + " values; call endRow()");
        }
        if (count++ > 0) {
            write(",");
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
