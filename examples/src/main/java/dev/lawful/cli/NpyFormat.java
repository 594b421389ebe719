package dev.lawful.cli;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * The NumPy {@code .npy} header, as NumPy's format specification ({@code numpy.lib.format}, "NPY format") defines
 * it: the magic string {@code \x93NUMPY}, a major and a minor version byte, the header length (2 bytes little-endian
 * in version 1.0, 4 bytes in 2.0 and 3.0), then an ASCII (3.0: UTF-8) Python dictionary literal with the keys
 * {@code descr} (the data type, such as {@code '<f8'}), {@code fortran_order} and {@code shape}, padded with spaces
 * and ended by a line feed, after which the data start. Only float64 and float32 in either byte order are read
 * (NumPy's {@code '<f8'}, {@code '>f8'}, {@code '<f4'}, {@code '>f4'}; {@code '='} is taken as little-endian, the
 * byte order of every machine NumPy writes these on in practice).
 *
 * @param descr        the data type string
 * @param fortranOrder whether the array is stored column-major
 * @param shape        the dimensions
 * @param dataOffset   the byte at which the data start
 */
record NpyFormat(String descr, boolean fortranOrder, long[] shape, int dataOffset) {
    private static final byte[] MAGIC = {(byte) 0x93, 'N', 'U', 'M', 'P', 'Y'};
    private static final Pattern DESCR = Pattern.compile("'descr'\\s*:\\s*'([^']*)'");
    private static final Pattern FORTRAN = Pattern.compile("'fortran_order'\\s*:\\s*(True|False)");
    private static final Pattern SHAPE = Pattern.compile("'shape'\\s*:\\s*\\(([^)]*)\\)");

    /** @return the bytes per value: 8 or 4 */
    int itemSize() {
        return descr.charAt(2) == '8' ? 8 : 4;
    }

    /** @return the byte order of the values */
    ByteOrder order() {
        return descr.charAt(0) == '>' ? ByteOrder.BIG_ENDIAN : ByteOrder.LITTLE_ENDIAN;
    }

    /** @return the number of rows: the first dimension (1 for a 0-dimensional array) */
    long rows() {
        return shape.length == 0 ? 1 : shape[0];
    }

    /** @return the number of columns: the second dimension, 1 for a one-dimensional array */
    long width() {
        return shape.length < 2 ? 1 : shape[1];
    }

    /**
     * Reads a header.
     *
     * @param file   the file's name for messages
     * @param prefix at least the first 10 bytes of the file, and as many more as {@link #prefixLength} asks
     * @return the header
     * @throws DataException when the bytes are not a .npy header of a supported type and shape
     */
    static NpyFormat parse(String file, byte[] prefix) {
        int length = prefixLength(file, prefix);
        if (prefix.length < length) {
            throw DataException.at(file, null, null, "the file ends inside its .npy header");
        }
        int major = prefix[6];
        int start = major == 1 ? 10 : 12;
        String header = new String(prefix, start, length - start, major == 3 ? StandardCharsets.UTF_8
                : StandardCharsets.ISO_8859_1);
        Matcher d = DESCR.matcher(header);
        Matcher f = FORTRAN.matcher(header);
        Matcher s = SHAPE.matcher(header);
        if (!d.find() || !f.find() || !s.find()) {
            throw DataException.at(file, null, null, "the .npy header is not a dictionary with descr, fortran_order"
                    + " and shape: " + header.strip());
        }
        String descr = d.group(1);
        if (descr.length() == 3 && descr.charAt(0) == '=') {
            descr = "<" + descr.substring(1);
        }
        if (!List.of("<f8", ">f8", "<f4", ">f4").contains(descr)) {
            throw DataException.at(file, null, null, "the array holds '" + descr + "' values; expected float64 or"
                    + " float32 ('<f8', '>f8', '<f4' or '>f4'): convert it with astype(numpy.float64)");
        }
        List<Long> dims = new ArrayList<>();
        for (String part : s.group(1).split(",")) {
            if (!part.isBlank()) {
                dims.add(Long.parseLong(part.strip().replace("L", "")));
            }
        }
        if (dims.size() > 2) {
            throw DataException.at(file, null, null, "the array has " + dims.size() + " dimensions; expected one (a"
                    + " column) or two (rows by columns)");
        }
        return new NpyFormat(descr, f.group(1).equals("True"), dims.stream().mapToLong(Long::longValue).toArray(),
                length);
    }

    /**
     * @param file   the file's name for messages
     * @param prefix at least the first 12 bytes of the file (10 suffice for version 1.0)
     * @return the length of the magic, version, length field and header: where the data start
     * @throws DataException when the magic or the version is wrong
     */
    static int prefixLength(String file, byte[] prefix) {
        if (prefix.length < 10) {
            throw DataException.at(file, null, null, "the file is too short for a .npy header");
        }
        for (int i = 0; i < MAGIC.length; i++) {
            if (prefix[i] != MAGIC[i]) {
                throw DataException.at(file, null, null, "not a NumPy .npy file (it does not start with \\x93NUMPY)");
            }
        }
        int major = prefix[6];
        ByteBuffer b = ByteBuffer.wrap(prefix).order(ByteOrder.LITTLE_ENDIAN);
        if (major == 1) {
            return 10 + Short.toUnsignedInt(b.getShort(8));
        }
        if ((major == 2 || major == 3) && prefix.length >= 12) {
            return 12 + b.getInt(8);
        }
        throw DataException.at(file, null, null, ".npy format version " + major + "." + prefix[7] + "; expected 1.0,"
                + " 2.0 or 3.0");
    }

    /**
     * Writes a version 1.0 header.
     *
     * @param descr        the data type string, such as {@code <f8}
     * @param fortranOrder whether the data are stored column-major
     * @param shape        the dimensions
     * @param total        the length of the whole prefix (magic to line feed), a multiple of 64, large enough
     * @return the prefix's bytes
     */
    static byte[] header(String descr, boolean fortranOrder, long[] shape, int total) {
        StringBuilder dims = new StringBuilder();
        for (int i = 0; i < shape.length; i++) {
            dims.append(i == 0 ? "" : ", ").append(shape[i]);
        }
        if (shape.length == 1) {
            dims.append(',');
        }
        String dict = "{'descr': '" + descr + "', 'fortran_order': " + (fortranOrder ? "True" : "False")
                + ", 'shape': (" + dims + "), }";
        int room = total - 10 - 1 - dict.length();
        if (room < 0 || total % 64 != 0) {
            throw new IllegalArgumentException("a .npy prefix of " + total + " bytes cannot hold " + dict);
        }
        ByteBuffer b = ByteBuffer.allocate(total).order(ByteOrder.LITTLE_ENDIAN);
        b.put(MAGIC).put((byte) 1).put((byte) 0).putShort((short) (total - 10));
        b.put((dict + " ".repeat(room) + "\n").getBytes(StandardCharsets.ISO_8859_1));
        return b.array();
    }
}
