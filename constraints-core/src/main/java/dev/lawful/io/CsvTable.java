package dev.lawful.io;

import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import java.util.Objects;

/**
 * An immutable table of numbers read from a CSV file: named columns, rows stored row-major, and for each row the
 * line of the file it came from (so a later problem with a row can name its line). Read one with
 * {@link #read(Path)}, or with a {@link CsvReader} to choose the columns after seeing the header; the format is
 * described there. Write one with {@link CsvWriter}.
 */
public final class CsvTable {
    private final String source;
    private final List<String> columns;
    private final double[] values;
    private final int[] lines;
    private final int rows;

    CsvTable(String source, List<String> columns, double[] values, int[] lines, int rows) {
        this.source = source;
        this.columns = columns;
        this.values = values;
        this.lines = lines;
        this.rows = rows;
    }

    /**
     * Reads a whole CSV file, every column as numbers.
     *
     * @param file the file (strict UTF-8); its name as given is used in messages
     * @return the table, columns in file order
     * @throws IOException  when the file cannot be read
     * @throws CsvException when the file does not have the format {@link CsvReader} describes, with the line
     *                      number and column name
     */
    public static CsvTable read(Path file) throws IOException {
        return CsvReader.open(file).readAll();
    }

    /**
     * Reads CSV text, every column as numbers.
     *
     * @param source the name shown in messages
     * @param text   the whole CSV text
     * @return the table, columns in file order
     * @throws CsvException when the text does not have the format {@link CsvReader} describes
     */
    public static CsvTable parse(String source, String text) {
        return CsvReader.of(source, text).readAll();
    }

    /** @return the name the table was read from, as used in messages */
    public String source() {
        return source;
    }

    /** @return the column names of this table, in order */
    public List<String> columns() {
        return columns;
    }

    /** @return the number of columns */
    public int width() {
        return columns.size();
    }

    /** @return the number of rows */
    public int rows() {
        return rows;
    }

    /**
     * @param name a column name
     * @return the index of column {@code name}, or -1 when the table has no such column
     */
    public int column(String name) {
        return columns.indexOf(name);
    }

    /**
     * @param row    0-based row index
     * @param column 0-based column index
     * @return the value
     * @throws IndexOutOfBoundsException when either index is out of range
     */
    public double get(int row, int column) {
        Objects.checkIndex(row, rows);
        Objects.checkIndex(column, columns.size());
        return values[row * columns.size() + column];
    }

    /**
     * @param row 0-based row index
     * @return the 1-based line number of the file the row was read from
     * @throws IndexOutOfBoundsException when {@code row} is out of range
     */
    public int line(int row) {
        Objects.checkIndex(row, rows);
        return lines[row];
    }

    /** @return a copy of every value, row-major: row r, column c at {@code r * width() + c} */
    public double[] values() {
        return values.clone();
    }

    /**
     * Copies the given columns of every row into a row-major batch: {@code dest[r * k + j] = get(r, columns[j])}
     * with {@code k = columns.length}.
     *
     * @param columns column indices, in the order wanted (a column may repeat)
     * @param dest    receives {@code rows() * columns.length} values; modified
     * @return {@code dest}
     * @throws IndexOutOfBoundsException when a column index is out of range
     * @throws IllegalArgumentException  when {@code dest} is too short
     */
    public double[] gather(int[] columns, double[] dest) {
        int w = this.columns.size();
        int k = columns.length;
        for (int c : columns) {
            Objects.checkIndex(c, w);
        }
        if (dest.length < (long) rows * k) {
            throw new IllegalArgumentException("dest must hold at least " + (long) rows * k + " values, found "
                    + dest.length);
        }
        for (int r = 0; r < rows; r++) {
            int from = r * w;
            int to = r * k;
            for (int j = 0; j < k; j++) {
                dest[to + j] = values[from + columns[j]];
            }
        }
        return dest;
    }

    /**
     * Copies the named columns of every row into a new row-major batch, as {@link #gather(int[], double[])}.
     *
     * @param names column names, in the order wanted
     * @return {@code rows() * names.size()} values
     * @throws IllegalArgumentException when a name is not a column of this table
     */
    public double[] gather(List<String> names) {
        int[] index = new int[names.size()];
        for (int j = 0; j < index.length; j++) {
            index[j] = column(names.get(j));
            if (index[j] < 0) {
                throw new IllegalArgumentException("no column '" + names.get(j) + "' in " + source);
            }
        }
        return gather(index, new double[Math.multiplyExact(rows, index.length)]);
    }
}
