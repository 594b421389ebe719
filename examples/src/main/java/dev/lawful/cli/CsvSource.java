package dev.lawful.cli;

import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.CodingErrorAction;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Reads a CSV file of numbers in chunks of about {@value #CHUNK_BYTES} bytes, in the format of
 * {@link dev.lawful.io.CsvReader} (UTF-8, a header row, LF, CRLF or CR line ends, blank and {@code #} lines skipped,
 * quoted values on one line; numbers in decimal or as {@code NaN}, {@code Inf}, {@code Infinity} with a sign),
 * with one addition: the separator is the one the header uses, a comma, else a semicolon, else a tab (so a file
 * saved by a spreadsheet in a locale with decimal commas is read, and its {@code 0,5} is named as a decimal comma).
 *
 * <p>The reading thread only cuts the input at line ends and counts lines and rows (so every chunk knows the line and
 * row it starts at); parsing the numbers happens in {@link Chunk#parse}, on a worker, by {@link CsvFields}. Numbers are parsed by
 * FastDoubleParser after our own check of the accepted forms (it reads the nearest double, as
 * {@link Double#parseDouble} does; docs/design-notes.md has the measurement). Messages name the file, the line as an
 * editor counts it and the column.
 */
final class CsvSource implements RowSource {
    /**
     * Bytes per chunk (a chunk ends at a line end, so it can be longer by one line). Small enough that no array of a
     * chunk is a "humongous" object for the G1 collector (half a region or more; regions are at least 1 MB), which
     * would make the default heap grow to gigabytes: measured in docs/design-notes.md.
     */
    static final int CHUNK_BYTES = 1 << 18;
    /** Notes about non-finite values kept per chunk. */
    private static final int NOTES = 3;

    private final String name;
    private final InputStream in;
    private final long size;
    private byte[] buf = new byte[4 * CHUNK_BYTES];
    private int start;
    private int end;
    private boolean eof;
    private long line = 1;
    private long rows;
    private final List<String> header;
    private final long headerLine;
    private final byte separator;
    /** Chunk buffers parsed and free again: the reader reuses them instead of allocating one per chunk. */
    private final java.util.concurrent.ArrayBlockingQueue<byte[]> spare = new java.util.concurrent.ArrayBlockingQueue<>(
            64);

    private CsvSource(String name, InputStream in, long size) throws IOException {
        this.name = name;
        this.in = in;
        this.size = size;
        fill();
        if (end >= 3 && (buf[0] & 0xff) == 0xEF && (buf[1] & 0xff) == 0xBB && (buf[2] & 0xff) == 0xBF) {
            start = 3;
        }
        String first = null;
        while (first == null) {
            int e = lineEnd();
            if (e < 0) {
                throw DataException.at(name, null, null, "the file has no header row; expected a first line naming"
                        + " the columns");
            }
            if (!skipped(buf, start, e)) {
                first = utf8(start, e);
                headerLine = line;
                this.separator = separatorOf(first);
                start = after(e);
                line++;
                this.header = names(first);
                return;
            }
            start = after(e);
            line++;
        }
        throw new AssertionError();
    }

    /**
     * Reads the header of a CSV input.
     *
     * @param name the name for messages
     * @param in   the input, read to its end by {@link #next()}; closed by {@link #close()}
     * @param size the input's size in bytes, or -1 when unknown
     * @return the source, positioned after the header
     * @throws IOException   when the input cannot be read
     * @throws DataException when there is no header, or it has an empty or repeated name, or is not UTF-8
     */
    static CsvSource open(String name, InputStream in, long size) throws IOException {
        return new CsvSource(name, in, size);
    }

    @Override
    public long size() {
        return size;
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public List<String> columns() {
        return header;
    }

    @Override
    public String headerPlace() {
        return "line " + headerLine;
    }

    @Override
    public String place(long tag) {
        return "line " + tag;
    }

    @Override
    public void close() throws IOException {
        in.close();
    }

    // ---- the reading thread: cut at line ends ------------------------------------------------------------------

    @Override
    public Chunk next() throws IOException {
        while (true) {
            if (!eof && end - start < CHUNK_BYTES) {
                fill();
                continue;
            }
            if (start == end) {
                return null;
            }
            int cut = eof ? end : lastLineEnd();
            if (cut < 0) {
                // one line longer than the buffer: make room and read on
                buf = Arrays.copyOf(buf, 2 * buf.length);
                fill();
                continue;
            }
            byte[] bytes = spare.poll();
            if (bytes == null || bytes.length < cut - start) {
                bytes = new byte[Math.max(cut - start, CHUNK_BYTES + (CHUNK_BYTES >> 2))];
            }
            System.arraycopy(buf, start, bytes, 0, cut - start);
            CsvChunk chunk = new CsvChunk(bytes, cut - start, line, rows);
            line += chunk.lines;
            rows += chunk.rows;
            start = cut;
            return chunk;
        }
    }

    /** @return the index just after the last line end in the buffer (not a CR that may be half of a CRLF) */
    private int lastLineEnd() {
        for (int i = end - 1; i >= start; i--) {
            if (buf[i] == '\n' || buf[i] == '\r' && i < end - 1) {
                return i + 1;
            }
        }
        return -1;
    }

    /** Moves the unread bytes to the front and reads until the buffer is full or the input ends. */
    private void fill() throws IOException {
        if (start > 0) {
            System.arraycopy(buf, start, buf, 0, end - start);
            end -= start;
            start = 0;
        }
        while (end < buf.length) {
            int n = in.read(buf, end, buf.length - end);
            if (n < 0) {
                eof = true;
                return;
            }
            end += n;
        }
    }

    /** @return the end (exclusive, before its line break) of the line at {@link #start}, reading more as needed */
    private int lineEnd() throws IOException {
        while (true) {
            for (int i = start; i < end; i++) {
                if (buf[i] == '\n' || buf[i] == '\r') {
                    return i;
                }
            }
            if (eof) {
                return start < end ? end : -1;
            }
            if (start == 0 && end == buf.length) {
                buf = Arrays.copyOf(buf, 2 * buf.length);
            }
            fill();
        }
    }

    private int after(int lineEnd) {
        if (lineEnd < end && buf[lineEnd] == '\r' && lineEnd + 1 < end && buf[lineEnd + 1] == '\n') {
            return lineEnd + 2;
        }
        return Math.min(end, lineEnd + 1);
    }

    // ---- the header ----------------------------------------------------------------------------------------------

    private String utf8(int from, int to) {
        try {
            return StandardCharsets.UTF_8.newDecoder().onMalformedInput(CodingErrorAction.REPORT)
                    .onUnmappableCharacter(CodingErrorAction.REPORT).decode(ByteBuffer.wrap(buf, from, to - from))
                    .toString();
        } catch (CharacterCodingException e) {
            throw DataException.at(name, "line " + line, null, "the file is not valid UTF-8; save it as UTF-8");
        }
    }

    /** The header's separator: a comma when it has one (outside quotes), else a semicolon, else a tab. */
    private static byte separatorOf(String header) {
        boolean quoted = false;
        boolean semicolon = false;
        boolean tab = false;
        for (int i = 0; i < header.length(); i++) {
            char c = header.charAt(i);
            if (c == '"') {
                quoted = !quoted;
            } else if (!quoted && c == ',') {
                return ',';
            } else if (!quoted) {
                semicolon |= c == ';';
                tab |= c == '\t';
            }
        }
        return semicolon ? (byte) ';' : tab ? (byte) '\t' : (byte) ',';
    }

    private List<String> names(String text) {
        byte[] b = text.getBytes(StandardCharsets.UTF_8);
        List<String> names = new ArrayList<>();
        CsvFields f = new CsvFields(b, 0, b.length, separator);
        while (f.nextAt(name, headerLine)) {
            names.add(f.text());
        }
        Map<String, Integer> seen = new HashMap<>();
        for (int c = 0; c < names.size(); c++) {
            String n = names.get(c);
            if (n.isEmpty()) {
                throw DataException.at(name, "line " + headerLine, null, "column " + (c + 1) + " of the header has"
                        + " no name");
            }
            Integer before = seen.putIfAbsent(n, c);
            if (before != null) {
                throw DataException.at(name, "line " + headerLine, n, "the name appears twice in the header"
                        + " (columns " + (before + 1) + " and " + (c + 1) + ")");
            }
        }
        return List.copyOf(names);
    }

    /** @return whether the line is blank or a comment: its first character that is not a space or tab is '#' */
    static boolean skipped(byte[] b, int from, int to) {
        for (int i = from; i < to; i++) {
            byte c = b[i];
            if (c != ' ' && c != '\t') {
                return c == '#';
            }
        }
        return true;
    }

    // ---- a worker: parse one chunk -------------------------------------------------------------------------------

    /** Lines cut from the input, with the line and row they start at. */
    private final class CsvChunk implements Chunk {
        final byte[] bytes;
        final int length;
        final long firstLine;
        final long firstRow;
        long lines;
        int rows;

        CsvChunk(byte[] bytes, int length, long firstLine, long firstRow) {
            this.bytes = bytes;
            this.length = length;
            this.firstLine = firstLine;
            this.firstRow = firstRow;
            for (int pos = 0; pos < length; ) {
                int e = pos;
                while (e < length && bytes[e] != '\n' && bytes[e] != '\r') {
                    e++;
                }
                if (!skipped(bytes, pos, e)) {
                    rows++;
                }
                lines++;
                pos = e < length && bytes[e] == '\r' && e + 1 < length && bytes[e + 1] == '\n' ? e + 2
                        : e + 1;
            }
        }

        @Override
        public long bytes() {
            return length;
        }

        @Override
        public Rows parse(int[] columnOf, List<String> names) {
            checkUtf8();
            int k = columnOf.length;
            int[] wantedAt = new int[header.size()];
            Arrays.fill(wantedAt, -1);
            for (int j = 0; j < k; j++) {
                if (columnOf[j] >= 0) {
                    wantedAt[columnOf[j]] = j;
                }
            }
            double[] values = Scratch.doubles(Scratch.VALUES, rows * k);
            long[] tags = Scratch.longs(rows);
            List<NonFinite> notes = new ArrayList<>();
            long at = firstLine;
            int r = 0;
            for (int pos = 0; pos < length; ) {
                int e = pos;
                while (e < length && bytes[e] != '\n' && bytes[e] != '\r') {
                    e++;
                }
                if (!skipped(bytes, pos, e)) {
                    for (int j = 0; j < k; j++) {
                        if (columnOf[j] < 0) {
                            values[r * k + j] = 0;
                        }
                    }
                    row(pos, e, at, wantedAt, names, values, r * k, notes);
                    tags[r++] = at;
                }
                at++;
                pos = e < length && bytes[e] == '\r' && e + 1 < length && bytes[e + 1] == '\n' ? e + 2
                        : e + 1;
            }
            spare.offer(bytes);
            return new Rows(firstRow, rows, values, tags, notes);
        }

        private void row(int from, int to, long at, int[] wantedAt, List<String> names, double[] values, int offset,
                         List<NonFinite> notes) {
            CsvFields f = new CsvFields(bytes, from, to, separator);
            int count = 0;
            DataException bad = null;
            while (f.nextAt(name, at)) {
                int c = count++;
                int j = c < wantedAt.length ? wantedAt[c] : -1;
                if (j < 0 || bad != null) {
                    continue;
                }
                try {
                    double v = f.number();
                    values[offset + j] = v;
                    if (!Double.isFinite(v) && notes.size() < NOTES) {
                        notes.add(new NonFinite(at, names.get(j), f.shown(), v));
                    }
                } catch (DataException e) {
                    bad = DataException.at(name, "line " + at, names.get(j), e.getMessage());
                }
            }
            if (count != header.size()) {
                throw DataException.at(name, "line " + at, null, "expected " + header.size() + " value"
                        + (header.size() == 1 ? "" : "s") + ", found " + count
                        + (count == 1 && separator == ',' && hasByte(from, to, (byte) ';')
                        ? " (the header is separated by commas and this line by semicolons?)" : ""));
            }
            if (bad != null) {
                throw bad;
            }
        }

        private boolean hasByte(int from, int to, byte b) {
            for (int i = from; i < to; i++) {
                if (bytes[i] == b) {
                    return true;
                }
            }
            return false;
        }

        private void checkUtf8() {
            for (int i = 0; i < length; i++) {
                if (bytes[i] < 0) {
                    try {
                        StandardCharsets.UTF_8.newDecoder().onMalformedInput(CodingErrorAction.REPORT)
                                .onUnmappableCharacter(CodingErrorAction.REPORT).decode(ByteBuffer.wrap(bytes, 0, length));
                        return;
                    } catch (CharacterCodingException e) {
                        long bad = firstLine;
                        ByteBuffer probe = ByteBuffer.wrap(bytes, 0, length);
                        int good = validPrefix(probe);
                        for (int p = 0; p < good; p++) {
                            if (bytes[p] == '\n' || bytes[p] == '\r' && (p + 1 >= length || bytes[p + 1] != '\n')) {
                                bad++;
                            }
                        }
                        throw DataException.at(name, "line " + bad, null, String.format("the file is not valid UTF-8"
                                + " (byte 0x%02X); save it as UTF-8", bytes[good] & 0xff));
                    }
                }
            }
        }
    }

    /** @return how many leading bytes decode as UTF-8 */
    private static int validPrefix(ByteBuffer in) {
        java.nio.charset.CharsetDecoder d = StandardCharsets.UTF_8.newDecoder()
                .onMalformedInput(CodingErrorAction.REPORT).onUnmappableCharacter(CodingErrorAction.REPORT);
        java.nio.CharBuffer out = java.nio.CharBuffer.allocate(in.remaining() + 1);
        d.decode(in, out, true);
        return in.position();
    }

    /** What a non-finite value was read as, and why when the text is a finite-looking number. */
    static String describe(double v, String text) {
        if (Double.isNaN(v)) {
            return "NaN (not a number)";
        }
        String what = v > 0 ? "infinity" : "minus infinity";
        String t = text.toLowerCase(java.util.Locale.ROOT);
        return t.contains("inf") ? what : what + " (beyond the largest double, 1.8e308)";
    }
}
