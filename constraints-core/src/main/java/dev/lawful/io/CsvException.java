package dev.lawful.io;

/**
 * A CSV file that is not what {@link CsvReader} accepts: no header, a duplicate or empty column name, a row of the
 * wrong length, a value that is not a number, a broken quote, bytes that are not UTF-8.
 *
 * <p>{@link #getMessage()} is the whole message, ready to print: {@code SOURCE: line N, column 'NAME': detail}, where
 * the line part is left out when the problem is not on one line (an empty file) and the column part when it is not
 * about one column:
 * <pre>
 * data.csv: line 7: expected 12 values, found 11
 * data.csv: line 7, column 'out[2]': 'abc' is not a number
 * data.csv: the file has no header row; expected a first line naming the columns
 * </pre>
 * Line numbers count every physical line of the file from 1, comments and blank lines included, so they match
 * what an editor shows.
 */
public final class CsvException extends RuntimeException {
    private static final long serialVersionUID = 1L;
    /** The file name as given. */
    private final String source;
    /** The 1-based line number, or 0. */
    private final int line;
    /** The column name, or null. */
    private final String column;
    /** The message without the location. */
    private final String detail;

    /**
     * @param source the file name as given, shown first in the message
     * @param line   the 1-based line number the problem is on, or 0 when it is not on one line
     * @param column the name of the column the problem is in, or null when it is not about one column
     * @param detail what was expected and what was found, without the location
     */
    public CsvException(String source, int line, String column, String detail) {
        super(render(source, line, column, detail));
        this.source = source;
        this.line = line;
        this.column = column;
        this.detail = detail;
    }

    private static String render(String source, int line, String column, String detail) {
        StringBuilder sb = new StringBuilder(source).append(": ");
        if (line > 0) {
            sb.append("line ").append(line);
            if (column != null) {
                sb.append(", column '").append(column).append('\'');
            }
            sb.append(": ");
        } else if (column != null) {
            sb.append("column '").append(column).append("': ");
        }
        return sb.append(detail).toString();
    }

    /** @return the file name as given */
    public String source() {
        return source;
    }

    /** @return the 1-based line number of the problem, or 0 when it is not on one line */
    public int line() {
        return line;
    }

    /** @return the column the problem is in, or null */
    public String column() {
        return column;
    }

    /** @return the message without the file, line and column: what was expected and what was found */
    public String detail() {
        return detail;
    }
}
