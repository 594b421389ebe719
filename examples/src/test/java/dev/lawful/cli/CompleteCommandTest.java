package dev.lawful.cli;

import static dev.lawful.cli.LawfulTest.run;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import dev.lawful.cli.LawfulTest.Captured;
import dev.lawful.io.CsvReader;
import dev.lawful.io.CsvTable;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code lawful complete}: the output table, bad rows with and without --keep-going, column and file problems. */
class CompleteCommandTest {

    @TempDir
    Path temp;

    private static final String REFORMER_HEADER = "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[3]";

    private Path write(String name, String text) throws IOException {
        return Files.writeString(temp.resolve(name), text, StandardCharsets.UTF_8);
    }

    private static String reformer() {
        return ExampleFiles.law("steam-reformer.law").toString();
    }

    // ---- the shipped example -------------------------------------------------------------------------------

    @Test
    void limitsKeepEveryOutletFlowNonNegativeAndVerifyAgrees() throws IOException {
        // a predicted CH4 outflow of 0.95 mol/s leaves the carbon balance a CO outflow of 1.05 − 0.95 − 0.35 < 0
        Path in = write("in.csv", "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[3]\n"
                + "1,3,0,0.05,0.02,0.01,900,0.95,0.35\n1,3,0,0.05,0.02,0.01,900,0.4,0.35\n");
        Path plain = temp.resolve("plain.csv");
        assertEquals(0, run("complete", reformer(), "--in", in.toString(), "--out", plain.toString()).code());
        List<String> plainRows = Files.readAllLines(plain);
        String header = plainRows.stream().filter(l -> l.startsWith("feed[0]")).findFirst().orElseThrow();
        int co = List.of(header.split(",")).indexOf("out[2]");
        List<String> plainData = plainRows.stream().filter(l -> !l.startsWith("#") && !l.startsWith("feed")).toList();
        assertTrue(Double.parseDouble(plainData.get(0).split(",")[co]) < 0, plainData.get(0));

        String limited = ExampleFiles.law("steam-reformer-limits.law").toString();
        Path full = temp.resolve("limited.csv");
        Captured c = run("complete", limited, "--in", in.toString(), "--out", full.toString());
        assertEquals(0, c.code(), c.err());
        List<String> rows = Files.readAllLines(full).stream().filter(l -> !l.startsWith("#") && !l.startsWith("feed"))
                .toList();
        for (String row : rows) {
            String[] cells = row.split(",");
            for (int k = 7; k < cells.length; k++) {
                assertTrue(Double.parseDouble(cells[k]) >= 0, row);
            }
        }
        // the second row was inside every limit: written exactly as without limits
        assertEquals(plainData.get(1), rows.get(1));
        Captured v = run("verify", limited, "--in", full.toString());
        assertEquals(0, v.code(), v.out() + v.err());
    }

    @Test
    void completeThenVerifyRoundTripsTheShippedExample() throws IOException {
        Path free = ExampleFiles.data("reformer-free.csv");
        Path full = temp.resolve("reformer-full.csv");
        Captured c = run("complete", reformer(), "--in", free.toString(), "--out", full.toString());
        assertEquals(0, c.code(), c.err());
        assertEquals("", c.err());
        assertEquals(List.of(
                reformer() + ": completed out[2], out[4], out[1], out[5] (constant-affine, condition number 8.09 equilibrated)"
                        + " from out[0], out[3]",
                "wrote " + full + ": 6 rows of " + free), c.out().lines().toList().subList(0, 2));
        assertTrue(c.out().lines().toList().get(2).startsWith("largest relative residual |lhs - rhs| / scale: "),
                c.out());

        Captured v = run("verify", reformer(), "--in", full.toString());
        assertEquals(0, v.code(), v.out() + v.err());
        assertEquals("", v.err());
        assertTrue(v.out().endsWith("6 samples, relative tolerance 1e-9: every law within tolerance\n"), v.out());
        Captured json = run("verify", reformer(), "--in", full.toString(), "--json");
        assertEquals(0, json.code(), json.err());
        Map<String, Object> report = VerifyCommandTest.object(VerifyCommandTest.object(
                CheckCommandTest.Json.parse(json.out())).get("report"));
        assertEquals(Boolean.TRUE, report.get("withinTolerance"));
        assertEquals(6.0, report.get("samples"));

        // inputs and free outputs come through bit for bit; the header is inputs, then outputs in declared order
        CsvTable in = CsvTable.read(free);
        CsvTable out = CsvTable.read(full);
        LawSet laws = LawSet.read(Path.of(reformer()));
        List<String> header = new ArrayList<>(laws.inputNames());
        header.addAll(laws.outputNames());
        assertEquals(header, out.columns());
        for (String column : in.columns()) {
            assertArrayEquals(in.gather(List.of(column)), out.gather(List.of(column)), column);
        }
    }

    @Test
    void completedRowsObeyTheElementBalancesToRounding() throws IOException {
        Path full = temp.resolve("full.csv");
        assertEquals(0, run("complete", reformer(), "--in", ExampleFiles.data("reformer-free.csv").toString(),
                "--out", full.toString()).code());
        CsvTable t = CsvTable.read(full);
        // Source: the atom counts of steam-reformer.law (CH4, H2O, CO, CO2, H2, N2): carbon 1,0,1,1,0,0;
        // hydrogen 4,2,0,0,2,0; oxygen 0,1,1,2,0,0; nitrogen 0,0,0,0,0,2 — summed here by hand, not by Lawful
        double[][] atoms = {{1, 0, 1, 1, 0, 0}, {4, 2, 0, 0, 2, 0}, {0, 1, 1, 2, 0, 0}, {0, 0, 0, 0, 0, 2}};
        for (int r = 0; r < t.rows(); r++) {
            for (double[] a : atoms) {
                double in = 0;
                double out = 0;
                double largest = 0;
                for (int k = 0; k < 6; k++) {
                    double f = a[k] * t.get(r, t.column("feed[" + k + "]"));
                    double o = a[k] * t.get(r, t.column("out[" + k + "]"));
                    in += f;
                    out += o;
                    largest = Math.max(largest, Math.max(Math.abs(f), Math.abs(o)));
                }
                // a few roundings of the largest term (the completion's own bound is 4 ulps; the sums here add
                // at most 6 more)
                assertEquals(in, out, 16 * Math.ulp(largest), "line " + t.line(r));
            }
        }
    }

    // ---- bad rows ------------------------------------------------------------------------------------------

    @Test
    void badRowStopsTheCommandWithItsLineAndWritesNothing() throws IOException {
        Path data = write("nan.csv", "# two rows\n" + REFORMER_HEADER + "\n1,3,0,0.05,0.02,0.01,900,0.4,0.35\n"
                + "1,3,0,0.05,0.02,0.01,900,NaN,0.35\n");
        Path full = write("full.csv", "an older file that must survive\n");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", full.toString());
        assertEquals(1, r.code());
        assertEquals("", r.out());
        assertEquals("lawful complete: " + data + ": line 4: cannot complete this row: column 'out[0]': 'NaN' is read"
                + " as NaN (not a number); nothing was written (--keep-going writes such rows as NaN with a status"
                + " column)\n", r.err());
        assertEquals("an older file that must survive\n", Files.readString(full));
        try (var files = Files.list(temp)) {
            assertEquals(2, files.count(), "no temporary file is left behind");
        }
    }

    @Test
    void keepGoingWritesNaNRowsAndAStatusColumn() throws IOException {
        Path data = write("nan.csv", REFORMER_HEADER + "\n1,3,0,0.05,0.02,0.01,900,Infinity,0.35\n"
                + "1,3,0,0.05,0.02,0.01,900,0.4,0.35\n");
        Path full = temp.resolve("full.csv");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", full.toString(), "--keep-going");
        assertEquals(0, r.code(), r.err());
        assertEquals("lawful complete: note: " + data + ": line 2, column 'out[0]': 'Infinity' is read as infinity\n"
                + "lawful complete: note: 1 of 2 rows could not be completed; their outputs are NaN and the"
                + " status column says why: line 2 (non-finite input)\n", r.err());
        assertTrue(r.out().contains("wrote " + full + ": 2 rows of " + data + ", with a status column\n"), r.out());
        CsvReader back = CsvReader.open(full);
        assertEquals("status", back.header().get(back.header().size() - 1));
        List<String> lines = Files.readAllLines(full);
        assertEquals("1,3,0,0.05,0.02,0.01,900,NaN,NaN,NaN,NaN,NaN,NaN,non-finite input", lines.get(1));
        assertTrue(lines.get(2).endsWith(",ok"), lines.get(2));
        // verify reads the file back, ignores the status column, and fails on the NaN row
        Captured v = run("verify", reformer(), "--in", full.toString());
        assertEquals(1, v.code());
        assertEquals("lawful verify: note: " + full + ": ignoring column not in " + reformer() + ": status\n",
                v.err());
        assertTrue(v.out().contains("  carbon: 1 sample over tolerance; worst line 2 (1 NaN or infinite)\n"),
                v.out());
    }

    @Test
    void statusColumnGivesWayToAnElementOfThatName() throws IOException {
        Path law = write("status.law", "input status m\noutput y m\nlaw same: y = status\n");
        Path data = write("in.csv", "status\n1\nNaN\n");
        Path full = temp.resolve("full.csv");
        assertEquals(0, run("complete", law.toString(), "--in", data.toString(), "--out", full.toString(),
                "--keep-going").code());
        assertEquals(List.of("status,y,status_", "1,1,ok", "NaN,NaN,non-finite input"), Files.readAllLines(full));
    }

    // ---- columns and files ---------------------------------------------------------------------------------

    @Test
    void missingFreeOutputIsAUsageErrorThatSaysWhatItIs() throws IOException {
        Path data = write("in.csv", "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0]\n1,3,0,0.05,0.02,0.01,"
                + "900,0.4\n");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", temp.resolve("o.csv").toString());
        assertEquals(2, r.code());
        assertEquals("lawful complete: " + data + ": line 1: no column 'out[3]' (a free output of " + reformer()
                + ")\n", r.err());
        assertFalse(Files.exists(temp.resolve("o.csv")));
    }

    @Test
    void completedOutputColumnsAndUnknownColumnsAreIgnoredWithANote() throws IOException {
        Path data = write("in.csv", "id," + REFORMER_HEADER + ",out[2]\n7,1,3,0,0.05,0.02,0.01,900,0.4,0.35,99\n");
        Path full = temp.resolve("o.csv");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", full.toString());
        assertEquals(0, r.code(), r.err());
        assertEquals("lawful complete: note: " + data + ": ignoring column out[2]: completed outputs are computed"
                + " from the laws\nlawful complete: note: " + data + ": ignoring column not in " + reformer() + ": id\n",
                r.err());
        CsvTable t = CsvTable.read(full);
        // carbon: out[2] = feed[0] + feed[2] + feed[3] - out[0] - out[3] = 1 + 0 + 0.05 - 0.4 - 0.35, not 99
        assertEquals(0.3, t.get(0, t.column("out[2]")), 1e-15);
    }

    @Test
    void misnamedColumnSuggestsTheElement() throws IOException {
        Path data = write("in.csv", REFORMER_HEADER.replace("out[3]", "out(3)") + "\n1,3,0,0.05,0.02,0.01,900,0.4,"
                + "0.35\n");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", temp.resolve("o.csv").toString());
        assertEquals(2, r.code());
        assertEquals("lawful complete: " + data + ": line 1, column 'out(3)': not an element of " + reformer()
                + "; did you mean 'out[3]' (a free output)?\n", r.err());
    }

    @Test
    void aColumnWithoutBracketsOrUnderAnotherNameGetsADidYouMean() throws IOException {
        // out3 is out[3] without its brackets; nitrogen_in is the only unknown column and feed[5] the only missing
        // element
        Path data = write("in.csv", REFORMER_HEADER.replace("out[3]", "out3").replace("feed[5]", "nitrogen_in")
                + "\n1,3,0,0.05,0.02,0.01,900,0.4,0.35\n");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", temp.resolve("o.csv").toString());
        assertEquals(2, r.code());
        assertEquals("lawful complete: " + data + ": line 1, column 'out3': not an element of " + reformer()
                + "; did you mean 'out[3]' (a free output)?\n"
                + "lawful complete: " + data + ": line 1, column 'nitrogen_in': not an element of " + reformer()
                + "; did you mean 'feed[5]' (an input, the only one missing)?\n", r.err());
    }

    @Test
    void anInputNoLawUsesMayBeAbsentAndIsNamedInANote() throws IOException {
        // the reformer's laws are element balances: T (temperature) is an input of the network, not of any law
        Path data = write("in.csv", REFORMER_HEADER.replace(",T,", ",temperature,")
                + "\n1,3,0,0.05,0.02,0.01,900,0.4,0.35\n");
        Path full = temp.resolve("o.csv");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", full.toString());
        assertEquals(0, r.code(), r.err());
        assertEquals("lawful complete: note: " + data + ": ignoring column not in " + reformer() + ": temperature\n"
                + "lawful complete: note: " + data + ": no column T, not needed: no law or limit of " + reformer()
                + " involves it (if the file has it under another name, rename 'temperature' as 'T')\n", r.err());
        CsvTable t = CsvTable.read(full);
        assertEquals(-1, t.column("T"), "an absent input is not invented in the output");
        // carbon: out[2] = feed[0] + feed[2] + feed[3] - out[0] - out[3] = 1 + 0 + 0.05 - 0.4 - 0.35
        assertEquals(0.3, t.get(0, t.column("out[2]")), 1e-15);
        Captured v = run("verify", reformer(), "--in", full.toString());
        assertEquals(0, v.code(), v.err());
    }

    @Test
    void unwritableOutputIsAUsageError() throws IOException {
        Path data = write("in.csv", REFORMER_HEADER + "\n1,3,0,0.05,0.02,0.01,900,0.4,0.35\n");
        Path nowhere = temp.resolve("no-such-dir").resolve("o.csv");
        Captured r = run("complete", reformer(), "--in", data.toString(), "--out", nowhere.toString());
        assertEquals(2, r.code());
        assertEquals("lawful complete: cannot write " + nowhere + ": no such directory " + nowhere.getParent()
                + "\n", r.err());
        Captured dir = run("complete", reformer(), "--in", data.toString(), "--out", temp.toString());
        assertEquals(2, dir.code());
        assertEquals("lawful complete: cannot write " + temp + ": it is a directory\n", dir.err());
    }

    @Test
    void lawsThatCannotBeCompletedAreExitOne() throws IOException {
        Path law = write("twice.law", "input x m\noutput y m\nlaw a: y = x\nlaw b: 2 * y = 2 * x\n");
        Path data = write("in.csv", "x\n1\n");
        Captured r = run("complete", law.toString(), "--in", data.toString(), "--out", temp.resolve("o.csv").toString());
        assertEquals(1, r.code());
        // the refusal points at the law that says nothing new, the later one
        assertTrue(r.err().startsWith(law + ":4:"), r.err());
        assertTrue(r.err().contains("law 'b' is redundant: it is 2*a"), r.err());
    }

    @Test
    void usageErrorsAndHelp() {
        Captured none = run("complete", reformer(), "--in", "x.csv");
        assertEquals(2, none.code());
        assertTrue(none.err().startsWith("Missing required option: '--out=OUT'\n"), none.err());
        Captured missing = run("complete", reformer(), "--in", temp.resolve("no.csv").toString(), "--out",
                temp.resolve("o.csv").toString());
        assertEquals(2, missing.code());
        assertEquals("lawful complete: cannot read " + temp.resolve("no.csv") + ": no such file\n", missing.err());
        Captured help = run("complete", "--help");
        assertEquals(0, help.code());
        String text = LawfulTest.words(help.out());
        assertTrue(help.out().startsWith("Usage: lawful complete [-hV] [--keep-going] [--format=FORMAT] --in=DATA\n"
                + "                       --out=OUT [--columns=NAMES[,NAMES...]]... FILE.law\n"), help.out());
        assertTrue(text.contains("Caution: Exact laws do not make a surrogate valid: validate it against trusted"
                + " models and the applicable codes before it informs real decisions."), text);
        assertEquals(help.out(), run("help", "complete").out());
    }
}
