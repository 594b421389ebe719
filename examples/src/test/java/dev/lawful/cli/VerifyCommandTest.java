package dev.lawful.cli;

import dev.lawful.algebra.Names;
import static dev.lawful.cli.LawfulTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.cli.LawfulTest.Captured;
import java.io.IOException;
import java.net.URISyntaxException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code lawful verify}: the verdict and exit status, column matching, and every CSV problem with its line. */
class VerifyCommandTest {

    @TempDir
    Path temp;

    private static final String HEADER = "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],"
            + "out[3],out[4],out[5]";
    /**
     * Rows that balance exactly in whole mol/s: a feed of 2 CH4, 3 H2O and 1 N2 where 1 CH4 + 1 H2O became 1 CO +
     * 3 H2 (CH4 + H2O -> CO + 3 H2 keeps C, H and O), and one where that CO also shifted (CO + H2O -> CO2 + H2).
     */
    private static final String ROW1 = "2,3,0,0,0,1,900,1,2,1,0,3,1";
    private static final String ROW2 = "2,3,0,0,0,1,950,1,1,0,1,4,1";

    private Path write(String name, String text) throws IOException {
        return Files.writeString(temp.resolve(name), text, StandardCharsets.UTF_8);
    }

    private static String reformer() {
        return ExampleFiles.law("steam-reformer.law").toString();
    }

    @SuppressWarnings("unchecked")
    static Map<String, Object> object(Object o) {
        assertTrue(o instanceof Map, () -> "not a JSON object: " + o);
        return (Map<String, Object>) o;
    }

    @SuppressWarnings("unchecked")
    static List<Object> list(Object o) {
        assertTrue(o instanceof List, () -> "not a JSON array: " + o);
        return (List<Object>) o;
    }

    // ---- verdicts ------------------------------------------------------------------------------------------

    private static final String LIMITED = String.join("\n",
            "input  feed mol/s",
            "output out[2] mol/s",
            "output P kW",
            "law    split: sum(out) = feed",
            "limit  share: 0 <= out <= feed",
            "limit  rain: P >= 0",
            "");

    @Test
    void rowsInsideEveryLimitPassAndEachLimitIsReported() throws IOException {
        Path file = write("limited.law", LIMITED);
        Path data = write("full.csv", "feed,out[0],out[1],P\n3,1,2,0\n4,4,0,0.5\n");
        Captured r = run("verify", file.toString(), "--in", data.toString());
        assertEquals(0, r.code(), r.out() + r.err());
        List<String> lines = r.out().lines().toList();
        assertTrue(lines.contains("  rain: every row inside, smallest g 0 kW"), r.out());
        assertTrue(lines.contains("  share[0] (upper): every row inside, smallest g 0 mol/s"), r.out());
    }

    @Test
    void aRowOutsideALimitIsExitOneWithTheWorstValueAndItsLine() throws IOException {
        Path file = write("limited.law", LIMITED);
        // both rows obey the law split exactly; line 3 has P = -2.5 kW and out[1] = -1 mol/s
        Path data = write("full.csv", "feed,out[0],out[1],P\n3,1,2,-0.5\n3,4,-1,-2.5\n");
        Captured r = run("verify", file.toString(), "--in", data.toString());
        assertEquals(1, r.code(), r.out() + r.err());
        List<String> lines = r.out().lines().toList();
        assertTrue(lines.contains("  rain: 2 of 2 rows outside, worst g -2.5 kW at line 3"), r.out());
        assertTrue(lines.contains("  share[1] (lower): 1 of 2 rows outside, worst g -1 mol/s at line 3"), r.out());
        assertTrue(lines.contains("  share[0] (upper): 1 of 2 rows outside, worst g -1 mol/s at line 3"), r.out());
        Map<String, Object> doc = object(CheckCommandTest.Json.parse(run("verify", file.toString(), "--in", data.toString(),
                "--json").out()));
        List<Object> limits = list(doc.get("limits"));
        assertEquals(5, limits.size());
        assertEquals(Map.of("limit", "rain", "unit", "kW", "outside", 2.0, "worst", -2.5, "line", 3.0),
                limits.get(4));
        assertEquals(Map.of("limit", "share[0] (lower)", "unit", "mol/s", "outside", 0.0, "worst", 1.0, "line", 2.0),
                limits.get(0));
    }

    @Test
    void aFileWithoutLimitsHasNoLimitsInItsReport() throws IOException {
        Path data = write("full.csv", HEADER + "\n" + ROW1 + "\n");
        Captured r = run("verify", reformer(), "--in", data.toString(), "--json");
        assertFalse(object(CheckCommandTest.Json.parse(r.out())).containsKey("limits"), r.out());
    }

    @Test
    void balancedRowsPassAndTheReportStartsWithTheFiles() throws IOException {
        Path data = write("full.csv", HEADER + "\n" + ROW1 + "\n" + ROW2 + "\n");
        Captured r = run("verify", reformer(), "--in", data.toString());
        assertEquals(0, r.code(), r.err());
        assertEquals("", r.err());
        List<String> lines = r.out().lines().toList();
        assertEquals(reformer() + ": 2 rows of " + data, lines.get(0));
        assertEquals("", lines.get(1));
        assertTrue(lines.get(3).startsWith("law       unit        max"), r.out());
        assertTrue(lines.contains("carbon    mol/s         0         0         0         0         0         0"
                + "         0           0"), r.out());
        assertEquals("2 samples, relative tolerance 1e-9: every law within tolerance", lines.get(lines.size() - 1));
    }

    @Test
    void aRowOverTheToleranceIsExitOneAndNamedByItsLine() throws IOException {
        // line 4 has 2^-20 mol/s too much CO: carbon and oxygen are off, hydrogen and nitrogen are not
        String off = "2,3,0,0,0,1,900,1,2," + (1 + 0x1p-20) + ",0,3,1";
        Path data = write("full.csv", "# comment\n" + HEADER + "\n" + ROW1 + "\n" + off + "\n" + ROW2 + "\n");
        Captured r = run("verify", reformer(), "--in", data.toString());
        assertEquals(1, r.code(), r.out());
        assertEquals("", r.err());
        assertTrue(r.out().contains("3 samples, relative tolerance 1e-9: 1 sample over tolerance for at least one"
                + " law\n  carbon: 1 sample over tolerance; worst line 4 (relative residual "), r.out());
        assertTrue(r.out().contains("\n  oxygen: 1 sample over tolerance; worst line 4 ("), r.out());
        assertTrue(!r.out().contains("  hydrogen:") && !r.out().contains("  nitrogen:"), r.out());
        // the carbon law's terms are of order 1 mol/s, so a 2^-20 (about 1e-6) error passes a tolerance of 1e-2
        assertEquals(0, run("verify", reformer(), "--in", data.toString(), "--tol", "1e-2").code());

        Captured json = run("verify", reformer(), "--in", data.toString(), "--json");
        assertEquals(1, json.code());
        Map<String, Object> doc = object(CheckCommandTest.Json.parse(json.out()));
        assertEquals(List.of("file", "data", "ignoredColumns", "absentColumns", "report", "worst"), List.copyOf(doc.keySet()));
        assertEquals(reformer(), doc.get("file"));
        assertEquals(data.toString(), doc.get("data"));
        Map<String, Object> report = object(doc.get("report"));
        assertEquals(Boolean.FALSE, report.get("withinTolerance"));
        assertEquals(1.0, report.get("failingSamples"));
        Map<String, Object> carbon = object(list(report.get("laws")).get(0));
        assertEquals("carbon", carbon.get("name"));
        assertEquals(0x1p-20, (Double) object(carbon.get("absolute")).get("max"), 0x1p-60,
                "the residual in mol/s is the CO error");
        assertEquals(Map.of("law", "carbon", "line", 4.0), object(list(doc.get("worst")).get(0)));
    }

    @Test
    void nanInTheDataFailsEveryLawItReaches() throws IOException {
        Path data = write("full.csv", HEADER + "\n" + ROW1.replaceFirst("^2,", "NaN,") + "\n");
        Captured r = run("verify", reformer(), "--in", data.toString());
        assertEquals(1, r.code());
        assertTrue(r.out().contains("  carbon: 1 sample over tolerance; worst line 2 (1 NaN or infinite)"), r.out());
    }

    @Test
    void columnsMayComeInAnyOrderAndUnknownOnesAreIgnoredWithANote() throws IOException {
        List<String> names = List.of(HEADER.split(","));
        List<String> values = List.of(ROW1.split(","));
        StringBuilder header = new StringBuilder("id");
        StringBuilder row = new StringBuilder("17");
        for (int i = names.size() - 1; i >= 0; i--) {
            header.append(',').append(names.get(i));
            row.append(',').append(values.get(i));
        }
        Path data = write("reversed.csv", header + ",\"a note\"\n" + row + ",text\n");
        Captured r = run("verify", reformer(), "--in", data.toString());
        assertEquals(0, r.code(), r.err());
        assertEquals("lawful verify: note: " + data + ": ignoring 2 columns not in " + reformer() + ": id, a note\n",
                r.err());
        Map<String, Object> doc = object(CheckCommandTest.Json.parse(run("verify", reformer(), "--in",
                data.toString(), "--json").out()));
        assertEquals(List.of("id", "a note"), doc.get("ignoredColumns"));
    }

    // ---- CSV problems: exit 2, word for word ---------------------------------------------------------------

    private void assertCsvProblem(String text, String expected) throws IOException {
        Path data = write("bad.csv", text);
        Captured r = run("verify", reformer(), "--in", data.toString());
        assertEquals(2, r.code(), r.err());
        assertEquals("", r.out());
        assertEquals(expected.replace("@CSV@", data.toString()).replace("@LAW@", reformer()) + "\n", r.err());
    }

    @Test
    void misnamedAndMissingColumnsAreNamedWithTheNearestElement() throws IOException {
        assertCsvProblem(HEADER.replace("out[2]", "ot[2]").replace("feed[0]", "Temp") + "\n" + ROW1 + "\n",
                "lawful verify: @CSV@: line 1, column 'ot[2]': not an element of @LAW@; did you mean 'out[2]' (an"
                        + " output)?\nlawful verify: @CSV@: line 1, column 'Temp': not an element of @LAW@; did you mean"
                        + " 'feed[0]' (an input, the only one missing)?");
        assertCsvProblem("# header next\n" + HEADER.replace(",out[5]", "") + "\n" + ROW1.substring(0,
                ROW1.lastIndexOf(',')) + "\n", "lawful verify: @CSV@: line 2: no column 'out[5]' (an output of @LAW@)");
        assertCsvProblem(HEADER.replace("feed[4]", "FEED[4]") + "\n" + ROW1 + "\n",
                "lawful verify: @CSV@: line 1, column 'FEED[4]': not an element of @LAW@; did you mean 'feed[4]' (an"
                        + " input)?");
    }

    @Test
    void manyMissingColumnsAreNamedUpToALimitAndCounted() throws IOException {
        StringBuilder law = new StringBuilder("input a[30] kg\noutput b[30] kg\nlaw each: b = a\n");
        Path file = write("wide.law", law.toString());
        Path data = write("none.csv", "x\n1\n");
        Captured r = run("verify", file.toString(), "--in", data.toString());
        assertEquals(2, r.code());
        List<String> lines = r.err().lines().toList();
        assertEquals(DataFiles.MAX_NAMED + 1, lines.size(), r.err());
        assertEquals("lawful verify: " + data + ": line 1: no column 'a[0]' (an input of " + file + ")", lines.get(0));
        assertEquals("lawful verify: " + data + ": line 1: and 40 more missing columns", lines.get(lines.size() - 1));
    }

    @Test
    void spellingHelpFollowsTheLawLanguageRule() {
        // Source: the rule of the law language's own spelling help (DEVELOPERS.md, dev.lawful.algebra.Names)
        assertEquals("out[2]", Names.nearest("OUT[2]", List.of("out[2]", "out[3]")), "case only");
        assertEquals("out[2]", Names.nearest("ot[2]", List.of("out[2]", "feed[2]")), "a dropped letter");
        assertEquals("out[3]", Names.nearest("out(3)", List.of("out[3]", "feed[3]")), "two replaced");
        assertEquals(null, Names.nearest("pressure", List.of("out[3]", "T")), "nothing near");
        assertEquals("T", Names.nearest("t", List.of("T", "x")), "case, even for one letter");
        assertEquals(null, Names.nearest("x", List.of("y")), "one-letter names differ by more than a letter");
        assertEquals(null, Names.nearest("a".repeat(65), List.of("a".repeat(64))), "long names: case only");
        assertEquals(2, Names.distance("feed_0", "feed[0]"));
        assertEquals(1, Names.distance("otu", "out"), "a swap of neighbours counts once");
    }

    @Test
    void rowsOfTheWrongLengthAndValuesThatAreNotNumbersNameTheirLine() throws IOException {
        assertCsvProblem(HEADER + "\n" + ROW1 + "\n\n" + ROW1 + ",5\n",
                "lawful verify: @CSV@: line 4: expected 13 values, found 14");
        assertCsvProblem(HEADER + "\n" + ROW1 + "\n" + ROW1.replace(",950,", ",").replace(",900,", ",abc,") + "\n",
                "lawful verify: @CSV@: line 3, column 'T': 'abc' is not a number");
        assertCsvProblem(HEADER + "\n" + ROW1.replace(",900,", ",,") + "\n",
                "lawful verify: @CSV@: line 2, column 'T': the value is empty; expected a number");
    }

    @Test
    void emptyFilesAndBadHeadersAreCsvProblems() throws IOException {
        assertCsvProblem("", "lawful verify: @CSV@: the file has no header row; expected a first line naming the"
                + " columns");
        assertCsvProblem(HEADER + ",T\n", "lawful verify: @CSV@: line 1, column 'T': the name appears twice in the"
                + " header (columns 7 and 14)");
        assertCsvProblem(HEADER + "\n# no rows yet\n", "lawful verify: @CSV@: no data rows after the header (line 1)");
    }

    @Test
    void unreadableFilesAreUsageErrors() {
        Path missing = temp.resolve("no.csv");
        Captured r = run("verify", reformer(), "--in", missing.toString());
        assertEquals(2, r.code());
        assertEquals("lawful verify: cannot read " + missing + ": no such file\n", r.err());
        Captured dir = run("verify", reformer(), "--in", temp.toString());
        assertEquals(2, dir.code());
        assertEquals("lawful verify: cannot read " + temp + ": it is a directory\n", dir.err());
        Path law = temp.resolve("no.law");
        Captured noLaw = run("verify", law.toString(), "--in", missing.toString());
        assertEquals(2, noLaw.code());
        assertEquals("lawful verify: cannot read " + law + ": no such file\n", noLaw.err());
    }

    @Test
    void lawFileWithErrorsIsExitOneWithTheCoreMessages() throws IOException, URISyntaxException {
        Path broken = Path.of(VerifyCommandTest.class.getResource("/check/broken.law").toURI());
        Path data = write("full.csv", HEADER + "\n" + ROW1 + "\n");
        Captured r = run("verify", broken.toString(), "--in", data.toString());
        assertEquals(1, r.code());
        assertEquals("", r.out());
        assertEquals(run("check", broken.toString()).err(), r.err(), "the same findings as lawful check");
    }

    // ---- options and help ----------------------------------------------------------------------------------

    @Test
    void toleranceMustBeAFiniteNumberAtLeastZero() throws IOException {
        Path data = write("full.csv", HEADER + "\n" + ROW1 + "\n");
        for (String bad : List.of("-1", "NaN", "Infinity")) {
            Captured r = run("verify", reformer(), "--in", data.toString(), "--tol", bad);
            assertEquals(2, r.code(), bad);
            assertEquals("", r.out());
            assertTrue(r.err().startsWith("--tol must be a finite number >= 0, found " + Double.parseDouble(bad)
                    + "\nRun 'lawful verify --help' for the options and what they do.\n"), r.err());
        }
        Captured text = run("verify", reformer(), "--in", data.toString(), "--tol", "abc");
        assertEquals(2, text.code());
        assertTrue(text.err().contains("'abc'"), text.err());
        assertEquals(0, run("verify", reformer(), "--in", data.toString(), "--tol", "0").code(),
                "exactly balanced rows pass a tolerance of 0");
    }

    @Test
    void helpJustifiesTheDefaultToleranceAndCarriesTheCaution() {
        Captured r = run("verify", "--help");
        assertEquals(0, r.code());
        assertTrue(r.out().startsWith("Usage: lawful verify [-hV] [--json] [--format=FORMAT] --in=DATA [--tol=T]\n"
                + "                     [--columns=NAMES[,NAMES...]]... FILE.law\n"), r.out());
        String text = LawfulTest.words(r.out());
        assertTrue(text.contains("(default: 1e-9). Laws completed in double hold to a few 1e-16 of their scale"),
                text);
        assertTrue(text.contains("use about 1e-6 for outputs computed in float32"), text);
        assertTrue(text.contains("Exit status: 0 every row obeys every law within the tolerance 1 a relative residual"
                + " is over the tolerance (or NaN), or the law file has errors 2 usage error"), text);
        assertTrue(text.contains("Caution: Exact laws do not make a surrogate valid: validate it against trusted"
                + " models and the applicable codes before it informs real decisions."), text);
        Captured none = run("verify", reformer());
        assertEquals(2, none.code());
        assertTrue(none.err().startsWith("Missing required option: '--in=DATA'\n"), none.err());
    }
}
