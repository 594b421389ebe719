package dev.lawful.cli;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;

/**
 * Reads a NumPy {@code .npy} file ({@link NpyFormat}) of float64 or float32, C or Fortran order, either byte order,
 * in chunks of rows: a two-dimensional array is rows by columns, a one-dimensional one a single column. The file
 * has no column names, so {@code --columns} gives them, one per column in order. Rows are named {@code row N},
 * counted from 1.
 */
final class NpySource extends BinarySource {
    private final FileChannel channel;
    private final NpyFormat format;
    private final int rowsPerChunk;
    private long next;

    private NpySource(String name, FileChannel channel, NpyFormat format, List<String> columns) throws IOException {
        super(name, columns, channel.size(), "--columns");
        this.channel = channel;
        this.format = format;
        this.rowsPerChunk = BinaryChunk.rowsPerChunk(format.width() * format.itemSize());
    }

    /**
     * Opens a .npy file and checks its header against the column names.
     *
     * @param name    the file's name for messages
     * @param path    the file
     * @param columns the column names ({@code --columns}), one per column
     * @return the source
     * @throws IOException   when the file cannot be read
     * @throws DataException when the header is malformed, the type unsupported, the names missing, repeated or of
     *                       the wrong number, or the file shorter than its header says
     */
    static NpySource open(String name, Path path, List<String> columns) throws IOException {
        FileChannel ch = FileChannel.open(path, StandardOpenOption.READ);
        try {
            NpyFormat f = NpyFormat.parse(name, prefix(ch, name));
            long width = f.width();
            if (columns == null) {
                throw DataException.at(name, null, null, "a .npy array has no column names; give its " + width
                        + " column" + (width == 1 ? "" : "s") + "' names in order with --columns, such as --columns "
                        + "a,b,c");
            }
            if (columns.size() != width) {
                throw DataException.at(name, null, null, "--columns names " + columns.size() + " column"
                        + (columns.size() == 1 ? "" : "s") + " but the array has " + width + " (shape "
                        + java.util.Arrays.toString(f.shape()) + ")");
            }
            if (new HashSet<>(columns).size() != columns.size()) {
                throw DataException.at(name, null, null, "--columns names a column twice: " + columns);
            }
            long need = f.dataOffset() + f.rows() * width * f.itemSize();
            if (ch.size() < need) {
                throw DataException.at(name, null, null, "the file has " + ch.size() + " bytes but its header"
                        + " (shape " + java.util.Arrays.toString(f.shape()) + ") needs " + need);
            }
            return new NpySource(name, ch, f, List.copyOf(columns));
        } catch (IOException | RuntimeException e) {
            ch.close();
            throw e;
        }
    }

    /** @return the first bytes of the file: the whole prefix of {@link NpyFormat} */
    static byte[] prefix(FileChannel ch, String name) throws IOException {
        ByteBuffer head = ByteBuffer.allocate(12);
        ch.read(head, 0);
        byte[] first = java.util.Arrays.copyOf(head.array(), head.position());
        int length = NpyFormat.prefixLength(name, first);
        ByteBuffer all = ByteBuffer.allocate(length);
        ch.read(all, 0);
        return java.util.Arrays.copyOf(all.array(), all.position());
    }

    @Override
    public Chunk next() throws IOException {
        long rows = format.rows();
        if (next >= rows) {
            return null;
        }
        int n = (int) Math.min(rowsPerChunk, rows - next);
        int width = (int) format.width();
        int item = format.itemSize();
        List<BinaryChunk.Part> parts = new ArrayList<>();
        if (!format.fortranOrder() || width == 1) {
            byte[] b = read(format.dataOffset() + next * width * item, n * width * item);
            parts.add(new BinaryChunk.Part(b, 0, width, item, format.order()));
        } else {
            for (int c = 0; c < width; c++) {
                byte[] b = read(format.dataOffset() + (c * rows + next) * item, n * item);
                parts.add(new BinaryChunk.Part(b, c, 1, item, format.order()));
            }
        }
        BinaryChunk chunk = new BinaryChunk(this, next, n, parts);
        next += n;
        return chunk;
    }

    private byte[] read(long position, int length) throws IOException {
        ByteBuffer b = ByteBuffer.wrap(buffer(length), 0, length);
        while (b.hasRemaining()) {
            if (channel.read(b, position + b.position()) < 0) {
                throw new IOException("the file ended early");
            }
        }
        return b.array();
    }

    @Override
    public void close() throws IOException {
        channel.close();
    }
}
