package dev.lawful.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.cli.LawfulTest.Captured;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.zip.CRC32;
import java.util.zip.ZipEntry;
import java.util.zip.ZipOutputStream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;

/**
 * NumPy and HDF5 files in and out of {@code complete} and {@code verify}. The fixtures are written here byte by byte from
 * NumPy's format specification ({@code numpy.lib.format}, "NPY format": magic {@code \x93NUMPY}, version 1.0, a
 * little-endian 2-byte header length, a Python dict literal with descr, fortran_order and shape, padded with spaces
 * and a line feed to a multiple of 64 bytes) and its {@code numpy.savez} documentation (a ZIP archive of one
 * {@code NAME.npy} per array); the completed outputs are checked against the element balances worked by hand, and
 * the .npy the command writes is read back with ND4J's own reader.
 */
class DataFormatsTest {

    @TempDir
    Path temp;

    private static final List<String> COLUMNS = List.of("feed[0]", "feed[1]", "feed[2]", "feed[3]", "feed[4]",
            "feed[5]", "T", "out[0]", "out[3]");
    /** Two rows: a feed, a temperature and the free outputs CH4 (out[0]) and CO2 (out[3]). */
    private static final double[][] ROWS = {
        {1, 3, 0, 0.05, 0.02, 0.01, 900, 0.4, 0.35},
        {2, 5, 0.5, 0.1, 0.5, 0.25, 950, 0.5, 0.75}};

    private static String reformer() {
        return ExampleFiles.law("steam-reformer.law").toString();
    }

    /** The NPY format 1.0 prefix for the dict text, padded to a multiple of 64 bytes. */
    private static byte[] npyHeader(String dict) {
        int unpadded = 10 + dict.length() + 1;
        int total = (unpadded + 63) / 64 * 64;
        String padded = dict + " ".repeat(total - unpadded) + "\n";
        ByteBuffer b = ByteBuffer.allocate(10).order(ByteOrder.LITTLE_ENDIAN);
        b.put(new byte[] {(byte) 0x93, 'N', 'U', 'M', 'P', 'Y', 1, 0}).putShort((short) padded.length());
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        out.writeBytes(b.array());
        out.writeBytes(padded.getBytes(StandardCharsets.US_ASCII));
        return out.toByteArray();
    }

    /** A .npy file of {@code rows} (row-major in the caller's view), stored as asked. */
    private static byte[] npy(double[][] rows, boolean fortran, boolean float32, ByteOrder order) {
        int n = rows.length;
        int w = rows[0].length;
        String descr = (order == ByteOrder.BIG_ENDIAN ? ">" : "<") + (float32 ? "f4" : "f8");
        byte[] head = npyHeader("{'descr': '" + descr + "', 'fortran_order': " + (fortran ? "True" : "False")
                + ", 'shape': (" + n + ", " + w + "), }");
        ByteBuffer data = ByteBuffer.allocate(n * w * (float32 ? 4 : 8)).order(order);
        for (int i = 0; i < n * w; i++) {
            // C order: the last index varies fastest; Fortran order: the first
            int r = fortran ? i % n : i / w;
            int c = fortran ? i / n : i % w;
            if (float32) {
                data.putFloat((float) rows[r][c]);
            } else {
                data.putDouble(rows[r][c]);
            }
        }
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        out.writeBytes(head);
        out.writeBytes(data.array());
        return out.toByteArray();
    }

    /** A one-dimensional float64 .npy of one column. */
    private static byte[] column(double[][] rows, int c) {
        byte[] head = npyHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (" + rows.length + ",), }");
        ByteBuffer data = ByteBuffer.allocate(rows.length * 8).order(ByteOrder.LITTLE_ENDIAN);
        for (double[] row : rows) {
            data.putDouble(row[c]);
        }
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        out.writeBytes(head);
        out.writeBytes(data.array());
        return out.toByteArray();
    }

    /**
     * The completed outputs by the element balances, worked by hand: carbon gives CO = feed C - CH4 - CO2, oxygen
     * H2O = feed O - CO - 2 CO2, hydrogen H2 = (feed H - 4 CH4 - 2 H2O) / 2, nitrogen N2 = feed N2.
     */
    private static double[] completed(double[] r) {
        double co = r[0] + r[2] + r[3] - r[7] - r[8];
        double h2o = r[1] + r[2] + 2 * r[3] - co - 2 * r[8];
        double h2 = (4 * r[0] + 2 * r[1] + 2 * r[4] - 4 * r[7] - 2 * h2o) / 2;
        return new double[] {r[7], h2o, co, r[8], h2, r[5]};
    }

    private Path file(String name, byte[] bytes) throws IOException {
        return Files.write(temp.resolve(name), bytes);
    }

    @Test
    void everyLayoutTypeAndByteOrderCompletesToTheSameOutputs() throws IOException {
        String columns = String.join(",", COLUMNS);
        for (boolean fortran : new boolean[] {false, true}) {
            for (ByteOrder order : new ByteOrder[] {ByteOrder.LITTLE_ENDIAN, ByteOrder.BIG_ENDIAN}) {
                for (boolean float32 : new boolean[] {false, true}) {
                    String what = (fortran ? "F" : "C") + order + (float32 ? " f4" : " f8");
                    Path in = file("in.npy", npy(ROWS, fortran, float32, order));
                    Path out = temp.resolve("out.npy");
                    Captured c = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--columns", columns,
                            "--out", out.toString());
                    assertEquals(0, c.code(), what + ": " + c.err());
                    assertTrue(c.out().contains("its columns (a .npy file has no names; read it back with --columns):"
                            + " feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],out[3],out[4],"
                            + "out[5]\n"), c.out());
                    // Source: ND4J 1.0.0-M2.1's own .npy reader
                    INDArray back = Nd4j.createFromNpyFile(out.toFile());
                    assertArrayEquals(new long[] {2, 13}, back.shape(), what);
                    for (int r = 0; r < ROWS.length; r++) {
                        double[] row = ROWS[r].clone();
                        if (float32) {
                            for (int k = 0; k < row.length; k++) {
                                row[k] = (float) row[k];
                            }
                        }
                        double[] expected = completed(row);
                        for (int k = 0; k < 6; k++) {
                            assertEquals(expected[k], back.getDouble(r, 7 + k), 1e-12 * (1 + Math.abs(expected[k])),
                                    what + " row " + r + " out[" + k + "]");
                        }
                        assertEquals(row[6], back.getDouble(r, 6), 0.0, what + ": inputs as read");
                    }
                    Captured v = LawfulTest.run("verify", reformer(), "--in", out.toString(), "--columns",
                            "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],out[3],out[4],"
                                    + "out[5]");
                    assertEquals(0, v.code(), what + ": " + v.out() + v.err());
                    assertTrue(v.out().contains(": 2 rows of " + out + "\n"), v.out());
                }
            }
        }
    }

    private Path npz(String name, boolean deflate) throws IOException {
        Path p = temp.resolve(name);
        try (OutputStream os = Files.newOutputStream(p); ZipOutputStream zip = new ZipOutputStream(os)) {
            double[][] feed = new double[ROWS.length][6];
            for (int r = 0; r < ROWS.length; r++) {
                System.arraycopy(ROWS[r], 0, feed[r], 0, 6);
            }
            member(zip, "feed.npy", npy(feed, false, false, ByteOrder.LITTLE_ENDIAN), deflate);
            member(zip, "T.npy", column(ROWS, 6), deflate);
            member(zip, "out[0].npy", column(ROWS, 7), deflate);
            member(zip, "out[3].npy", column(ROWS, 8), deflate);
        }
        return p;
    }

    private static void member(ZipOutputStream zip, String name, byte[] bytes, boolean deflate) throws IOException {
        ZipEntry e = new ZipEntry(name);
        if (!deflate) {
            // numpy.savez stores its members uncompressed; a stored ZIP entry declares its size and CRC-32 up front
            // (Source: PKWARE APPNOTE.TXT, 4.4.4 and 4.4.7)
            CRC32 crc = new CRC32();
            crc.update(bytes);
            e.setMethod(ZipEntry.STORED);
            e.setSize(bytes.length);
            e.setCompressedSize(bytes.length);
            e.setCrc(crc.getValue());
        }
        zip.putNextEntry(e);
        zip.write(bytes);
        zip.closeEntry();
    }

    @Test
    void npzMembersNameTheirColumnsStoredOrDeflated() throws IOException {
        for (boolean deflate : new boolean[] {false, true}) {
            Path in = npz(deflate ? "compressed.npz" : "stored.npz", deflate);
            Path out = temp.resolve("out.csv");
            Captured c = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out", out.toString());
            assertEquals(0, c.code(), c.err());
            dev.lawful.io.CsvTable t = dev.lawful.io.CsvTable.read(out);
            for (int r = 0; r < ROWS.length; r++) {
                double[] expected = completed(ROWS[r]);
                for (int k = 0; k < 6; k++) {
                    assertEquals(expected[k], t.get(r, t.column("out[" + k + "]")), 1e-12, "row " + r + " out[" + k
                            + "]");
                }
            }
        }
    }

    @Test
    void badNumpyFilesGetClearErrors() throws IOException {
        Path in = file("in.npy", npy(ROWS, false, false, ByteOrder.LITTLE_ENDIAN));
        Captured none = LawfulTest.run("verify", reformer(), "--in", in.toString());
        assertEquals(2, none.code());
        assertEquals("lawful verify: " + in + ": a .npy array has no column names; give its 9 columns' names in"
                + " order with --columns, such as --columns a,b,c\n", none.err());
        Captured few = LawfulTest.run("verify", reformer(), "--in", in.toString(), "--columns", "a,b");
        assertEquals("lawful verify: " + in + ": --columns names 2 columns but the array has 9 (shape [2, 9])\n",
                few.err());
        byte[] ints = npyHeader("{'descr': '<i8', 'fortran_order': False, 'shape': (2, 9), }");
        Path integers = file("ints.npy", java.util.Arrays.copyOf(ints, ints.length + 2 * 9 * 8));
        Captured typed = LawfulTest.run("verify", reformer(), "--in", integers.toString(), "--columns",
                String.join(",", COLUMNS));
        assertEquals("lawful verify: " + integers + ": the array holds '<i8' values; expected float64 or float32"
                + " ('<f8', '>f8', '<f4' or '>f4'): convert it with astype(numpy.float64)\n", typed.err());
        Path cut = file("cut.npy", java.util.Arrays.copyOf(npy(ROWS, false, false, ByteOrder.LITTLE_ENDIAN), 200));
        Captured shortFile = LawfulTest.run("verify", reformer(), "--in", cut.toString(), "--columns",
                String.join(",", COLUMNS));
        assertEquals("lawful verify: " + cut + ": the file has 200 bytes but its header (shape [2, 9]) needs 272\n",
                shortFile.err());
        Path text = file("text.npy", "feed[0]\n1\n".getBytes(StandardCharsets.UTF_8));
        Captured notNpy = LawfulTest.run("verify", reformer(), "--in", text.toString(), "--columns", "a");
        assertEquals("lawful verify: " + text + ": not a NumPy .npy file (it does not start with \\x93NUMPY)\n",
                notNpy.err());
    }

    // ---- HDF5 and NetCDF-4 -----------------------------------------------------------------------------------

    @Test
    void hdf5VariablesCompleteToANpyFileThatVerifies() throws IOException {
        // the fixture is written by jhdf 0.9.4's own writer (io.jhdf.HdfFile.write), which follows the HDF5 File
        // Format Specification; one dataset per law vector or element, as a NetCDF-4 file has one variable each
        Path h5 = temp.resolve("in.h5");
        double[][] feed = new double[ROWS.length][6];
        // T as integers: read through jhdf's own slices; the float datasets are read straight from the file
        int[] t = new int[ROWS.length];
        double[] ch4 = new double[ROWS.length];
        double[] co2 = new double[ROWS.length];
        for (int r = 0; r < ROWS.length; r++) {
            System.arraycopy(ROWS[r], 0, feed[r], 0, 6);
            t[r] = (int) ROWS[r][6];
            ch4[r] = ROWS[r][7];
            co2[r] = ROWS[r][8];
        }
        try (io.jhdf.WritableHdfFile w = io.jhdf.HdfFile.write(h5)) {
            w.putDataset("feed", feed);
            w.putDataset("T", t);
            w.putDataset("out[0]", ch4);
            w.putDataset("out[3]", co2);
        }
        Path out = temp.resolve("out.npy");
        Captured c = LawfulTest.run("complete", reformer(), "--in", h5.toString(), "--out", out.toString());
        assertEquals(0, c.code(), c.err());
        // Source: ND4J 1.0.0-M2.1's own .npy reader
        INDArray back = Nd4j.createFromNpyFile(out.toFile());
        for (int r = 0; r < ROWS.length; r++) {
            double[] expected = completed(ROWS[r]);
            for (int k = 0; k < 6; k++) {
                assertEquals(expected[k], back.getDouble(r, 7 + k), 1e-12, "row " + r + " out[" + k + "]");
            }
            for (int k = 0; k < 7; k++) {
                assertEquals(ROWS[r][k], back.getDouble(r, k), 0.0, "row " + r + ": inputs as read, column " + k);
            }
        }
        Captured v = LawfulTest.run("verify", reformer(), "--in", out.toString(), "--columns",
                "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],out[3],out[4],out[5]");
        assertEquals(0, v.code(), v.out() + v.err());
    }

    @Test
    void aTwoDimensionalHdf5VariableIsNamedByItsColumnsAttribute() throws IOException {
        Path h5 = temp.resolve("table.h5");
        try (io.jhdf.WritableHdfFile w = io.jhdf.HdfFile.write(h5)) {
            w.putDataset("table", ROWS).putAttribute("columns", String.join(",", COLUMNS));
        }
        Path out = temp.resolve("out.csv");
        Captured c = LawfulTest.run("complete", reformer(), "--in", h5.toString(), "--out", out.toString());
        assertEquals(0, c.code(), c.err());
        dev.lawful.io.CsvTable table = dev.lawful.io.CsvTable.read(out);
        assertEquals(completed(ROWS[1])[2], table.get(1, table.column("out[2]")), 1e-12);
        Path text = file("text.h5", "feed[0]\n1\n".getBytes(StandardCharsets.UTF_8));
        Captured bad = LawfulTest.run("verify", reformer(), "--in", text.toString());
        assertEquals(2, bad.code());
        assertTrue(bad.err().startsWith("lawful verify: " + text + ": not an HDF5 or NetCDF-4 file: "), bad.err());
    }

    // ---- files written by NumPy and h5py themselves ---------------------------------------------------------

    private static Path fixture(String name) throws Exception {
        return Path.of(DataFormatsTest.class.getResource("/fixtures/" + name).toURI());
    }

    /** Completes a fixture to CSV and checks every completed output against the balances worked by hand. */
    private void completesLikeTheRows(Path in, boolean float32Out3, String... options) throws IOException {
        Path out = temp.resolve("out.csv");
        List<String> args = new java.util.ArrayList<>(List.of("complete", reformer(), "--in", in.toString(), "--out",
                out.toString()));
        args.addAll(List.of(options));
        Captured c = LawfulTest.run(args.toArray(new String[0]));
        assertEquals(0, c.code(), in + ": " + c.err());
        dev.lawful.io.CsvTable t = dev.lawful.io.CsvTable.read(out);
        for (int r = 0; r < ROWS.length; r++) {
            double[] row = ROWS[r].clone();
            if (float32Out3) {
                row[8] = (float) row[8];
            }
            double[] expected = completed(row);
            for (int k = 0; k < 6; k++) {
                assertEquals(expected[k], t.get(r, t.column("out[" + k + "]")), 1e-12, in + " row " + r + " out["
                        + k + "]");
            }
        }
    }

    @Test
    void filesWrittenByNumpyAndH5pyComplete() throws Exception {
        // Source: files written by NumPy 2.4.6 (numpy.save of a Fortran-order big-endian float32 array,
        // numpy.savez_compressed) and h5py 3.16.0 (chunked, gzip-compressed and shuffled datasets attached to a
        // dimension scale, as a NetCDF-4 file lays out its variables); src/test/resources/fixtures/make_fixtures.py
        Path npy = fixture("numpy-fortran-f4-be.npy");
        Path out = temp.resolve("f4.csv");
        Captured c = LawfulTest.run("complete", reformer(), "--in", npy.toString(), "--columns",
                String.join(",", COLUMNS), "--out", out.toString());
        assertEquals(0, c.code(), c.err());
        dev.lawful.io.CsvTable t = dev.lawful.io.CsvTable.read(out);
        for (int r = 0; r < ROWS.length; r++) {
            double[] row = ROWS[r].clone();
            for (int k = 0; k < row.length; k++) {
                row[k] = (float) row[k];
            }
            assertEquals(completed(row)[2], t.get(r, t.column("out[2]")), 1e-12, "float32 row " + r);
        }
        completesLikeTheRows(fixture("numpy-members.npz"), false);
        completesLikeTheRows(fixture("chunked-gzip.h5"), true);
    }
}
