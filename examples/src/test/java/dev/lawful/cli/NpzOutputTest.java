package dev.lawful.cli;

import static dev.lawful.cli.LawfulTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.cli.LawfulTest.Captured;
import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.zip.CRC32;
import java.util.zip.ZipEntry;
import java.util.zip.ZipFile;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * {@code lawful complete --out FILE.npz}. The archive is read back here without Lawful's own reader: the ZIP by
 * {@link ZipFile}, each member by NumPy's format specification ({@code numpy.lib.format}, "NPY format", NEP 1):
 * the magic {@code \x93NUMPY}, version 1.0, a little-endian unsigned 16-bit header length, an ASCII Python dict
 * literal with {@code 'descr'}, {@code 'fortran_order'} and {@code 'shape'}, padded with spaces and ended by a line
 * feed so that the whole prefix is a multiple of 64 bytes, then the data; and {@code numpy.savez}'s documentation
 * (one stored {@code NAME.npy} member per array). Every value must equal, bit for bit, the CSV output of the same
 * completion (whose numbers read back exactly, by {@link Double#parseDouble}).
 */
class NpzOutputTest {

    @TempDir
    Path temp;

    private static final String HEADER = "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[3]";
    /** NPY format: 'shape': (d0,) or (d0, d1), in the dict literal. */
    private static final Pattern DICT = Pattern.compile(
            "\\{'descr': '<f8', 'fortran_order': False, 'shape': \\((\\d+),( (\\d+))?\\), \\} *\n");

    private static String reformer() {
        return ExampleFiles.law("steam-reformer.law").toString();
    }

    /** A CSV of {@code rows} reformer rows from a seeded generator: several chunks of the CSV reader. */
    private Path reformerRows(String name, int rows) throws IOException {
        Random random = new Random(20261204L);
        StringBuilder sb = new StringBuilder(HEADER).append('\n');
        for (int r = 0; r < rows; r++) {
            double ch4 = 1 + random.nextDouble();
            double h2o = 3 + 2 * random.nextDouble();
            sb.append(ch4).append(',').append(h2o).append(',').append(random.nextDouble() / 2).append(',')
                    .append(random.nextDouble() / 10).append(',').append(random.nextDouble() / 2).append(',')
                    .append(random.nextDouble() / 4).append(',').append(850 + random.nextInt(150)).append(',')
                    .append(ch4 * random.nextDouble() / 2).append(',').append(ch4 * random.nextDouble() / 2)
                    .append('\n');
        }
        return Files.writeString(temp.resolve(name), sb, StandardCharsets.UTF_8);
    }

    /** One member as NumPy's format specification lays it out. */
    private record Member(long[] shape, double[] values) {
    }

    private static Member parse(String name, byte[] bytes) {
        ByteBuffer b = ByteBuffer.wrap(bytes).order(ByteOrder.LITTLE_ENDIAN);
        byte[] magic = new byte[6];
        b.get(magic);
        assertEquals("\u0093NUMPY", new String(magic, StandardCharsets.ISO_8859_1), name);
        assertEquals(1, b.get(), name + ": major version");
        assertEquals(0, b.get(), name + ": minor version");
        int headerLength = Short.toUnsignedInt(b.getShort());
        int prefix = 10 + headerLength;
        assertEquals(0, prefix % 64, name + ": the prefix is a multiple of 64 bytes");
        String dict = new String(bytes, 10, headerLength, StandardCharsets.US_ASCII);
        Matcher m = DICT.matcher(dict);
        assertTrue(m.matches(), name + ": " + dict);
        long[] shape = m.group(3) == null ? new long[] {Long.parseLong(m.group(1))}
                : new long[] {Long.parseLong(m.group(1)), Long.parseLong(m.group(3))};
        long count = shape.length == 1 ? shape[0] : shape[0] * shape[1];
        assertEquals(prefix + 8 * count, bytes.length, name + ": the data are the shape's float64 values");
        b.position(prefix);
        double[] values = new double[(int) count];
        b.asDoubleBuffer().get(values);
        return new Member(shape, values);
    }

    /** @return every member of the archive, in the archive's order, checked as stored with the CRC-32 it declares */
    private static List<String> read(Path npz, java.util.Map<String, Member> members) throws IOException {
        List<String> names = new ArrayList<>();
        try (ZipFile zip = new ZipFile(npz.toFile())) {
            for (ZipEntry e : Collections.list(zip.entries())) {
                names.add(e.getName());
                assertEquals(ZipEntry.STORED, e.getMethod(), e.getName() + " is stored, as numpy.savez stores it");
                byte[] bytes;
                try (InputStream in = zip.getInputStream(e)) {
                    bytes = in.readAllBytes();
                }
                CRC32 crc = new CRC32();
                crc.update(bytes);
                assertEquals(crc.getValue(), e.getCrc(), e.getName() + ": CRC-32");
                members.put(e.getName(), parse(e.getName(), bytes));
            }
        }
        return names;
    }

    @Test
    void npzHasOneMemberPerElementEqualToTheCsvBitForBitAndVerifies() throws IOException {
        int rows = 20_000;
        Path in = reformerRows("in.csv", rows);
        Path csv = temp.resolve("full.csv");
        Path npz = temp.resolve("full.npz");
        assertEquals(0, run("complete", reformer(), "--in", in.toString(), "--out", csv.toString()).code());
        Captured c = run("complete", reformer(), "--in", in.toString(), "--out", npz.toString());
        assertEquals(0, c.code(), c.err());
        assertEquals("", c.err());
        assertTrue(c.out().contains("wrote " + npz + ": " + rows + " rows of " + in + "\n"), c.out());
        assertFalse(c.out().contains("--columns"), "a .npz file names its columns: " + c.out());

        java.util.Map<String, Member> members = new java.util.HashMap<>();
        // steam-reformer.law declares input feed[6], input T, output out[6]
        assertEquals(List.of("feed.npy", "T.npy", "out.npy"), read(npz, members));
        assertEquals(List.of(rows, 6), List.of((int) members.get("feed.npy").shape()[0],
                (int) members.get("feed.npy").shape()[1]));
        assertEquals(1, members.get("T.npy").shape().length);
        assertEquals(rows, members.get("T.npy").shape()[0]);
        assertEquals(2, members.get("out.npy").shape().length);
        assertEquals(6, members.get("out.npy").shape()[1]);

        List<String> lines = Files.readAllLines(csv);
        assertEquals("feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],out[3],out[4],out[5]",
                lines.get(0));
        assertEquals(rows + 1, lines.size());
        for (int r = 0; r < rows; r++) {
            String[] cells = lines.get(r + 1).split(",");
            for (int k = 0; k < cells.length; k++) {
                // C order: element [r][j] of a (rows, 6) array is value r * 6 + j
                double v = k < 6 ? members.get("feed.npy").values()[r * 6 + k]
                        : k == 6 ? members.get("T.npy").values()[r] : members.get("out.npy").values()[r * 6 + k - 7];
                assertEquals(Double.doubleToRawLongBits(Double.parseDouble(cells[k])), Double.doubleToRawLongBits(v),
                        "row " + r + " column " + k);
            }
        }

        Captured v = run("verify", reformer(), "--in", npz.toString());
        assertEquals(0, v.code(), v.out() + v.err());
        assertEquals("", v.err());
        assertTrue(v.out().endsWith(rows + " samples, relative tolerance 1e-9: every law within tolerance\n"),
                v.out());
        try (var files = Files.list(temp)) {
            assertEquals(List.of("full.csv", "full.npz", "in.csv"), files.map(p -> p.getFileName().toString())
                    .sorted().toList(), "no temporary file is left behind");
        }
    }

    @Test
    void aVectorWithAnAbsentComponentIsOneMemberPerComponent() throws IOException {
        // a[2] is in no law, so the data may leave it out; a one-component vector b[1] has no 2-D shape that reads
        // back under its component's name
        Path law = Files.writeString(temp.resolve("part.law"), "input a[3] m\ninput b[1] m\noutput y m\n"
                + "law sum: y = a[0] + a[1] + b[0]\n");
        Path in = Files.writeString(temp.resolve("in.csv"), "a[0],a[1],b[0]\n1,2,0.5\n3,4,0.25\n");
        Path npz = temp.resolve("out.npz");
        Captured c = run("complete", law.toString(), "--in", in.toString(), "--out", npz.toString());
        assertEquals(0, c.code(), c.err());
        java.util.Map<String, Member> members = new java.util.HashMap<>();
        assertEquals(List.of("a[0].npy", "a[1].npy", "b[0].npy", "y.npy"), read(npz, members));
        // y = a[0] + a[1] + b[0]: 1 + 2 + 0.5 and 3 + 4 + 0.25, exact in binary
        assertEquals(List.of(3.5, 7.25), List.of(members.get("y.npy").values()[0], members.get("y.npy").values()[1]));
        assertEquals(0, run("verify", law.toString(), "--in", npz.toString()).code());
    }

    @Test
    void aRowThatCannotBeCompletedLeavesNoArchiveAndNoTemporaryFile() throws IOException {
        Path good = reformerRows("good.csv", 3);
        Path in = reformerRows("in.csv", 20_000);
        Files.writeString(in, "1,3,0,0.05,0.02,0.01,900,NaN,0.35\n", StandardCharsets.UTF_8,
                java.nio.file.StandardOpenOption.APPEND);
        Path npz = temp.resolve("full.npz");
        String error = "lawful complete: " + in + ": line 20002: cannot complete this row: column 'out[0]': 'NaN' is"
                + " read as NaN (not a number); nothing was written (--keep-going writes such rows as NaN with a"
                + " status column)\n";
        Captured c = run("complete", reformer(), "--in", in.toString(), "--out", npz.toString());
        assertEquals(1, c.code());
        assertEquals(error, c.err());
        try (var files = Files.list(temp)) {
            assertEquals(List.of("good.csv", "in.csv"), files.map(p -> p.getFileName().toString()).sorted().toList(),
                    "no archive and no temporary file");
        }
        // an archive already there is left as it was
        assertEquals(0, run("complete", reformer(), "--in", good.toString(), "--out", npz.toString()).code());
        byte[] before = Files.readAllBytes(npz);
        assertEquals(List.of("feed.npy", "T.npy", "out.npy"), read(npz, new java.util.HashMap<>()));
        Captured again = run("complete", reformer(), "--in", in.toString(), "--out", npz.toString());
        assertEquals(1, again.code());
        assertEquals(error, again.err());
        assertTrue(java.util.Arrays.equals(before, Files.readAllBytes(npz)), "the older archive survives");
        try (var files = Files.list(temp)) {
            assertEquals(List.of("full.npz", "good.csv", "in.csv"), files.map(p -> p.getFileName().toString())
                    .sorted().toList(), "no temporary file");
        }
    }

    @Test
    void keepGoingIsRefusedForNpz() throws IOException {
        Path in = reformerRows("in.csv", 2);
        Path npz = temp.resolve("full.NPZ");
        Captured c = run("complete", reformer(), "--in", in.toString(), "--out", npz.toString(), "--keep-going");
        assertEquals(2, c.code());
        assertEquals("", c.out());
        assertEquals("lawful complete: --keep-going adds a status column, which a .npz file (numbers only) cannot"
                + " hold; write CSV, or leave out --keep-going\n", c.err());
        assertFalse(Files.exists(npz));
    }

    @Test
    void helpNamesEveryInputFormatAndNpzOutput() {
        String top = LawfulTest.words(run("--help").out());
        assertTrue(top.contains("complete Reads a data file (CSV, NumPy .npy or .npz, HDF5 or NetCDF-4)"), top);
        assertTrue(top.contains("verify Reports how well the rows of a data file (CSV, NumPy .npy or .npz, HDF5 or"
                + " NetCDF-4)"), top);
        String complete = LawfulTest.words(run("complete", "--help").out());
        assertTrue(complete.contains("a NumPy .npz archive (one float64 member per element, such as feed.npy of"
                + " shape (rows, 6), read back without --columns) when it ends in .npz"), complete);
        assertTrue(complete.contains("writes a CSV (or NumPy .npy or .npz) file"), complete);
    }
}
