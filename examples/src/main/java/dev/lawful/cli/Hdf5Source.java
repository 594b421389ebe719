package dev.lawful.cli;

import io.jhdf.HdfFile;
import io.jhdf.api.Attribute;
import io.jhdf.api.Dataset;
import io.jhdf.api.Node;
import io.jhdf.exceptions.HdfException;
import java.io.IOException;
import java.lang.reflect.Array;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * Reads the variables of an HDF5 file, or of a NetCDF-4 file (which is an HDF5 file), with jhdf, a pure-Java HDF5
 * reader (contiguous, chunked and compressed datasets alike), in chunks of rows. The numeric datasets of the root
 * group are the columns, all with the same first dimension (the rows):
 * <ul>
 *   <li>a one-dimensional dataset {@code T} (or of shape (n, 1)) is column {@code T};</li>
 *   <li>a two-dimensional dataset {@code feed} of shape (n, k) is columns {@code feed[0]} to {@code feed[k-1]},
 *       unless it has an attribute {@code columns} (a list of strings, or one comma-separated string) naming its k
 *       columns;</li>
 *   <li>datasets of another first dimension (a NetCDF coordinate variable of another dimension, say) and non-numeric
 *       ones are left out.</li>
 * </ul>
 * Each chunk reads a slice of rows of every dataset, so memory stays bounded: a contiguous float dataset straight
 * from the file (one read per chunk), any other through jhdf ({@code Dataset.getData(offset, shape)}).
 * Rows are named {@code row N}, counted from 1.
 */
final class Hdf5Source extends BinarySource {
    private final String name;
    private final HdfFile file;
    /** The file itself, for reading contiguous float datasets directly; null when that is not safe. */
    private final java.nio.channels.FileChannel raw;
    private final List<Dataset> datasets;
    private final List<Integer> firstColumn;
    private final List<String> columns;
    private final long rows;
    private final int rowsPerChunk;
    private long next;

    private Hdf5Source(String name, HdfFile file, long size, List<Dataset> datasets, List<Integer> firstColumn,
                       List<String> columns, long rows) {
        super(name, columns, size, "its dataset names");
        this.name = name;
        this.file = file;
        this.raw = rawChannel(file);
        this.datasets = datasets;
        this.firstColumn = firstColumn;
        this.columns = columns;
        this.rows = rows;
        this.rowsPerChunk = BinaryChunk.rowsPerChunk(8L * columns.size());
    }

    /**
     * Opens an HDF5 file and lists its columns.
     *
     * @param name the file's name for messages
     * @param path the file
     * @return the source
     * @throws IOException   when the file cannot be read
     * @throws DataException when it is not HDF5, has no numeric dataset, or names a column twice
     */
    static Hdf5Source open(String name, Path path) throws IOException {
        HdfFile hdf;
        try {
            hdf = new HdfFile(path);
        } catch (HdfException e) {
            throw DataException.at(name, null, null, "not an HDF5 or NetCDF-4 file: " + e.getMessage());
        }
        try {
            List<Dataset> datasets = new ArrayList<>();
            List<Integer> first = new ArrayList<>();
            List<String> columns = new ArrayList<>();
            long rows = -1;
            for (Node node : hdf.getChildren().values()) {
                if (!(node instanceof Dataset d) || d.isScalar() || d.isCompound() || d.getDimensions().length > 2
                        || !numeric(d.getJavaType())) {
                    continue;
                }
                int[] dims = d.getDimensions();
                if (rows < 0) {
                    rows = dims[0];
                } else if (dims[0] != rows) {
                    continue;
                }
                datasets.add(d);
                first.add(columns.size());
                columns.addAll(names(name, d));
            }
            if (datasets.isEmpty()) {
                throw DataException.at(name, null, null, "no numeric dataset of one or two dimensions in the root"
                        + " group");
            }
            Set<String> seen = new HashSet<>();
            for (String c : columns) {
                if (!seen.add(c)) {
                    throw DataException.at(name, null, c, "two datasets give this column");
                }
            }
            return new Hdf5Source(name, hdf, Files.size(path), datasets, first, List.copyOf(columns), rows);
        } catch (IOException | RuntimeException e) {
            hdf.close();
            if (e instanceof HdfException h) {
                throw DataException.at(name, null, null, "cannot read it as HDF5: " + h.getMessage());
            }
            throw e;
        }
    }

    private static boolean numeric(Class<?> type) {
        return type == double.class || type == float.class || type == int.class || type == long.class
                || type == short.class || type == byte.class;
    }

    /** @return the column names a dataset gives: its name, its attribute {@code columns}, or {@code name[i]} */
    private static List<String> names(String file, Dataset d) {
        int[] dims = d.getDimensions();
        int width = dims.length < 2 ? 1 : dims[1];
        Attribute a = d.getAttribute("columns");
        if (a != null) {
            Object v = a.getData();
            List<String> named = v instanceof String s ? Arrays.asList(s.split(",")) : v instanceof String[] arr
                    ? Arrays.asList(arr) : List.of();
            named = named.stream().map(String::strip).toList();
            if (named.size() != width) {
                throw DataException.at(file, null, null, "dataset " + d.getPath() + " has " + width + " columns but"
                        + " its attribute 'columns' names " + named.size());
            }
            return named;
        }
        if (width == 1) {
            return List.of(d.getName());
        }
        List<String> out = new ArrayList<>(width);
        for (int k = 0; k < width; k++) {
            out.add(d.getName() + "[" + k + "]");
        }
        return out;
    }

    /**
     * @return a channel on the file when its addresses are file offsets (no user block, HDF5 File Format
     *         Specification 3.0, section II.A: addresses are relative to the superblock's base, which a user block
     *         moves), else null
     */
    private static java.nio.channels.FileChannel rawChannel(HdfFile file) {
        try {
            return file.getUserBlockSize() == 0 ? java.nio.channels.FileChannel.open(file.getFileAsPath(),
                    java.nio.file.StandardOpenOption.READ) : null;
        } catch (IOException | RuntimeException e) {
            return null;
        }
    }

    /**
     * @return the rows of a contiguous dataset of float32 or float64 read straight from the file, as raw values in
     *         their byte order (jhdf's own slices read a two-dimensional dataset one row at a time); null when the
     *         dataset is stored otherwise (chunked, compressed, compact, integers), which jhdf then reads
     */
    private BinaryChunk.Part direct(Dataset d, int column, int width, int n) throws IOException {
        if (raw == null || !(d instanceof io.jhdf.api.dataset.ContiguousDataset c)
                || d.getDataLayout() != io.jhdf.object.message.DataLayout.CONTIGUOUS
                || !(d.getDataType() instanceof io.jhdf.object.datatype.FloatingPoint f)
                || (f.getSize() != 4 && f.getSize() != 8)) {
            return null;
        }
        long address = c.getDataAddress();
        if (address < 0) {
            return null;
        }
        int item = f.getSize();
        ByteBuffer b = ByteBuffer.wrap(buffer(n * width * item), 0, n * width * item);
        long at = address + next * width * item;
        while (b.hasRemaining()) {
            if (raw.read(b, at + b.position()) < 0) {
                throw DataException.at(name, "row " + (next + 1), null, "the file ends inside dataset " + d.getPath());
            }
        }
        return new BinaryChunk.Part(b.array(), column, width, item, f.getByteOrder());
    }

    @Override
    public Chunk next() throws IOException {
        if (next >= rows) {
            return null;
        }
        int n = (int) Math.min(rowsPerChunk, rows - next);
        List<BinaryChunk.Part> parts = new ArrayList<>();
        for (int i = 0; i < datasets.size(); i++) {
            Dataset d = datasets.get(i);
            int[] dims = d.getDimensions();
            int width = dims.length < 2 ? 1 : dims[1];
            BinaryChunk.Part part = direct(d, firstColumn.get(i), width, n);
            if (part != null) {
                parts.add(part);
                continue;
            }
            Object slice;
            try {
                slice = dims.length < 2 ? d.getData(new long[] {next}, new int[] {n})
                        : d.getData(new long[] {next, 0}, new int[] {n, width});
            } catch (HdfException e) {
                throw DataException.at(name, "row " + (next + 1), columns.get(firstColumn.get(i)), "cannot read the"
                        + " dataset " + d.getPath() + ": " + e.getMessage());
            }
            ByteBuffer b = ByteBuffer.wrap(buffer(n * width * 8), 0, n * width * 8).order(ByteOrder.LITTLE_ENDIAN);
            flatten(slice, b);
            parts.add(new BinaryChunk.Part(b.array(), firstColumn.get(i), width, 8, ByteOrder.LITTLE_ENDIAN));
        }
        BinaryChunk chunk = new BinaryChunk(this, next, n, parts);
        next += n;
        return chunk;
    }

    /** Puts a (possibly nested) primitive array's values into {@code b} as doubles, in row-major order. */
    private static void flatten(Object array, ByteBuffer b) {
        if (array instanceof double[] d) {
            for (double v : d) {
                b.putDouble(v);
            }
            return;
        }
        if (array instanceof float[] f) {
            for (float v : f) {
                b.putDouble(v);
            }
            return;
        }
        if (array instanceof Object[] rows) {
            for (Object row : rows) {
                flatten(row, b);
            }
            return;
        }
        int n = Array.getLength(array);
        for (int i = 0; i < n; i++) {
            Object v = Array.get(array, i);
            if (v instanceof Number number) {
                b.putDouble(number.doubleValue());
            } else {
                flatten(v, b);
            }
        }
    }

    @Override
    public void close() throws IOException {
        file.close();
        if (raw != null) {
            raw.close();
        }
    }
}
