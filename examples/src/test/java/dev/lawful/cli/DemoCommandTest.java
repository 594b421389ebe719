package dev.lawful.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code lawful demo}: a tiny run through the command line, its caution, and usage errors word for word. */
class DemoCommandTest {

    @Test
    void aTinyRunPrintsTheTableTheVerdictAndWhereTheReportIs(@TempDir Path dir) {
        LawfulTest.Captured r = LawfulTest.run("demo", "exchanger", "--samples", "200", "--epochs", "2", "--quiet",
                "--out", dir.toString());
        assertEquals(0, r.code(), r.err());
        assertTrue(r.out().startsWith("== Counterflow heat exchanger"), r.out());
        assertTrue(r.out().contains("Caution: the exchanger model is a demonstration"), r.out());
        assertTrue(r.out().contains("  exact          0 of 40\n"), r.out());
        assertTrue(r.out().contains("Report and plots: " + dir.resolve("exchanger").toAbsolutePath()), r.out());
        assertTrue(Files.exists(dir.resolve("exchanger").resolve("residuals.png")));
        // --quiet: no progress bars (only the native library's own version warning may appear)
        assertTrue(!r.err().contains("exchanger: exact"), r.err());
    }

    @Test
    void noProgressBarsWhenStandardErrorIsNotATerminal(@TempDir Path dir) {
        // a log file or a pipe must not collect bars redrawn with carriage returns (common practice for command-line
        // tools); LawfulTest.run tells the command that standard error is not a terminal
        LawfulTest.Captured r = LawfulTest.run("demo", "exchanger", "--samples", "200", "--epochs", "2", "--out",
                dir.toString());
        assertEquals(0, r.code(), r.err());
        assertTrue(!r.err().contains("\r") && !r.err().contains("exchanger: exact"), r.err());
        assertTrue(r.out().contains("  exact          0 of 40\n"), r.out());
    }

    @Test
    void helpCarriesTheCaution() {
        LawfulTest.Captured r = LawfulTest.run("demo", "--help");
        assertEquals(0, r.code());
        assertTrue(LawfulTest.words(r.out()).contains("Caution: The scenarios are demonstrations with simplified"
                + " physics and demo parameters. A surrogate that obeys its laws can still be wrong; no result here is"
                + " a basis for operating or designing real plant or forecasts without validation against trusted"
                + " models, the applicable codes and licensed review."), r.out());
    }

    @Test
    void anUnknownScenarioOrBadSizesAreUsageErrors() {
        LawfulTest.Captured r = LawfulTest.run("demo", "reformr");
        assertEquals(Lawful.EXIT_USAGE, r.code());
        assertEquals("lawful demo: unknown scenario 'reformr'; choose one of reformer, column, exchanger or all"
                + " (did you mean 'reformer'?)\n", r.err());
        r = LawfulTest.run("demo", "column", "--epochs", "0");
        assertEquals(Lawful.EXIT_USAGE, r.code());
        assertEquals("lawful demo: --epochs must be at least 1 and --samples at least 10\n", r.err());
    }

    @Test
    void aBadOutFolderFailsBeforeAnyTraining(@TempDir Path dir) throws Exception {
        Path file = Files.writeString(dir.resolve("report.txt"), "x");
        LawfulTest.Captured r = LawfulTest.run("demo", "reformer", "--quiet", "--out", file.toString());
        assertEquals(Lawful.EXIT_USAGE, r.code());
        assertEquals("lawful demo: --out " + file + " is a file; give a folder (it is created if missing)\n",
                r.err());
        assertEquals("", r.out(), "nothing was trained: no table, no caution header");
        Path under = dir.resolve("report.txt").resolve("sub");
        r = LawfulTest.run("demo", "column", "--quiet", "--out", under.toString());
        assertEquals(Lawful.EXIT_USAGE, r.code());
        assertEquals("lawful demo: cannot write the report to " + under + ": " + file
                + " is a file, not a folder; give a writable folder with --out\n", r.err());
        assertEquals("", r.out());
    }

    @Test
    void helpPrintsNoFormattingWarnings() {
        // picocli reports a format error (such as a lone '%') on the JVM's standard error, not on the command's
        PrintStream realErr = System.err;
        ByteArrayOutputStream leaked = new ByteArrayOutputStream();
        LawfulTest.Captured r;
        try {
            System.setErr(new PrintStream(leaked, true, StandardCharsets.UTF_8));
            r = LawfulTest.run("demo", "--help");
        } finally {
            System.setErr(realErr);
        }
        assertEquals(0, r.code());
        assertEquals("", leaked.toString(StandardCharsets.UTF_8));
        assertEquals("", r.err());
        assertTrue(LawfulTest.words(r.out()).contains("rows generated, 80% for training"), r.out());
    }
}
