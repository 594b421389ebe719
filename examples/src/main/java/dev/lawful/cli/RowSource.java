package dev.lawful.cli;

import java.io.Closeable;
import java.io.IOException;
import java.util.List;

/**
 * A table of numbers read in chunks: named columns, then rows. The reading thread calls {@link #next()}, which only
 * cuts the input into raw chunks; a worker then calls {@link Chunk#parse} to turn one into numbers. Implemented for
 * CSV ({@link CsvSource}) and NumPy files ({@link NpySource}).
 */
interface RowSource extends Closeable {
    /** @return the name shown in messages: the file as given, or {@code standard input} */
    String name();

    /** @return the column names, in file order */
    List<String> columns();

    /** @return the input's size in bytes, or -1 when unknown (standard input) */
    long size();

    /** @return where the column names are, for messages: {@code line 1} for CSV, {@code the header} otherwise */
    String headerPlace();

    /**
     * @param tag a row's tag, as {@link Rows#tags()} gives it
     * @return the row's place for messages, such as {@code line 12} or {@code row 12}
     */
    String place(long tag);

    /**
     * @return the next raw chunk, or null at the end of the input
     * @throws IOException when the input cannot be read
     * @throws DataException when the input is malformed in a way seen without parsing
     */
    Chunk next() throws IOException;

    /** A raw chunk of rows; parsing it is safe on any thread. */
    interface Chunk {
        /** @return the chunk's size in the input, in bytes (for the progress display) */
        long bytes();

        /**
         * @param columnOf for each wanted element, its column in {@link #columns()}, or -1 when the file does not
         *                 have it (it is then read as 0: only elements no law needs may be absent)
         * @param names    the wanted elements' names, for messages
         * @return the wanted columns of every row of the chunk
         * @throws DataException at the first malformed row, naming its place and column
         */
        Rows parse(int[] columnOf, List<String> names);
    }

    /**
     * The wanted columns of a chunk of rows, parsed.
     *
     * @param firstRow the 0-based index of the chunk's first row in the whole input
     * @param count    the number of rows
     * @param values   {@code count × columnOf.length} values, row-major, in the order asked for
     * @param tags     each row's tag for {@link #place(long)} (its line in a CSV file)
     * @param odd      the first few values that are NaN or infinite, with where they are and the text read
     */
    record Rows(long firstRow, int count, double[] values, long[] tags, List<NonFinite> odd) {
    }

    /**
     * A value read as NaN or infinity: worth naming, since a finite-looking text such as {@code 1e999} becomes
     * infinity and then breaks a row far from where it was read.
     *
     * @param tag    the row's tag ({@link #place(long)})
     * @param column the column's name
     * @param text   the text read, or null for a binary format
     * @param value  the value
     */
    record NonFinite(long tag, String column, String text, double value) {
        /** @return {@code 'TEXT' is read as infinity (beyond ...)}, or {@code the value is NaN} without a text */
        String describe() {
            if (text == null) {
                return "the value is " + (Double.isNaN(value) ? "NaN" : value > 0 ? "infinity" : "minus infinity");
            }
            return "'" + text + "' is read as " + CsvSource.describe(value, text);
        }
    }
}
