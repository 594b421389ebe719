package dev.lawful.cli;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.zip.ZipEntry;
import java.util.zip.ZipFile;

/**
 * Reads a NumPy {@code .npz} file: a ZIP archive (stored, or deflated by {@code numpy.savez_compressed}) of
 * {@code .npy} members, as NumPy's {@code numpy.savez} documentation describes it. Each member is one or more
 * columns named by the member: a one-dimensional array {@code T.npy} (or one of shape (n, 1)) is column {@code T},
 * a two-dimensional C-order array {@code feed.npy} of shape (n, k) is columns {@code feed[0]} to {@code feed[k-1]}
 * (the names of a vector element in a law file). Every member has the same number of rows. The members are read
 * side by side, a chunk of rows from each at a time, so memory stays bounded whatever the row count.
 */
final class NpzSource extends BinarySource {
    private final String name;
    private final ZipFile zip;
    private final List<Member> members;
    private final List<String> columns;
    private final long rows;
    private final int rowsPerChunk;
    private long next;

    /** One open member: its stream (after the header), format and first column. */
    private record Member(InputStream in, NpyFormat format, int column) {
    }

    private NpzSource(String name, ZipFile zip, long size, List<Member> members, List<String> columns, long rows) {
        super(name, columns, size, "its member names");
        this.name = name;
        this.zip = zip;
        this.members = members;
        this.columns = columns;
        this.rows = rows;
        long bytesPerRow = 0;
        for (Member m : members) {
            bytesPerRow += m.format().width() * m.format().itemSize();
        }
        this.rowsPerChunk = BinaryChunk.rowsPerChunk(bytesPerRow);
    }

    /**
     * Opens a .npz file and reads every member's header.
     *
     * @param name the file's name for messages
     * @param path the file
     * @return the source
     * @throws IOException   when the file cannot be read or is not a ZIP archive
     * @throws DataException when a member is not a supported .npy array, is column-major and two-dimensional, or
     *                       has another number of rows than the first
     */
    static NpzSource open(String name, Path path) throws IOException {
        ZipFile zip;
        try {
            zip = new ZipFile(path.toFile());
        } catch (java.util.zip.ZipException e) {
            throw DataException.at(name, null, null, "not a .npz file (a ZIP archive of .npy arrays): " + e.getMessage());
        }
        try {
            List<Member> members = new ArrayList<>();
            List<String> columns = new ArrayList<>();
            long rows = -1;
            for (ZipEntry e : Collections.list(zip.entries())) {
                if (e.isDirectory() || !e.getName().endsWith(".npy")) {
                    continue;
                }
                String member = e.getName().substring(0, e.getName().length() - 4);
                InputStream in = zip.getInputStream(e);
                NpyFormat f = header(name + " member " + e.getName(), in);
                if (rows >= 0 && f.rows() != rows) {
                    throw DataException.at(name, null, null, "member " + e.getName() + " has " + f.rows() + " rows,"
                            + " member " + members.get(0) + " " + rows + "; every member is one column (or a block"
                            + " of columns) of the same rows");
                }
                if (f.fortranOrder() && f.width() > 1) {
                    throw DataException.at(name, null, null, "member " + e.getName() + " is a column-major"
                            + " (Fortran-order) 2-D array, which cannot be read in row chunks from a ZIP archive;"
                            + " save it with numpy.ascontiguousarray");
                }
                rows = f.rows();
                members.add(new Member(in, f, columns.size()));
                if (f.shape().length < 2 || f.width() == 1) {
                    columns.add(member);
                } else {
                    for (int k = 0; k < f.width(); k++) {
                        columns.add(member + "[" + k + "]");
                    }
                }
            }
            if (members.isEmpty()) {
                throw DataException.at(name, null, null, "the archive has no .npy members");
            }
            Set<String> seen = new HashSet<>();
            for (String c : columns) {
                if (!seen.add(c)) {
                    throw DataException.at(name, null, c, "two members give this column");
                }
            }
            return new NpzSource(name, zip, java.nio.file.Files.size(path), members, List.copyOf(columns), rows);
        } catch (IOException | RuntimeException e) {
            zip.close();
            throw e;
        }
    }

    private static NpyFormat header(String name, InputStream in) throws IOException {
        byte[] first = in.readNBytes(10);
        if (first.length == 10 && first[6] != 1) {
            byte[] more = in.readNBytes(2);
            first = java.util.Arrays.copyOf(first, 12);
            System.arraycopy(more, 0, first, 10, more.length);
        }
        int length = NpyFormat.prefixLength(name, first);
        byte[] rest = in.readNBytes(length - first.length);
        byte[] all = java.util.Arrays.copyOf(first, length);
        System.arraycopy(rest, 0, all, first.length, rest.length);
        return NpyFormat.parse(name, all);
    }

    @Override
    public Chunk next() throws IOException {
        if (next >= rows) {
            return null;
        }
        int n = (int) Math.min(rowsPerChunk, rows - next);
        List<BinaryChunk.Part> parts = new ArrayList<>();
        for (Member m : members) {
            int width = (int) m.format().width();
            int length = n * width * m.format().itemSize();
            byte[] b = buffer(length);
            int got = m.in().readNBytes(b, 0, length);
            if (got < length) {
                throw DataException.at(name, null, columns.get(m.column()), "the member ends after "
                        + (next + got / (width * m.format().itemSize())) + " of its " + rows + " rows");
            }
            parts.add(new BinaryChunk.Part(b, m.column(), width, m.format().itemSize(), m.format().order()));
        }
        BinaryChunk chunk = new BinaryChunk(this, next, n, parts);
        next += n;
        return chunk;
    }

    @Override
    public void close() throws IOException {
        zip.close();
    }
}
