package dev.lawful.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.Charset;
import java.nio.charset.StandardCharsets;
import org.junit.jupiter.api.Test;

/** The top command: help, version, usage errors, and that nothing reaches the real standard streams. */
class LawfulTest {

    /** What one run of the command line printed, line ends normalised to {@code \n}. */
    record Captured(int code, String out, String err) {
    }

    /** Runs the command line with both streams captured in UTF-8. */
    static Captured run(String... args) {
        return run(StandardCharsets.UTF_8, args);
    }

    /** Runs the command line with both streams captured in {@code charset}. */
    static Captured run(Charset charset, String... args) {
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        ByteArrayOutputStream err = new ByteArrayOutputStream();
        int code = Lawful.run(new PrintStream(out, true, charset), new PrintStream(err, true, charset), args);
        return new Captured(code, normalise(out.toString(charset)), normalise(err.toString(charset)));
    }

    private static String normalise(String s) {
        return s.replace("\r\n", "\n");
    }

    /** @return the text with every run of white space (line ends included) made one space */
    static String words(String s) {
        return s.replaceAll("\\s+", " ").trim();
    }

    @Test
    void helpListsTheCommandsAndCarriesTheCaution() {
        Captured r = run("--help");
        assertEquals(0, r.code());
        assertEquals("", r.err());
        assertTrue(r.out().startsWith("Usage: lawful [-hV] COMMAND\n"), r.out());
        assertTrue(r.out().contains("\n  check "), r.out());
        assertTrue(r.out().contains("\n  complete "), r.out());
        assertTrue(r.out().contains("\n  verify "), r.out());
        assertTrue(r.out().contains("\n  demo "), r.out());
        assertTrue(r.out().contains("\n  help "), r.out());
        String text = words(r.out());
        assertTrue(text.contains("Caution: Lawful makes a surrogate obey the laws you write; it does not make the"
                + " surrogate valid or safe. Validate it against trusted models and the applicable codes, and have it"
                + " reviewed by a licensed professional, before it informs any real decision."), text);
        assertTrue(text.contains("Exit status: 0 success 1 the law file has errors, the data break a law (verify),"
                + " or a row cannot be completed (complete) 2 usage error, or a file that cannot be read or is"
                + " malformed 3 internal error (a bug)"), text);
        assertEquals(r.out(), run("-h").out());
    }

    @Test
    void versionIsPrintedByEveryCommand() {
        for (String[] args : new String[][] {{"--version"}, {"-V"}, {"check", "--version"}, {"verify", "-V"},
            {"complete", "--version"}}) {
            Captured r = run(args);
            assertEquals(0, r.code(), String.join(" ", args));
            assertEquals("lawful 0.1.0-SNAPSHOT\n", r.out());
            assertEquals("", r.err());
        }
    }

    @Test
    void helpCommandShowsTheHelpOfACommand() {
        Captured r = run("help", "check");
        assertEquals(0, r.code());
        assertTrue(r.out().startsWith("Usage: lawful check [-hV] [--json] FILE.law\n"), r.out());
        assertEquals(r.out(), run("check", "--help").out());
        assertEquals(run("--help").out(), run("help").out());
    }

    @Test
    void noCommandIsAUsageError() {
        Captured r = run();
        assertEquals(2, r.code());
        assertEquals("", r.out());
        assertEquals("Missing required command (try 'lawful check FILE.law')\nRun 'lawful --help' for the options"
                + " and what they do.\n", r.err());
    }

    @Test
    void unknownCommandsAndOptionsAreUsageErrors() {
        Captured option = run("--frobnicate");
        assertEquals(2, option.code());
        assertEquals("", option.out());
        assertTrue(option.err().startsWith("Unknown option: '--frobnicate'\n"), option.err());

        Captured command = run("frobnicate");
        assertEquals(2, command.code());
        assertEquals("", command.out());
        assertTrue(command.err().contains("frobnicate"), command.err());
        assertTrue(command.err().endsWith("\nRun 'lawful --help' for the options and what they do.\n"),
                command.err());
        assertTrue(!command.err().contains("Usage:"), "no whole help after a usage error: " + command.err());
        assertTrue(!command.err().contains("Did you mean"), "nothing is near 'frobnicate': " + command.err());

        Captured near = run("verfy", "a.law");
        assertEquals(2, near.code());
        assertTrue(near.err().startsWith("Unmatched arguments from index 0: 'verfy', 'a.law'\nDid you mean 'lawful"
                + " verify'?\nRun 'lawful --help' for the options and what they do.\n"), near.err());
    }

    @Test
    void controlCharactersFromAFileAreShownEscapedNotSentToTheTerminal(@org.junit.jupiter.api.io.TempDir
                                                                        java.nio.file.Path temp) throws Exception {
        // ESC [ 2 J clears an ANSI terminal (Source: ECMA-48, 5th edition, control functions ED and CSI); U+202E
        // reverses the text shown after it (Source: Unicode Standard Annex #9, explicit directional overrides)
        java.nio.file.Path law = java.nio.file.Files.writeString(temp.resolve("evil.law"),
                "output y\nlaw a: y = \u001b[2J\u202Ez\n", StandardCharsets.UTF_8);
        Captured r = run("check", law.toString());
        assertEquals(1, r.code());
        assertTrue(r.err().contains("\\u001B[2J\\u202Ez"), r.err());
        for (char c : r.err().toCharArray()) {
            assertTrue(c >= 0x20 && c != 0x7f && c != 0x202e || c == '\n', "raw control character "
                    + Integer.toHexString(c) + " in: " + r.err());
        }
    }

    @Test
    void printableKeepsLineStructureAndEscapesEveryOtherControl() {
        // C0 controls are U+0000..U+001F, DEL U+007F, C1 U+0080..U+009F (Source: ISO/IEC 6429 / ECMA-48 code
        // table); U+200B is category Cf (Source: Unicode Character Database, UnicodeData.txt)
        assertEquals("a\tb\r\nc", Printable.escape("a\tb\r\nc"));
        assertEquals("\\u0007\\u0008\\u007F\\u009B\\u200B", Printable.escape("\u0007\b\u007f\u009b\u200b"));
        assertEquals("température 1e-3 µ", Printable.escape("température 1e-3 µ"));
    }

    @Test
    void nothingReachesTheRealStandardStreams() {
        PrintStream realOut = System.out;
        PrintStream realErr = System.err;
        ByteArrayOutputStream leaked = new ByteArrayOutputStream();
        PrintStream trap = new PrintStream(leaked, true, StandardCharsets.UTF_8);
        Captured help;
        Captured bad;
        try {
            System.setOut(trap);
            System.setErr(trap);
            help = run("--help");
            bad = run("check", "--bogus", "x.law");
        } finally {
            System.setOut(realOut);
            System.setErr(realErr);
        }
        assertEquals("", leaked.toString(StandardCharsets.UTF_8));
        assertEquals(0, help.code());
        assertTrue(help.out().contains("Usage: lawful"), help.out());
        assertEquals(2, bad.code());
        assertTrue(bad.err().contains("Unknown option: '--bogus'"), bad.err());
    }
}
