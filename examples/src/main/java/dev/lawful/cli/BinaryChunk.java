package dev.lawful.cli;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.util.ArrayList;
import java.util.List;

/**
 * A chunk of rows of a binary array format (NumPy, HDF5): one or more parts, each holding a group of adjacent
 * columns for the chunk's rows in row-major order as raw float32 or float64 values of one byte order. A C-order
 * array is one part of every column; a column-major (Fortran-order) array or a file with one array per column is
 * one part per column.
 */
final class BinaryChunk implements RowSource.Chunk {
    /**
     * One group of columns.
     *
     * @param bytes     the raw values, {@code rows × width × itemSize} of them (the array may be longer)
     * @param column    the group's first column in the file's column list
     * @param width     the number of columns in the group
     * @param itemSize  4 (float32) or 8 (float64)
     * @param order     the byte order
     */
    record Part(byte[] bytes, int column, int width, int itemSize, ByteOrder order) {
    }

    private static final int NOTES = 3;

    private final BinarySource source;
    private final long firstRow;
    private final int rows;
    private final List<Part> parts;

    /**
     * @param source   the source the parts' arrays go back to once parsed ({@link BinarySource#release})
     * @param firstRow the 0-based index of the chunk's first row
     * @param rows     the rows in the chunk
     * @param parts    the column groups
     */
    BinaryChunk(BinarySource source, long firstRow, int rows, List<Part> parts) {
        this.source = source;
        this.firstRow = firstRow;
        this.rows = rows;
        this.parts = parts;
    }

    @Override
    public long bytes() {
        long n = 0;
        for (Part p : parts) {
            n += (long) rows * p.width() * p.itemSize();
        }
        return n;
    }

    /** Rows are tagged with their 1-based row number. The parts' arrays go back to the source: parse once. */
    @Override
    public RowSource.Rows parse(int[] columnOf, List<String> names) {
        int k = columnOf.length;
        double[] values = Scratch.doubles(Scratch.VALUES, rows * k);
        long[] tags = Scratch.longs(rows);
        for (int s = 0; s < rows; s++) {
            tags[s] = firstRow + s + 1;
            for (int j = 0; j < k; j++) {
                if (columnOf[j] < 0) {
                    values[s * k + j] = 0;
                }
            }
        }
        List<RowSource.NonFinite> odd = new ArrayList<>();
        for (Part p : parts) {
            ByteBuffer b = ByteBuffer.wrap(p.bytes()).order(p.order());
            for (int j = 0; j < k; j++) {
                int c = columnOf[j] - p.column();
                if (columnOf[j] < 0 || c < 0 || c >= p.width()) {
                    continue;
                }
                for (int s = 0; s < rows; s++) {
                    int at = (s * p.width() + c) * p.itemSize();
                    double v = p.itemSize() == 8 ? b.getDouble(at) : b.getFloat(at);
                    values[s * k + j] = v;
                    if (!Double.isFinite(v) && odd.size() < NOTES) {
                        odd.add(new RowSource.NonFinite(tags[s], names.get(j), null, v));
                    }
                }
            }
            source.release(p);
        }
        return new RowSource.Rows(firstRow, rows, values, tags, odd);
    }

    /**
     * @param bytesPerRow the bytes of one row over every column
     * @return rows per chunk: about {@link CsvSource#CHUNK_BYTES} of data (small enough for the G1 collector's
     *         ordinary allocation path), at least one row
     */
    static int rowsPerChunk(long bytesPerRow) {
        return (int) Math.max(1, Math.min(1 << 16, CsvSource.CHUNK_BYTES / Math.max(1, bytesPerRow)));
    }
}
