package dev.lawful.cli;

import dev.lawful.algebra.Declaration;
import dev.lawful.algebra.LawSet;
import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.zip.CRC32;
import java.util.zip.CheckedOutputStream;
import java.util.zip.ZipEntry;
import java.util.zip.ZipOutputStream;

/**
 * The completed table as a NumPy {@code .npz} archive, as {@code numpy.savez} writes one: a ZIP archive of
 * uncompressed (stored) {@code .npy} members, ZIP64 where a member or the archive passes 4 GB. Each element of the
 * law file is one member, inputs first, then outputs, in declared order: a scalar {@code T} is {@code T.npy}, a
 * one-dimensional float64 array of shape (rows,); a vector {@code feed} of k ≥ 2 components is {@code feed.npy}, a
 * two-dimensional C-order float64 array of shape (rows, k), which {@link NpzSource} reads back as columns
 * {@code feed[0]} to {@code feed[k-1]}. A vector with only some components in the table (those no law involves may
 * be absent from the data), or with one, has each of its components as a one-dimensional member
 * {@code feed[i].npy}, which reads back under the same name.
 *
 * <p>The row count is known only at the end, and a stored ZIP entry needs its size and CRC-32 before its data, so
 * each member's data are first written to a hidden file beside the target ({@link OutputTarget#scratch()}), their
 * CRC-32 computed on the way; at the end each member is written to the archive: its .npy prefix with the final
 * shape, then its data copied from that file, the entry's CRC-32 combined from the two ({@link Crc32Combine}).
 * Memory stays bounded whatever the row count.
 */
final class NpzOutput extends TableOutput {
    /** The .npy prefix of every member: room for any 64-bit row count, a multiple of 64 bytes (as .npy output). */
    private static final int PREFIX = 128;
    /** Bytes buffered per member file; a chunk's part of a member is usually larger and written straight through. */
    private static final int MEMBER_BUFFER = 1 << 14;
    /** Bytes copied at a time from a member file into the archive. */
    private static final int COPY_BUFFER = 1 << 16;

    private final List<Member> members;
    private final List<Path> files = new ArrayList<>();
    private final List<CheckedOutputStream> out = new ArrayList<>();
    private final long[] written;

    /**
     * One member: its name (without {@code .npy}), the table columns it holds, and whether it is two-dimensional.
     *
     * @param name   the member's name
     * @param from   its first column in the table
     * @param width  its number of columns
     * @param matrix whether its shape is (rows, width) rather than (rows,)
     */
    record Member(String name, int from, int width, boolean matrix) {
    }

    /**
     * @param columns the table's columns, in order
     * @param xAt     the input element of each input column
     * @param yAt     the output element of each output column
     * @param laws    the law set, whose elements name the members
     */
    NpzOutput(List<String> columns, int[] xAt, int[] yAt, LawSet laws) {
        super(columns, xAt, yAt);
        this.members = members(laws, columns);
        this.written = new long[members.size()];
    }

    /**
     * @param laws    the law set
     * @param columns the table's columns: element names ({@code T}, {@code feed[0]}) in declared order, inputs
     *                first
     * @return the members, in the table's column order
     */
    static List<Member> members(LawSet laws, List<String> columns) {
        Map<String, Integer> at = new HashMap<>();
        for (int c = 0; c < columns.size(); c++) {
            at.put(columns.get(c), c);
        }
        List<Declaration.Variable> elements = new ArrayList<>(laws.inputs());
        elements.addAll(laws.outputs());
        List<Member> members = new ArrayList<>();
        for (Declaration.Variable v : elements) {
            if (!v.vector()) {
                if (at.containsKey(v.name())) {
                    members.add(new Member(v.name(), at.get(v.name()), 1, false));
                }
                continue;
            }
            boolean all = v.size() >= 2;
            for (int i = 0; i < v.size(); i++) {
                all &= at.containsKey(v.name() + "[" + i + "]");
            }
            if (all) {
                members.add(new Member(v.name(), at.get(v.name() + "[0]"), v.size(), true));
                continue;
            }
            for (int i = 0; i < v.size(); i++) {
                String component = v.name() + "[" + i + "]";
                if (at.containsKey(component)) {
                    members.add(new Member(component, at.get(component), 1, false));
                }
            }
        }
        return List.copyOf(members);
    }

    @Override
    byte[] begin() {
        return new byte[0];
    }

    @Override
    void start(OutputTarget target) throws IOException {
        super.start(target);
        for (int m = 0; m < members.size(); m++) {
            Path p = target.scratch();
            files.add(p);
            out.add(new CheckedOutputStream(new BufferedOutputStream(Files.newOutputStream(p), MEMBER_BUFFER),
                    new CRC32()));
        }
    }

    /** Member by member: each member's {@code n × width} values in C order, one member after the other. */
    @Override
    Ascii rows(double[] x, int nIn, double[] y, int width, byte[] status, int n) {
        Ascii bytes = buffer(n * columns.size() * Double.BYTES);
        for (Member m : members) {
            for (int s = 0; s < n; s++) {
                for (int c = m.from(); c < m.from() + m.width(); c++) {
                    bytes.appendLittleEndian(value(x, nIn, y, width, s, c));
                }
            }
        }
        return bytes;
    }

    @Override
    void write(Ascii rows) throws IOException {
        int n = rows.length() / (columns.size() * Double.BYTES);
        int from = 0;
        for (int m = 0; m < members.size(); m++) {
            int length = n * members.get(m).width() * Double.BYTES;
            rows.writeTo(out.get(m), from, length);
            written[m] += length;
            from += length;
        }
    }

    /**
     * Writes the archive: each member's entry, stored, with its .npy prefix for {@code rows} rows and its data.
     *
     * @throws IOException when a member file cannot be read back or the archive cannot be written
     */
    @Override
    void finish(OutputTarget target, long rows) throws IOException {
        for (OutputStream o : out) {
            o.close();
        }
        ZipOutputStream zip = new ZipOutputStream(stream(), StandardCharsets.UTF_8);
        byte[] copy = new byte[COPY_BUFFER];
        for (int m = 0; m < members.size(); m++) {
            Member member = members.get(m);
            long[] shape = member.matrix() ? new long[] {rows, member.width()} : new long[] {rows};
            byte[] header = NpyFormat.header("<f8", false, shape, PREFIX);
            long expected = rows * member.width() * Double.BYTES;
            if (written[m] != expected || Files.size(files.get(m)) != expected) {
                throw new IOException("the temporary file of member " + member.name() + ".npy holds "
                        + Files.size(files.get(m)) + " bytes, expected " + expected + " for " + rows + " rows of "
                        + member.width() + " columns; was it changed while the command ran?");
            }
            CRC32 crc = new CRC32();
            crc.update(header);
            ZipEntry e = new ZipEntry(member.name() + ".npy");
            e.setMethod(ZipEntry.STORED);
            e.setSize(header.length + expected);
            e.setCompressedSize(header.length + expected);
            e.setCrc(Crc32Combine.combine(crc.getValue(), out.get(m).getChecksum().getValue(), expected));
            zip.putNextEntry(e);
            zip.write(header);
            try (InputStream in = Files.newInputStream(files.get(m))) {
                for (int k; (k = in.read(copy)) > 0; ) {
                    zip.write(copy, 0, k);
                }
            }
            zip.closeEntry();
        }
        // the central directory; the target's stream stays open until the target is committed
        zip.finish();
        super.finish(target, rows);
    }

    @Override
    void release() {
        for (OutputStream o : out) {
            try {
                o.close();
            } catch (IOException ignored) {
                // the files are removed with the target's other temporary files; the real error is being reported
            }
        }
    }
}
