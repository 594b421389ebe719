package dev.lawful.cli;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.io.CsvWriter;
import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.StandardOpenOption;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Set;

/**
 * The table {@code lawful complete} writes: the inputs the data file has, then every output (those it has and the
 * completed ones), in declared order; as CSV (with an optional status column), as a NumPy {@code .npy} array of
 * little-endian float64 in C order, or as a NumPy {@code .npz} archive of one such array per element
 * ({@link NpzOutput}). Rows are formatted on the worker threads, chunk by chunk ({@link #rows}), and written in
 * order by one thread: {@link #start}, {@link #write} for each chunk, {@link #finish}, and {@link #release} in any
 * case.
 */
abstract class TableOutput {
    final List<String> columns;
    final int[] xAt;
    final int[] yAt;

    private OutputStream stream;

    TableOutput(List<String> columns, int[] xAt, int[] yAt) {
        this.columns = columns;
        this.xAt = xAt;
        this.yAt = yAt;
    }

    /**
     * @param out       the {@code --out} argument: a name ending in {@code .npy} (any case) gives a .npy file, one
     *                  ending in {@code .npz} a .npz archive, any other name (and {@code -}) CSV
     * @param laws      the law set
     * @param sel       which elements the data file has
     * @param keepGoing whether rows that cannot be completed are written with a status column
     * @return the writer
     * @throws CommandFailure when a .npy or .npz file is asked for with a status column
     */
    static TableOutput of(String out, LawSet laws, DataFiles.Selection sel, boolean keepGoing) throws CommandFailure {
        List<String> columns = new java.util.ArrayList<>();
        int[] xAt = present(laws.inputNames(), sel, columns);
        int[] yAt = present(laws.outputNames(), sel, columns);
        String name = out.toLowerCase(Locale.ROOT);
        String binary = name.endsWith(".npy") ? ".npy" : name.endsWith(".npz") ? ".npz" : null;
        if (binary == null) {
            return new Csv(columns, xAt, yAt, keepGoing);
        }
        if (keepGoing) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful complete: --keep-going adds a status column, which a "
                    + binary + " file (numbers only) cannot hold; write CSV, or leave out --keep-going");
        }
        return binary.equals(".npy") ? new Npy(columns, xAt, yAt) : new NpzOutput(columns, xAt, yAt, laws);
    }

    private static int[] present(List<String> names, DataFiles.Selection sel, List<String> columns) {
        return java.util.stream.IntStream.range(0, names.size()).filter(k -> sel.has(names.get(k)))
                .peek(k -> columns.add(names.get(k))).toArray();
    }

    /** Row buffers written and free again, reused by the workers instead of one new buffer per chunk. */
    private final java.util.concurrent.ArrayBlockingQueue<Ascii> spare = new java.util.concurrent.ArrayBlockingQueue<>(
            64);

    /** @return a cleared buffer of at least {@code capacity} bytes, reused when one is free */
    Ascii buffer(int capacity) {
        Ascii a = spare.poll();
        if (a == null) {
            a = new Ascii(capacity);
        }
        a.clear();
        return a;
    }

    /**
     * Hands a buffer back once its bytes are written.
     *
     * @param written a buffer {@link #rows} returned
     */
    void recycle(Ascii written) {
        spare.offer(written);
    }

    /** @return the column names when the format does not store them (.npy), else null */
    List<String> names() {
        return this instanceof Npy ? columns : null;
    }

    /** @return the bytes before the first row */
    abstract byte[] begin();

    /**
     * Opens the target and writes what comes before the first row.
     *
     * @param target where the table goes
     * @throws IOException when it cannot be created or written
     */
    void start(OutputTarget target) throws IOException {
        stream = new BufferedOutputStream(target.open(), 1 << 16);
        stream.write(begin());
    }

    /** @return the buffered stream to the target, once {@link #start} has opened it */
    final OutputStream stream() {
        return stream;
    }

    /**
     * Writes a chunk's rows, chunks in order (on the one thread that writes).
     *
     * @param rows what {@link #rows} made of them; not modified
     * @throws IOException when they cannot be written
     */
    void write(Ascii rows) throws IOException {
        rows.writeTo(stream);
    }

    /**
     * @param x     inputs, row-major, {@code n × nIn}
     * @param nIn   the input width
     * @param y     outputs, row-major, {@code n × width}
     * @param width the output width
     * @param s     the row
     * @param c     the column of the table ({@link #columns})
     * @return the value in row {@code s}, column {@code c} of the table
     */
    final double value(double[] x, int nIn, double[] y, int width, int s, int c) {
        return c < xAt.length ? x[s * nIn + xAt[c]] : y[s * width + yAt[c - xAt.length]];
    }

    /**
     * Formats rows (on a worker thread).
     *
     * @param x      inputs, row-major, {@code n × inputWidth}
     * @param nIn    the input width
     * @param y      outputs, row-major, {@code n × width}
     * @param width  the output width
     * @param status each row's status, or null
     * @param n      the rows
     * @return their bytes (as written, not necessarily text)
     */
    abstract Ascii rows(double[] x, int nIn, double[] y, int width, byte[] status, int n);

    /**
     * Completes the file once every row is written (the .npy header then gets the row count, the .npz archive is
     * written) and flushes it; the target still has to be committed.
     *
     * @param target the file written, still open
     * @param rows   the rows written
     * @throws IOException when the file cannot be written or updated
     */
    void finish(OutputTarget target, long rows) throws IOException {
        stream.flush();
    }

    /** Closes whatever this writer opened besides the target's stream (which the target closes); never throws. */
    void release() {
    }

    /** CSV: numbers in the shortest form that reads back to the same double ({@link FastDecimal}). */
    private static final class Csv extends TableOutput {
        private final boolean status;
        private final String statusName;

        Csv(List<String> columns, int[] xAt, int[] yAt, boolean status) {
            super(columns, xAt, yAt);
            this.status = status;
            Set<String> taken = new HashSet<>(columns);
            String name = "status";
            while (taken.contains(name)) {
                name += "_";
            }
            this.statusName = name;
        }

        @Override
        byte[] begin() {
            StringBuilder sb = new StringBuilder();
            List<String> header = new java.util.ArrayList<>(columns);
            if (status) {
                header.add(statusName);
            }
            new CsvWriter(sb).header(header);
            return sb.toString().getBytes(StandardCharsets.UTF_8);
        }

        @Override
        Ascii rows(double[] x, int nIn, double[] y, int width, byte[] statuses, int n) {
            // about 20 characters per number: allocated once, below G1's humongous threshold for a chunk
            Ascii sb = buffer(n * 20 * columns.size());
            FastDecimal digits = FastDecimal.perThread();
            for (int s = 0; s < n; s++) {
                boolean first = true;
                for (int k : xAt) {
                    first = comma(sb, first);
                    digits.append(x[s * nIn + k], sb);
                }
                for (int k : yAt) {
                    first = comma(sb, first);
                    digits.append(y[s * width + k], sb);
                }
                if (status) {
                    comma(sb, first);
                    sb.append(CsvWriter.quote(SampleStatus.describe(statuses[s])));
                }
                sb.append('\n');
            }
            return sb;
        }

        private static boolean comma(Ascii sb, boolean first) {
            if (!first) {
                sb.append(',');
            }
            return false;
        }
    }

    /**
     * NumPy {@code .npy}, format version 1.0: the magic {@code \x93NUMPY}, the version, a little-endian 16-bit header
     * length and an ASCII header dictionary padded with spaces to a multiple of 64 bytes and ended by a line feed,
     * then the data. The header is written first with room for any row count and rewritten at the end.
     */
    private static final class Npy extends TableOutput {
        /** Header length, room for any 64-bit row count: the total prefix is 128 bytes, a multiple of 64. */
        private static final int PREFIX = 128;

        Npy(List<String> columns, int[] xAt, int[] yAt) {
            super(columns, xAt, yAt);
        }

        @Override
        byte[] begin() {
            return NpyFormat.header("<f8", false, new long[] {0, columns.size()}, PREFIX);
        }

        @Override
        Ascii rows(double[] x, int nIn, double[] y, int width, byte[] status, int n) {
            Ascii out = buffer(n * columns.size() * Double.BYTES).reserveDoubles(n * columns.size());
            for (int s = 0; s < n; s++) {
                for (int k : xAt) {
                    out.putLittleEndian(x[s * nIn + k]);
                }
                for (int k : yAt) {
                    out.putLittleEndian(y[s * width + k]);
                }
            }
            return out;
        }

        @Override
        void finish(OutputTarget target, long rows) throws IOException {
            super.finish(target, rows);
            try (FileChannel ch = FileChannel.open(target.written(), StandardOpenOption.WRITE)) {
                ch.write(ByteBuffer.wrap(NpyFormat.header("<f8", false, new long[] {rows, columns.size()}, PREFIX)),
                        0);
            }
        }
    }
}
