package dev.lawful.io;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.CharBuffer;
import java.nio.charset.CharsetDecoder;
import java.nio.charset.CoderResult;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Reads a CSV file of numbers with a header row, in two steps: {@link #open(Path)} reads and checks the header, so
 * a caller can match the column names before any row is read, then {@link #read(List)} reads the rows of the
 * columns it needs into a {@link CsvTable} (or {@link #readAll()} every column).
 *
 * <p><b>Format</b> (RFC 4180 with the relaxations a hand-edited file needs):
 * <ul>
 *   <li>UTF-8 text (a leading byte order mark is skipped); lines end with LF, CRLF or CR.</li>
 *   <li>Values are separated by commas. White space around a value is dropped. A value may be quoted with
 *       {@code "}; inside quotes a comma is part of the value, {@code ""} stands for one quote, and spaces are
 *       kept. A quoted value ends on the line it starts on.</li>
 *   <li>A line that is empty or white space only, or whose first non-blank character is {@code #}, is skipped
 *       (a comment), anywhere in the file.</li>
 *   <li>The first other line is the header: one non-empty name per column, no name twice. Names are compared
 *       exactly as written (after the white space around them is dropped).</li>
 *   <li>Every further line is a row with exactly one value per column. A value that is read is a decimal number
 *       ({@code 12}, {@code -0.5}, {@code .5}, {@code 1.}, {@code 6.02e23}, {@code 1E-5}, an optional sign) or,
 *       ignoring case, {@code NaN}, {@code Inf} or {@code Infinity} with an optional sign. Hexadecimal, the Java
 *       suffixes {@code d} and {@code f}, digit separators and empty values are refused. Values of columns that
 *       are not read are only counted.</li>
 * </ul>
 *
 * <p>Problems are reported as {@link CsvException} with the file name, the line number (as an editor counts it)
 * and the column name. Not thread-safe; reads its whole input into memory.
 */
public final class CsvReader {
    /** Longest piece of a bad value quoted in a message. */
    private static final int QUOTE_LIMIT = 40;

    private final String source;
    private final String text;
    private int pos;
    private int line;
    private final List<String> header;
    private final int headerLine;
    private final List<String> fields = new ArrayList<>();
    private boolean consumed;

    private CsvReader(String source, String text) {
        this.source = source;
        this.text = text;
        this.pos = !text.isEmpty() && text.charAt(0) == '\uFEFF' ? 1 : 0;
        String first = nextRecord();
        if (first == null) {
            throw new CsvException(source, 0, null, "the file has no header row; expected a first line naming the"
                    + " columns");
        }
        this.headerLine = line;
        List<String> names = new ArrayList<>(split(first));
        Map<String, Integer> seen = new HashMap<>();
        for (int c = 0; c < names.size(); c++) {
            String name = names.get(c);
            if (name.isEmpty()) {
                throw new CsvException(source, headerLine, null, "column " + (c + 1) + " of the header has no name");
            }
            Integer before = seen.putIfAbsent(name, c);
            if (before != null) {
                throw new CsvException(source, headerLine, name, "the name appears twice in the header (columns "
                        + (before + 1) + " and " + (c + 1) + ")");
            }
        }
        this.header = Collections.unmodifiableList(names);
    }

    /**
     * Reads a file (strict UTF-8) and its header.
     *
     * @param file the CSV file; its name as given is used in messages
     * @return a reader positioned after the header
     * @throws IOException  when the file cannot be read
     * @throws CsvException when the file is not UTF-8, has no header, or the header has an empty or repeated name
     */
    public static CsvReader open(Path file) throws IOException {
        String name = file.toString();
        return new CsvReader(name, decode(name, Files.readAllBytes(file)));
    }

    /**
     * Reads the header of CSV text.
     *
     * @param source the name shown in messages
     * @param text   the whole CSV text
     * @return a reader positioned after the header
     * @throws CsvException when there is no header, or the header has an empty or repeated name
     */
    public static CsvReader of(String source, String text) {
        return new CsvReader(source, text);
    }

    /** @return the name shown in messages */
    public String source() {
        return source;
    }

    /** @return the column names, in file order */
    public List<String> header() {
        return header;
    }

    /** @return the 1-based line number of the header */
    public int headerLine() {
        return headerLine;
    }

    /**
     * Reads every remaining row, every column as a number.
     *
     * @return the table, columns in file order
     * @throws CsvException          at the first row of the wrong length or value that is not a number
     * @throws IllegalStateException when the rows were already read
     */
    public CsvTable readAll() {
        return read(header);
    }

    /**
     * Reads every remaining row; the named columns are read as numbers, the others are only counted.
     *
     * @param columns header names, each at most once; the table's columns come in this order
     * @return the table
     * @throws IllegalArgumentException when a name is not in the header or is given twice
     * @throws CsvException             at the first row of the wrong length or value that is not a number
     * @throws IllegalStateException    when the rows were already read
     */
    public CsvTable read(List<String> columns) {
        if (consumed) {
            throw new IllegalStateException("the rows of " + source + " were already read");
        }
        consumed = true;
        int w = columns.size();
        int[] index = new int[w];
        Map<String, Integer> at = new HashMap<>();
        for (int c = 0; c < header.size(); c++) {
            at.put(header.get(c), c);
        }
        for (int k = 0; k < w; k++) {
            Integer c = at.get(columns.get(k));
            if (c == null) {
                throw new IllegalArgumentException("no column '" + columns.get(k) + "' in the header of " + source);
            }
            index[k] = c;
            for (int j = 0; j < k; j++) {
                if (index[j] == c) {
                    throw new IllegalArgumentException("column '" + columns.get(k) + "' is asked for twice");
                }
            }
        }
        double[] values = new double[Math.max(16, 16 * w)];
        int[] lines = new int[16];
        int rows = 0;
        for (String record = nextRecord(); record != null; record = nextRecord()) {
            List<String> f = split(record);
            if (f.size() != header.size()) {
                throw new CsvException(source, line, null, "expected " + count(header.size(), "value") + ", found "
                        + f.size());
            }
            if ((long) (rows + 1) * w > values.length) {
                values = Arrays.copyOf(values, grow(values.length, (long) (rows + 1) * w));
            }
            if (rows == lines.length) {
                lines = Arrays.copyOf(lines, grow(lines.length, rows + 1L));
            }
            for (int k = 0; k < w; k++) {
                values[rows * w + k] = number(f.get(index[k]), columns.get(k));
            }
            lines[rows++] = line;
        }
        return new CsvTable(source, List.copyOf(columns), Arrays.copyOf(values, rows * w),
                Arrays.copyOf(lines, rows), rows);
    }

    private int grow(int length, long needed) {
        long n = Math.max(needed, 2L * length);
        if (n > Integer.MAX_VALUE - 8) {
            if (needed > Integer.MAX_VALUE - 8) {
                throw new CsvException(source, line, null, "too many values for one table");
            }
            n = needed;
        }
        return (int) n;
    }

    /**
     * Parses one value as the class comment describes.
     *
     * @throws CsvException naming the current line and {@code column} when it is not a number
     */
    private double number(String s, String column) {
        if (s.isEmpty()) {
            throw new CsvException(source, line, column, "the value is empty; expected a number");
        }
        if (!isNumber(s)) {
            String shown = s.length() > QUOTE_LIMIT ? s.substring(0, QUOTE_LIMIT) + "..." : s;
            throw new CsvException(source, line, column, "'" + shown + "' is not a number");
        }
        int i = s.charAt(0) == '+' || s.charAt(0) == '-' ? 1 : 0;
        char c = s.charAt(i);
        if (c == 'n' || c == 'N') {
            return Double.NaN;
        }
        if (c == 'i' || c == 'I') {
            return s.charAt(0) == '-' ? Double.NEGATIVE_INFINITY : Double.POSITIVE_INFINITY;
        }
        return Double.parseDouble(s);
    }

    /** @return whether {@code s} is a number in the accepted forms (see the class comment) */
    static boolean isNumber(String s) {
        int n = s.length();
        int i = 0;
        if (i < n && (s.charAt(i) == '+' || s.charAt(i) == '-')) {
            i++;
        }
        String rest = s.substring(i);
        if (rest.equalsIgnoreCase("nan") || rest.equalsIgnoreCase("inf") || rest.equalsIgnoreCase("infinity")) {
            return true;
        }
        int digits = 0;
        while (i < n && isDigit(s.charAt(i))) {
            i++;
            digits++;
        }
        if (i < n && s.charAt(i) == '.') {
            i++;
            while (i < n && isDigit(s.charAt(i))) {
                i++;
                digits++;
            }
        }
        if (digits == 0) {
            return false;
        }
        if (i < n && (s.charAt(i) == 'e' || s.charAt(i) == 'E')) {
            i++;
            if (i < n && (s.charAt(i) == '+' || s.charAt(i) == '-')) {
                i++;
            }
            int exponent = 0;
            while (i < n && isDigit(s.charAt(i))) {
                i++;
                exponent++;
            }
            if (exponent == 0) {
                return false;
            }
        }
        return i == n;
    }

    private static boolean isDigit(char c) {
        return c >= '0' && c <= '9';
    }

    /** @return the next line that is not blank or a comment, with {@link #line} set to its number; null at the end */
    private String nextRecord() {
        int n = text.length();
        while (pos < n) {
            int start = pos;
            int end = start;
            while (end < n && text.charAt(end) != '\n' && text.charAt(end) != '\r') {
                end++;
            }
            pos = end;
            if (pos < n && text.charAt(pos) == '\r') {
                pos++;
            }
            if (pos < n && text.charAt(pos) == '\n' && (pos == end || text.charAt(end) == '\r')) {
                pos++;
            }
            line++;
            String s = text.substring(start, end);
            String t = s.strip();
            if (!t.isEmpty() && t.charAt(0) != '#') {
                return s;
            }
        }
        return null;
    }

    /**
     * Splits one line into its values (see the class comment for quotes and white space).
     *
     * @return the values, in a list reused by the next call
     * @throws CsvException when a quote is not closed on the line, or text follows a closing quote
     */
    private List<String> split(String s) {
        fields.clear();
        int n = s.length();
        int i = 0;
        while (true) {
            int j = i;
            while (j < n && (s.charAt(j) == ' ' || s.charAt(j) == '\t')) {
                j++;
            }
            if (j < n && s.charAt(j) == '"') {
                StringBuilder sb = new StringBuilder();
                int k = j + 1;
                while (true) {
                    if (k >= n) {
                        throw new CsvException(source, line, null, "value " + (fields.size() + 1)
                                + " opens a quote that is not closed on this line");
                    }
                    char c = s.charAt(k);
                    if (c == '"') {
                        if (k + 1 < n && s.charAt(k + 1) == '"') {
                            sb.append('"');
                            k += 2;
                            continue;
                        }
                        k++;
                        break;
                    }
                    sb.append(c);
                    k++;
                }
                while (k < n && (s.charAt(k) == ' ' || s.charAt(k) == '\t')) {
                    k++;
                }
                if (k < n && s.charAt(k) != ',') {
                    throw new CsvException(source, line, null, "value " + (fields.size() + 1)
                            + " has text after its closing quote; expected a comma or the end of the line");
                }
                fields.add(sb.toString());
                if (k >= n) {
                    return fields;
                }
                i = k + 1;
            } else {
                int comma = s.indexOf(',', j);
                int end = comma < 0 ? n : comma;
                fields.add(s.substring(j, end).strip());
                if (comma < 0) {
                    return fields;
                }
                i = comma + 1;
            }
        }
    }

    private static String count(int n, String noun) {
        return n + " " + noun + (n == 1 ? "" : "s");
    }

    /** Strict UTF-8: a wrongly encoded file is an error that names the line, never replaced characters. */
    private static String decode(String name, byte[] bytes) {
        CharsetDecoder decoder = StandardCharsets.UTF_8.newDecoder()
                .onMalformedInput(CodingErrorAction.REPORT)
                .onUnmappableCharacter(CodingErrorAction.REPORT);
        ByteBuffer in = ByteBuffer.wrap(bytes);
        CharBuffer out = CharBuffer.allocate(bytes.length + 1);
        CoderResult result = decoder.decode(in, out, true);
        if (result.isError()) {
            int bad = in.position();
            int line = 1;
            for (int i = 0; i < bad; i++) {
                if (bytes[i] == '\n' || (bytes[i] == '\r' && (i + 1 >= bytes.length || bytes[i + 1] != '\n'))) {
                    line++;
                }
            }
            throw new CsvException(name, line, null, String.format("the file is not valid UTF-8 (byte 0x%02X); save"
                    + " it as UTF-8", bytes[bad] & 0xff));
        }
        decoder.flush(out);
        out.flip();
        return out.toString();
    }
}
