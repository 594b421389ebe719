package dev.lawful.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import dev.lawful.cli.LawfulTest.Captured;
import dev.lawful.enforce.ResidualReport;
import dev.lawful.io.CsvTable;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermission;
import java.nio.file.attribute.PosixFilePermissions;
import java.util.Set;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * {@code complete} and {@code verify} in chunks on every core, and the conventions of their files: standard input
 * and output, links, special files, permissions, separators, values read as infinity, and the notes that say what
 * the statistics and the limits did.
 */
class StreamingTest {

    @TempDir
    Path temp;

    private static final String HEADER = "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[3]";
    private static final String ROW = "1,3,0,0.05,0.02,0.01,900,0.4,0.35";

    private static String reformer() {
        return ExampleFiles.law("steam-reformer.law").toString();
    }

    private Path write(String name, String text) throws IOException {
        return Files.writeString(temp.resolve(name), text, StandardCharsets.UTF_8);
    }

    /** Rows of random feeds and free outputs, each row different so that order is visible. */
    private static String manyRows(int n, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        StringBuilder sb = new StringBuilder("# generated rows\n").append(HEADER).append('\n');
        for (int s = 0; s < n; s++) {
            sb.append(1 + r.nextDouble()).append(',').append(3 + r.nextDouble()).append(",0,")
                    .append(r.nextDouble() / 10).append(',').append(r.nextDouble() / 10).append(',')
                    .append(r.nextDouble() / 10).append(',').append(800 + s).append(',')
                    .append(r.nextDouble() / 2).append(',').append(r.nextDouble() / 2).append('\n');
            if (s % 1000 == 0) {
                sb.append("\n# a comment between rows\n");
            }
        }
        return sb.toString();
    }

    @Test
    void manyChunksKeepTheInputOrderAndVerifyMatchesTheInMemoryReport() throws IOException {
        // about 3 MB: three chunks of CsvSource.CHUNK_BYTES, on every core
        Path in = write("in.csv", manyRows(40_000, 5));
        assertTrue(Files.size(in) > 2L * CsvSource.CHUNK_BYTES, "the input spans several chunks");
        Path full = temp.resolve("full.csv");
        Captured c = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out", full.toString());
        assertEquals(0, c.code(), c.err());
        CsvTable input = CsvTable.read(in);
        CsvTable output = CsvTable.read(full);
        assertEquals(input.rows(), output.rows());
        for (int s = 0; s < input.rows(); s++) {
            // T is 800 + the row's index: the output's rows are the input's, in order
            assertEquals(800 + s, output.get(s, output.column("T")), 0.0, "row " + s);
            assertEquals(input.get(s, input.column("out[0]")), output.get(s, output.column("out[0]")), 0.0);
        }
        Captured v = LawfulTest.run("verify", reformer(), "--in", full.toString(), "--json");
        assertEquals(0, v.code(), v.err());
        // the reference: the whole table in memory, one report (ResidualReport.of, the path before streaming)
        LawSet laws = LawSet.read(Path.of(reformer()));
        String reference = ResidualReport.of(laws, output.gather(laws.inputNames()),
                output.gather(laws.outputNames()), output.rows(), 1e-9).toJson().replace("\n", "\n  ");
        assertTrue(v.out().contains("\"report\": " + reference + ",\n"), v.out());
    }

    @Test
    void standardInputAndOutputAreDash() throws IOException {
        String data = HEADER + "\n" + ROW + "\n";
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Lawful.run(new ByteArrayInputStream(data.getBytes(StandardCharsets.UTF_8)),
                new PrintStream(out, true, StandardCharsets.UTF_8), new PrintStream(err, true, StandardCharsets.UTF_8),
                false, "complete", reformer(), "--in", "-", "--out", "-");
        String e = err.toString(StandardCharsets.UTF_8);
        assertEquals(0, code, e);
        CsvTable t = CsvTable.parse("stdout", out.toString(StandardCharsets.UTF_8));
        // carbon: out[2] = feed[0] + feed[2] + feed[3] - out[0] - out[3] = 1 + 0 + 0.05 - 0.4 - 0.35
        assertEquals(0.3, t.get(0, t.column("out[2]")), 1e-15);
        // the summary goes to standard error, so standard output holds the table alone
        assertTrue(e.contains("wrote standard output: 1 row of standard input"), e);
    }

    @Test
    void devStdoutIsStandardOutput() throws IOException {
        Path in = write("in.csv", HEADER + "\n" + ROW + "\n");
        // /dev/stdout names the process's standard output (common practice on Linux and other Unix systems)
        Captured c = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out", "/dev/stdout");
        assertEquals(0, c.code(), c.err());
        assertTrue(c.out().startsWith("feed[0],feed[1],"), "the table, and only it, on standard output: " + c.out());
        CsvTable t = CsvTable.parse("stdout", c.out());
        assertEquals(0.3, t.get(0, t.column("out[2]")), 1e-15);
        assertTrue(c.err().contains("wrote /dev/stdout: 1 row of " + in), c.err());
    }

    @Test
    void aLinkIsWrittenThroughAndStaysALink() throws IOException {
        Path in = write("in.csv", HEADER + "\n" + ROW + "\n");
        Path real = write("real.csv", "old\n");
        Path link = Files.createSymbolicLink(temp.resolve("link.csv"), real.getFileName());
        Captured c = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out", link.toString());
        assertEquals(0, c.code(), c.err());
        assertTrue(Files.isSymbolicLink(link), "the link is still a link");
        assertTrue(Files.readString(real).startsWith("feed[0],"), "the file it points to has the table");
    }

    @Test
    void specialFilesAreWrittenInPlace() throws IOException {
        Path in = write("in.csv", HEADER + "\n" + ROW + "\n");
        // /dev/null is a character device (common practice on every Unix); it cannot be replaced by a file
        Captured c = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out", "/dev/null");
        assertEquals(0, c.code(), c.err());
        assertTrue(Files.exists(Path.of("/dev/null")) && !Files.isRegularFile(Path.of("/dev/null")));
    }

    @Test
    void aNewFileGetsTheUmaskPermissionsAndAReplacedOneKeepsItsOwn() throws IOException {
        Path in = write("in.csv", HEADER + "\n" + ROW + "\n");
        // the reference: a file created the ordinary way in the same folder, whose mode the umask decides
        Set<PosixFilePermission> ordinary = Files.getPosixFilePermissions(Files.createFile(temp.resolve("ref")));
        Path fresh = temp.resolve("fresh.csv");
        assertEquals(0, LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out", fresh.toString())
                .code());
        assertEquals(ordinary, Files.getPosixFilePermissions(fresh));
        Path kept = write("kept.csv", "old\n");
        Set<PosixFilePermission> group = PosixFilePermissions.fromString("rw-r-----");
        Files.setPosixFilePermissions(kept, group);
        assertEquals(0, LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out", kept.toString())
                .code());
        assertEquals(group, Files.getPosixFilePermissions(kept));
    }

    @Test
    void aValueReadAsInfinityIsNamedWithItsColumnAndText() throws IOException {
        // 1e999 is beyond the largest double, about 1.8e308 (Source: IEEE 754-2019, binary64 format)
        Path in = write("in.csv", HEADER + "\n" + ROW.replace("1,3,", "1e999,3,") + "\n");
        Captured c = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out",
                temp.resolve("o.csv").toString());
        assertEquals(1, c.code());
        assertEquals("lawful complete: " + in + ": line 2: cannot complete this row: column 'feed[0]': '1e999' is"
                + " read as infinity (beyond the largest double, 1.8e308); nothing was written (--keep-going writes"
                + " such rows as NaN with a status column)\n", c.err());
        Path full = write("full.csv", "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],"
                + "out[3],out[4],out[5]\n1,3,0,0.05,0.02,0.01,-Infinity,0.4,1,0.3,0.35,1,0.01\n");
        Captured v = LawfulTest.run("verify", reformer(), "--in", full.toString());
        assertTrue(v.err().contains("lawful verify: note: " + full + ": line 2, column 'T': '-Infinity' is read as"
                + " minus infinity\n"), v.err());
    }

    @Test
    void aSemicolonSeparatedFileIsReadAndADecimalCommaIsNamed() throws IOException {
        Path comma = write("comma.csv", HEADER + "\n" + ROW + "\n");
        Path semi = write("semi.csv", HEADER.replace(',', ';') + "\n" + ROW.replace(',', ';') + "\n");
        Path a = temp.resolve("a.csv");
        Path b = temp.resolve("b.csv");
        assertEquals(0, LawfulTest.run("complete", reformer(), "--in", comma.toString(), "--out", a.toString())
                .code());
        Captured c = LawfulTest.run("complete", reformer(), "--in", semi.toString(), "--out", b.toString());
        assertEquals(0, c.code(), c.err());
        assertEquals(Files.readString(a), Files.readString(b));
        Path decimal = write("dec.csv", HEADER.replace(',', ';') + "\n" + ROW.replace(',', ';').replace("0.4",
                "0,4") + "\n");
        c = LawfulTest.run("complete", reformer(), "--in", decimal.toString(), "--out", b.toString());
        assertEquals(2, c.code());
        assertEquals("lawful complete: " + decimal + ": line 2, column 'out[0]': '0,4' is not a number (a decimal"
                + " comma? write numbers with a decimal point)\n", c.err());
    }

    @Test
    void verifySaysHowManyRowsTheStatisticsCover() throws IOException {
        Path full = write("full.csv", "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],"
                + "out[3],out[4],out[5]\n1,3,0,0.05,0.02,0.01,900,0.4,1,0.3,0.35,1,0.01\n"
                + "1,3,0,0.05,0.02,0.01,900,NaN,1,0.3,0.35,1,0.01\n");
        Captured v = LawfulTest.run("verify", reformer(), "--in", full.toString());
        assertEquals(1, v.code());
        // out[0] (CH4) enters the carbon and hydrogen balances only
        assertTrue(v.out().contains("max, mean and p99 cover only the rows with a finite residual: carbon 1 of 2 rows,"
                + " hydrogen 1 of 2 rows\n"), v.out());
    }

    @Test
    void completeSaysHowManyRowsTheLimitsMoved() throws IOException {
        // the first row's CH4 of 0.95 leaves a negative CO by the carbon balance, 1.05 - 0.95 - 0.35 < 0: a limit
        // moves it; the second row is inside every limit
        Path in = write("in.csv", HEADER + "\n1,3,0,0.05,0.02,0.01,900,0.95,0.35\n" + ROW + "\n");
        Captured c = LawfulTest.run("complete", ExampleFiles.law("steam-reformer-limits.law").toString(), "--in",
                in.toString(), "--out", temp.resolve("o.csv").toString());
        assertEquals(0, c.code(), c.err());
        assertTrue(c.out().contains("limits moved 1 of 2 rows (their free outputs changed to bring them inside; the"
                + " others are as read)\n"), c.out());
        Captured plain = LawfulTest.run("complete", reformer(), "--in", in.toString(), "--out",
                temp.resolve("p.csv").toString());
        assertTrue(!plain.out().contains("limits moved"), "no line without limits: " + plain.out());
    }
}
