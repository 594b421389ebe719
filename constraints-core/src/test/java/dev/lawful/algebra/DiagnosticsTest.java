package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.IOException;
import java.net.URISyntaxException;
import java.net.URL;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.junit.jupiter.api.DynamicTest;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestFactory;

/**
 * Error messages, word for word.
 *
 * <p>Every {@code diagnostics/NAME.law} test resource is parsed with source name {@code NAME.law}; the
 * {@link LawException#getMessage()} it throws must equal {@code diagnostics/NAME.expected} exactly (UTF-8, no
 * final line end added), positions, source lines and caret lines included. A {@code .law} without its
 * {@code .expected} fails, and so does an {@code .expected} without its {@code .law}.
 */
class DiagnosticsTest {

    /** The cases the suite must always hold, so a deleted file cannot silently shrink it. */
    private static final List<String> REQUIRED = List.of(
            "unknown-name", "unknown-function", "misspelt-keyword", "duplicate-declaration", "duplicate-law-name",
            "vector-length-mismatch", "index-out-of-range", "slice-out-of-range", "index-scalar",
            "law-without-output", "unit-mismatch-sum", "unit-mismatch-sides", "unknown-unit", "ambiguous-unit",
            "used-before-declaration", "complete-input", "completed-twice", "two-complete", "wrong-argument-count",
            "number-glued-to-name", "unexpected-character", "deep-nesting", "several-errors", "tab-indented",
            "long-line", "limit-unit-mismatch", "limit-chain-unit-mismatch", "limit-without-output",
            "limit-not-affine", "limit-contradiction", "limit-empty-range", "limit-duplicate-name",
            "limit-mixed-relations", "law-with-inequality");

    private static Path directory() {
        URL url = DiagnosticsTest.class.getResource("/diagnostics");
        if (url == null) {
            fail("test resource folder 'diagnostics' is missing");
        }
        try {
            return Path.of(url.toURI());
        } catch (URISyntaxException e) {
            throw new IllegalStateException(e);
        }
    }

    private static List<String> names(String extension) throws IOException {
        try (Stream<Path> files = Files.list(directory())) {
            return files.map(p -> p.getFileName().toString())
                    .filter(n -> n.endsWith(extension))
                    .map(n -> n.substring(0, n.length() - extension.length()))
                    .sorted()
                    .collect(Collectors.toList());
        }
    }

    private static String read(String fileName) throws IOException {
        return Files.readString(directory().resolve(fileName), StandardCharsets.UTF_8);
    }

    private static LawException parseFails(String name, String text) {
        return assertThrows(LawException.class, () -> LawSet.parse(name, text),
                () -> name + " was expected to hold errors, but it parsed");
    }

    // ---- expectation files ----------------------------------------------------------------------------------

    @TestFactory
    Stream<DynamicTest> everyLawFileGivesItsExpectedMessage() throws IOException {
        List<String> cases = names(".law");
        assertFalse(cases.isEmpty(), "no diagnostics/*.law files found");
        return cases.stream().map(name -> DynamicTest.dynamicTest(name, () -> {
            Path expected = directory().resolve(name + ".expected");
            if (!Files.exists(expected)) {
                fail(name + ".law has no " + name + ".expected; write the message it must produce");
            }
            LawException e = parseFails(name + ".law", read(name + ".law"));
            assertEquals(read(name + ".expected"), e.getMessage(),
                    () -> name + ".law: message differs from " + name + ".expected (which holds the message"
                            + " exactly, with no final line end)");
        }));
    }

    @Test
    void everyExpectationFileHasItsLawFile() throws IOException {
        List<String> orphans = new ArrayList<>(names(".expected"));
        orphans.removeAll(names(".law"));
        assertEquals(List.of(), orphans, "expectation files without a .law file");
    }

    @Test
    void theRequiredCasesArePresent() throws IOException {
        List<String> missing = new ArrayList<>(REQUIRED);
        missing.removeAll(names(".law"));
        assertEquals(List.of(), missing, "required diagnostics cases without a .law file");
    }

    // ---- properties of a pass -------------------------------------------------------------------------------

    @Test
    void severalErrorsAreReportedInOnePassInSourceOrder() throws IOException {
        LawException e = parseFails("several-errors.law", read("several-errors.law"));
        // the syntax error of line 7 is found while parsing, before the checker finds the other three
        List<Integer> lines = e.errors().stream().map(Diagnostic::line).collect(Collectors.toList());
        assertEquals(List.of(4, 5, 6, 7), lines);
        assertEquals(e.errors(), e.diagnostics(), "no warnings expected");
    }

    @Test
    void lineEndsAreNotPartOfTheShownLine() {
        String lf = "input  x m\noutput y s\nlaw copy: y = x\n";
        String crlf = lf.replace("\n", "\r\n");
        assertEquals(parseFails("copy.law", lf).getMessage(), parseFails("copy.law", crlf).getMessage());
    }

    /** One mistake gives one message: the name glued to a number must not also cause a unit mismatch. */
    @Test
    void aNumberGluedToANameIsOneError() {
        LawException e = parseFails("glued.law", "input  x m\noutput y m\nlaw twice: y = 2x\n");
        assertEquals(List.of("expected a number, found '2x'; put a space between a number and a name"),
                messages(e), e.getMessage());
    }

    /** A rejected declaration was still written before its use, so the use must not be called premature. */
    @Test
    void aRejectedDeclarationIsNotReportedAsUsedBeforeItsDeclaration() {
        LawException e = parseFails("reserved.law", "input  exp\noutput y\nlaw e: y = exp\n");
        assertEquals("'exp' is a function name and cannot be declared", e.errors().get(0).message());
        for (Diagnostic d : e.errors()) {
            assertFalse(d.message().contains("used before its declaration"), e.getMessage());
        }
    }

    /** At most {@link Limits#MAX_ERRORS} errors are kept, and a final note says how many more there were. */
    @Test
    void errorsBeyondTheLimitAreCounted() {
        int extra = 3;
        StringBuilder text = new StringBuilder("input  x m\noutput y m\n");
        for (int i = 0; i < Limits.MAX_ERRORS + extra; i++) {
            text.append("law a").append(i).append(": y = missing").append(i).append('\n');
        }
        LawException e = parseFails("many.law", text.toString());
        assertEquals(Limits.MAX_ERRORS, e.errors().size());
        assertTrue(e.getMessage().endsWith("\n" + extra + " more errors not shown (limit " + Limits.MAX_ERRORS + ")"),
                () -> "last line of the message: " + e.getMessage().substring(e.getMessage().lastIndexOf('\n') + 1));
    }

    private static List<String> messages(LawException e) {
        return e.errors().stream().map(Diagnostic::message).collect(Collectors.toList());
    }

    // ---- Diagnostic.format ----------------------------------------------------------------------------------

    private static Diagnostic at(String text, int offset, int length, String message) {
        return new Diagnostic(Diagnostic.Severity.ERROR, new SourceText("f.law", text), new Span(offset, length),
                message);
    }

    @Test
    void caretsFollowTheTabsOfTheSourceLine() {
        String text = "input\tx m\n\toutput\ty s\n";
        int offset = text.indexOf('y');
        Diagnostic d = at(text, offset, 1, "unit mismatch");
        assertEquals(2, d.line());
        assertEquals(9, d.column());
        // a tab is copied into the caret line, so the caret stays under the place whatever the tab width
        assertEquals("f.law:2:9: unit mismatch\n\toutput\ty s\n\t      \t^", d.format());
    }

    @Test
    void aWarningSaysSo() {
        assertEquals("f.law:1:3: warning: odd\nab cd\n  ^^", new Diagnostic(Diagnostic.Severity.WARNING,
                new SourceText("f.law", "ab cd"), new Span(2, 2), "odd").format());
    }

    @Test
    void anEmptySpanGetsOneCaret() {
        assertEquals("f.law:1:4: expected a name, found end of file\nlaw\n   ^",
                at("law", 3, 0, "expected a name, found end of file").format());
    }

    /** A line of numbered cells ("0000,0001,..."), so every piece of five or more characters occurs once. */
    private static String longLine(int length) {
        StringBuilder sb = new StringBuilder();
        for (int i = 0; sb.length() < length; i++) {
            sb.append(String.format(Locale.ROOT, "%04d,", i));
        }
        return sb.substring(0, length);
    }

    /**
     * Checks a formatted finding against the contract of {@link Diagnostic#format()} for a long line: at most 120
     * characters of the line shown, "..." exactly where it was cut, the caret under the place's own character.
     *
     * @return the index in the line of the first shown character
     */
    private static int assertWindow(String line, int offset, int length, boolean cutBefore, boolean cutAfter) {
        Diagnostic d = at(line + "\n", offset, length, "here");
        String[] parts = d.format().split("\n", -1);
        assertEquals(3, parts.length, d.format());
        assertEquals("f.law:1:" + (offset + 1) + ": here", parts[0]);
        String shown = parts[1];
        assertEquals(cutBefore, shown.startsWith("..."), shown);
        assertEquals(cutAfter, shown.endsWith("..."), shown);
        String window = shown.substring(cutBefore ? 3 : 0, shown.length() - (cutAfter ? 3 : 0));
        assertEquals(cutBefore || cutAfter ? 120 : line.length(), window.length(), "characters shown");
        int from = line.indexOf(window);
        assertTrue(from >= 0, "the window is not a piece of the line: " + window);
        assertEquals(cutBefore, from > 0);
        assertEquals(cutAfter, from + window.length() < line.length());
        String carets = parts[2].trim();
        int caret = parts[2].indexOf('^');
        assertEquals(" ".repeat(caret), parts[2].substring(0, caret));
        assertEquals("^".repeat(carets.length()), carets);
        assertEquals(offset, from + caret - (cutBefore ? 3 : 0), "caret not under the place");
        assertEquals(Math.min(length, from + window.length() - offset), carets.length(), "caret count");
        return from;
    }

    @Test
    void aLongLineIsShownAsAWindowAroundThePlace() {
        String line = longLine(200);
        int middle = assertWindow(line, 100, 3, true, true);
        // "around": the place has context on both sides
        assertTrue(100 - middle >= 40 && middle + 120 - 103 >= 40, "window starts at " + middle);
        assertEquals(0, assertWindow(line, 5, 4, false, true));
        assertEquals(80, assertWindow(line, 195, 5, true, false));
        // a span running past the window is cut at its edge
        assertWindow(line, 100, 90, true, true);
    }

    @Test
    void aLineOf120CharactersIsShownWhole() {
        String line = longLine(120);
        Diagnostic d = at(line, 119, 1, "here");
        assertEquals("f.law:1:120: here\n" + line + "\n" + " ".repeat(119) + "^", d.format());
        assertWindow(longLine(121), 119, 1, true, false);
    }
}
