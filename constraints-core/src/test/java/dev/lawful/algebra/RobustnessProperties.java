package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertDoesNotThrow;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.io.File;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;

import org.junit.jupiter.api.Test;

/**
 * Whatever text it is given, {@link LawSet#parse(String, String)} either returns a law set or throws a
 * {@link LawException} whose every diagnostic points inside the text; it never throws anything else, never
 * overflows the stack and never hangs, and law text reaches nothing but arithmetic.
 *
 * <p>The random properties run a fixed number of seeded trials through {@link Trials}; a failure reports the seed
 * that reproduces it and the input, escaped. Unlike the property-testing library these tests first used, nothing
 * shrinks a failing input to a smallest one, and the seeds are fixed, so every run checks the same inputs.
 */
class RobustnessProperties {

    /** A hang guard only: every input here is expected to be answered in well under a second. */
    private static final Duration GUARD = Duration.ofSeconds(10);
    /**
     * The child JVM's guard: it starts a JVM and, for the largest vector law, expands, compiles and evaluates 100,000
     * scalar laws (about 3 s on an idle 2-core machine, up to four times that on a loaded one). A quadratic
     * expansion took over 300 s, so this still tells linear from quadratic.
     */
    private static final Duration CHILD_GUARD = Duration.ofSeconds(45);

    private static final String REFORMER = String.join("\n",
            "# steam reformer outlet: element balances",
            "input  feed[6]   mol/s        # CH4 H2O CO CO2 H2 N2",
            "output out[6]    mol/s",
            "const  C = [1, 0, 1, 1, 0, 0]",
            "const  H = [4, 2, 0, 0, 2, 0]",
            "const  O = [0, 1, 1, 2, 0, 0]",
            "law carbon:    sum(C * out) = sum(C * feed)",
            "law hydrogen:  sum(H * out) = sum(H * feed)",
            "law oxygen:    sum(O * out) = sum(O * feed)",
            "complete out[0], out[1], out[2]",
            "");

    private static final String HEAT = String.join("\n",
            "input  m_dot      kg/s",
            "input  T_in       K",
            "input  T_out      K",
            "input  Q_loss     kW",
            "output P          W",
            "output eta",
            "const  cp = 4.186 kJ/(kg K)",
            "let    dT = T_out - T_in",
            "law energy: P = m_dot * cp * dT +",
            "                Q_loss",
            "law efficiency: eta * P = m_dot * cp * dT",
            "complete P",
            "");

    private static final String MIXED = String.join("\n",
            "input x[4]",
            "input s",
            "output y[4]",
            "output z",
            "const k = [1, -2.5, 3e-3, 6.02e23]",
            "let g = exp(-x^2) * k + sqrt(1 + x[0:4]^2)",
            "let h = dot(x, k) / (1 + s^2)",
            "law vec: y = g - log(1 + abs(x)) * sign(s) + pow(2, -x)",
            "law scal: z^3 = sum(y[1:3]) + h + tanh(s) - atan(x[2]) + asin(0.5) * acos(0.25)",
            "law trig: sin(z) = cos(s) * tan(0.1) + sinh(s) - cosh(x[3]) + log10(2 + s^2) + -(-z)^2",
            "law lit: [y[0], y[1]] = [x[0] * 2, (x[1] + 1) / 3]",
            "complete y, z",
            "");

    private static final String BOUNDED = String.join("\n",
            "input  feed[3] mol/s",
            "input  dt s",
            "output out[3]  mol/s",
            "output q[3]    mol",
            "output T       K",
            "const  T_max = 400 K",
            "law    total: sum(out) = sum(feed)",
            "limit  dry:   q + out * dt >= 0",
            "limit  share: 0 <= out <=",
            "              feed",
            "limit  cap:   T_max >= T >= 0",
            "");

    private static final List<String> VALID = List.of(REFORMER, HEAT, MIXED, BOUNDED);

    /**
     * Fragments that mutations insert: tokens of the language, near-misses, units and hostile characters. Vector
     * lengths stay moderate here: what a legal vector of the maximal length costs is checked on its own, in a
     * child JVM, by {@link #theLargestVectorLawIsAnsweredPromptly()}.
     */
    private static final List<String> FRAGMENTS = List.of("(", ")", "[", "]", ",", ":", "=", "^", "-", "+", "*", "/",
            ".", "#", "\n", "\r\n", "\t", " ", "law ", "input ", "output ", "const ", "let ", "complete ", "sum(",
            "dot(", "pow(", "exp(", "x", "out", "feed[6]", "[1000]", "[100001]", "[0:0]", "[3:1]", "1e308", "1e309",
            "1e-400", "0", "007", "1.", ".5", "1e", "NaN", "Infinity", "kJ", "m^64", "m^65", "m^-2", "J/(kg K)",
            "J/kg K", "degC", "\u00b5s", "\u00b0", "\u03a9", "\u00b7", "\u0000", "\uFFFD", "\uD83D\uDE00", "\uD800", "$",
            "\"", "'", "\\", "@", "{", "}", ";", "?", "!", "&&", "System.exit(1)", "99999999999999999999", "law:",
            ": :", "= =", "^^", "--", "[[", "]]", "((", "))", "limit ", "<=", ">=", "<", ">", "=<", "<==",
            "\u2264");

    // ---- properties ------------------------------------------------------------------------------------------

    @Test
    void randomBytesParseOrFailWithPositionedDiagnostics() {
        Trials.run("randomBytesParseOrFailWithPositionedDiagnostics", 0x0B57_0001L, 400, r -> {
            byte[] bytes = bytes(r, 700);
            checkInput(new String(bytes, StandardCharsets.UTF_8));
            checkInput(new String(bytes, StandardCharsets.ISO_8859_1));
        });
    }

    @Test
    void randomTokenSoupParsesOrFailsCleanly() {
        Trials.run("randomTokenSoupParsesOrFailsCleanly", 0x0B57_0002L, 400, r -> checkInput(tokenSoup(r)));
    }

    @Test
    void mutatedLawFilesParseOrFailCleanly() {
        Trials.run("mutatedLawFilesParseOrFailCleanly", 0x0B57_0003L, 1500, r -> checkInput(mutate(r)));
    }

    @Test
    void theUnmutatedFilesAreValid() {
        // the mutation property only means something if it starts from valid files
        for (String text : VALID) {
            LawSet laws = assertDoesNotThrow(() -> LawSet.parse("<valid>", text));
            assertEquals(laws, LawSet.parse("<again>", laws.toString()));
        }
    }

    /**
     * @return 0 to {@code max} random bytes; now and then an edge instead: no bytes, one byte that is 0, -1, 127 or
     *         -128, or {@code max} bytes all of one such value
     */
    static byte[] bytes(SplittableRandom r, int max) {
        if (r.nextInt(20) == 0) {
            byte b = (byte) Trials.pick(r, List.of(0, -1, 127, -128)).intValue();
            byte[] edge = new byte[Trials.pick(r, List.of(0, 1, max))];
            java.util.Arrays.fill(edge, b);
            return edge;
        }
        byte[] bytes = new byte[Trials.size(r, max)];
        r.nextBytes(bytes);
        return bytes;
    }

    /** @return 0 to 80 fragments, each drawn from {@link #FRAGMENTS}, joined */
    static String tokenSoup(SplittableRandom r) {
        int n = Trials.size(r, 80);
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < n; i++) {
            sb.append(Trials.pick(r, FRAGMENTS));
        }
        return sb.toString();
    }

    /** Applies one to six random edits to one of the valid files. */
    static String mutate(SplittableRandom r) {
        StringBuilder sb = new StringBuilder(VALID.get(r.nextInt(VALID.size())));
        int edits = 1 + r.nextInt(6);
        for (int e = 0; e < edits; e++) {
            int at = sb.length() == 0 ? 0 : r.nextInt(sb.length() + 1);
            switch (r.nextInt(9)) {
                case 0: // delete a few characters
                    sb.delete(at, Math.min(sb.length(), at + 1 + r.nextInt(4)));
                    break;
                case 1: // insert a character, any code unit
                    sb.insert(at, (char) r.nextInt(0x10000));
                    break;
                case 2: // replace a character with one of the language's own
                    if (at < sb.length()) {
                        String own = "()[],:=^-+*/.#\n 0123456789xyz_";
                        sb.setCharAt(at, own.charAt(r.nextInt(own.length())));
                    }
                    break;
                case 3: // insert a fragment
                    sb.insert(at, FRAGMENTS.get(r.nextInt(FRAGMENTS.size())));
                    break;
                case 4: { // duplicate a line
                    String[] lines = sb.toString().split("\n", -1);
                    int i = r.nextInt(lines.length);
                    sb.insert(Math.min(sb.length(), lineStart(lines, i)), lines[i] + "\n");
                    break;
                }
                case 5: { // swap two lines
                    List<String> lines = new ArrayList<>(List.of(sb.toString().split("\n", -1)));
                    java.util.Collections.swap(lines, r.nextInt(lines.size()), r.nextInt(lines.size()));
                    sb = new StringBuilder(String.join("\n", lines));
                    break;
                }
                case 6: // truncate
                    sb.setLength(at);
                    break;
                case 7: { // delete a whole token-like run
                    int end = at;
                    while (end < sb.length() && Character.isLetterOrDigit(sb.charAt(end))) {
                        end++;
                    }
                    sb.delete(at, Math.max(end, Math.min(sb.length(), at + 1)));
                    break;
                }
                default: // repeat a slice many times
                    int end = Math.min(sb.length(), at + 1 + r.nextInt(12));
                    String piece = sb.substring(at, end);
                    sb.insert(at, piece.repeat(1 + r.nextInt(40)));
            }
        }
        return sb.toString();
    }

    private static int lineStart(String[] lines, int i) {
        int offset = 0;
        for (int k = 0; k < i; k++) {
            offset += lines[k].length() + 1;
        }
        return offset;
    }

    // ---- the contract ------------------------------------------------------------------------------------------

    /** {@link #check(String)}, with the input, escaped, in the message of any failure. */
    private static void checkInput(String text) {
        try {
            check(text);
        } catch (AssertionError | RuntimeException | StackOverflowError e) {
            throw new AssertionError(e + "\ninput (" + text.length() + " characters): " + escape(text), e);
        }
    }

    /** @return {@code text} as a Java string literal, non-printable ASCII escaped, cut after 4000 characters */
    private static String escape(String text) {
        StringBuilder sb = new StringBuilder("\"");
        for (int i = 0; i < Math.min(text.length(), 4000); i++) {
            char c = text.charAt(i);
            if (c == '"' || c == '\\') {
                sb.append('\\').append(c);
            } else if (c == '\n') {
                sb.append("\\n");
            } else if (c >= 0x20 && c < 0x7f) {
                sb.append(c);
            } else {
                sb.append(String.format("\\u%04x", (int) c));
            }
        }
        return sb.append(text.length() > 4000 ? "\"..." : "\"").toString();
    }

    /**
     * Parses {@code text}: a law set must print back to an equal law set, and an error must be a
     * {@link LawException} with well-placed diagnostics. Any other throwable propagates and fails the property.
     */
    static void check(String text) {
        LawSet laws;
        long start = System.nanoTime();
        try {
            laws = LawSet.parse("<fuzz>", text);
        } catch (LawException e) {
            checkDiagnostics(text, e);
            return;
        } finally {
            long elapsed = System.nanoTime() - start;
            assertTrue(elapsed < GUARD.toNanos(), () -> "took " + elapsed / 1_000_000 + " ms: " + abbreviate(text));
        }
        assertNotNull(laws);
        String printed = laws.toString();
        assertEquals(laws, LawSet.parse("<printed>", printed), () -> "input:\n" + text + "\nprinted:\n" + printed);
    }

    /** Every diagnostic lies inside its text: offset and end within it, line and column on an existing line. */
    static void checkDiagnostics(String text, LawException e) {
        assertFalse(e.errors().isEmpty(), "a LawException carries at least one error");
        assertNotNull(e.getMessage());
        for (Diagnostic d : e.diagnostics()) {
            String source = d.source().text();
            if (text.length() <= Limits.MAX_SOURCE_CHARS) {
                assertEquals(text, source, "diagnostics refer to the text that was parsed");
            }
            int length = source.length();
            Span span = d.span();
            assertTrue(span.offset() >= 0 && span.offset() <= length, () -> "offset " + span + " outside 0.." + length
                    + " for: " + d.message());
            assertTrue(span.end() <= length, () -> "end of " + span + " beyond " + length + " for: " + d.message());
            String[] lines = source.split("\n", -1);
            int line = d.line();
            assertTrue(line >= 1 && line <= lines.length, () -> "line " + line + " outside 1.." + lines.length);
            int column = d.column();
            assertTrue(column >= 1 && column <= lines[line - 1].length() + 1,
                    () -> "column " + column + " outside line " + line + " of length " + lines[line - 1].length());
            String formatted = d.format();
            assertTrue(formatted.startsWith(d.source().name() + ":" + line + ":" + column + ": "), formatted);
        }
    }

    /** Parses hostile text under the hang guard and requires a clean {@link LawException}. */
    private static LawException rejects(String text) {
        LawException[] thrown = new LawException[1];
        assertTimeoutPreemptively(GUARD, () -> {
            try {
                LawSet.parse("<hostile>", text);
            } catch (LawException e) {
                thrown[0] = e;
            }
        });
        if (thrown[0] == null) {
            fail("expected a LawException for: " + abbreviate(text));
        }
        checkDiagnostics(text, thrown[0]);
        return thrown[0];
    }

    private static String abbreviate(String s) {
        return s.length() <= 200 ? s : s.substring(0, 200) + "... (" + s.length() + " characters)";
    }

    private static boolean mentions(LawException e, String fragment) {
        return e.errors().stream().anyMatch(d -> d.message().contains(fragment));
    }

    // ---- targeted hostile inputs -------------------------------------------------------------------------------

    private static final String HEAD = "input x\noutput y\n";

    @Test
    void hundredThousandNestedParentheses() {
        LawException e = rejects(HEAD + "law l: y = " + "(".repeat(100_000) + "x" + ")".repeat(100_000) + "\n");
        assertTrue(mentions(e, "nested deeper than the limit of " + Limits.MAX_NESTING_DEPTH), e.getMessage());
        rejects(HEAD + "law l: y = " + "(".repeat(100_000) + "\n");
        rejects(HEAD + "law l: y = " + "[".repeat(100_000) + "x" + "]".repeat(100_000) + "\n");
        rejects(HEAD + "law l: y = " + "exp(".repeat(100_000) + "x" + ")".repeat(100_000) + "\n");
    }

    @Test
    void hundredThousandTermChain() {
        LawException e = rejects(HEAD + "law l: y = x" + " + x".repeat(100_000) + "\n");
        assertTrue(mentions(e, "nested deeper than the limit"), e.getMessage());
        rejects(HEAD + "law l: y = x" + " * x".repeat(100_000) + "\n");
        rejects(HEAD + "law l: y = x" + " - x / x".repeat(50_000) + "\n");
    }

    @Test
    void hundredThousandNestedUnaryMinus() {
        LawException e = rejects(HEAD + "law l: y = " + "-".repeat(100_000) + "x\n");
        assertTrue(mentions(e, "nested deeper than the limit"), e.getMessage());
        rejects(HEAD + "law l: y = " + "-(".repeat(50_000) + "x" + ")".repeat(50_000) + "\n");
    }

    @Test
    void hostileLimits() {
        String head = "input x\noutput y\n";
        assertTrue(mentions(rejects(head + "limit l: y <= x" + " <= x".repeat(100_000) + "\n"), "another '<='"));
        rejects(head + "limit l: y" + " <=".repeat(100_000) + "\n");
        rejects(head + "limit l: y >= " + "(".repeat(100_000) + "x" + ")".repeat(100_000) + "\n");
        rejects(head + "limit l: y >= x" + " + x".repeat(100_000) + "\n");
        rejects(head + "limit l: " + "-".repeat(100_000) + "y <= x\n");
        rejects(head + "limit l: y <= (x\nlimit m: y >=");
        rejects(head + "limit l: y <=");
        rejects(head + "limit l:");
        rejects(head + "limit");
        rejects(head + "limit l: y < x\nlimit m: y > x\nlimit n: y =< x\nlimit o: y <== x\n");
        rejects(head + "limit l: y \u2264 x\n");
        rejects(head + "limit l: (y <= x)\nlimit m: [y <= x]\nlimit n: exp(y >= x) >= 0\n");
        rejects(head + "limit l: y >= 1e309\nlimit m: y * y >= x\nlimit n: 1 <= y <= 0\n");
        rejects("input x\noutput y[100000]\nlimit l: y * y >= x\n");
        StringBuilder many = new StringBuilder(head);
        for (int i = 0; i < 2_000; i++) {
            many.append("limit l").append(i).append(": y >= ").append(i).append('\n');
            many.append("limit u").append(i).append(": y <= ").append(-i).append('\n');
        }
        rejects(many.toString());
    }

    @Test
    void caretChains() {
        rejects(HEAD + "law l: y = x" + "^x".repeat(100_000) + "\n");
        rejects(HEAD + "law l: y = x" + "^-x".repeat(100_000) + "\n");
        rejects(HEAD + "law l: y = " + "(".repeat(50_000) + "x" + ")^2".repeat(50_000) + "\n");
        rejects(HEAD + "law l: y = x" + "^".repeat(100_000) + "\n");
        rejects(HEAD + "law l: y = x^1e308^1e308\nlaw m: y = x" + "^-".repeat(60_000) + "1\n");
    }

    @Test
    void veryLongNames() throws Exception {
        String name = "n".repeat(100_000);
        // a long name written correctly is a valid law set
        assertTimeoutPreemptively(GUARD, () -> LawSet.parse("<long>", "input " + name + "\noutput y\nlaw l: y = "
                + name + "\n"));
        // misspelt in a law, as a function, as a keyword, as a unit and declared twice: each an error, promptly
        Map<String, String> expected = new LinkedHashMap<>();
        Map<String, String> outcome = new LinkedHashMap<>();
        for (String hostile : List.of("misspelt-name", "misspelt-name-same-length", "long-function", "long-keyword",
                "long-unit", "long-duplicate")) {
            expected.put(hostile, "LawException");
            outcome.put(hostile, inChildJvm(hostile));
        }
        assertEquals(expected, outcome);
    }

    @Test
    void hugeVectorLengthsAreRejected() {
        int over = Limits.MAX_VECTOR_LENGTH + 1;
        LawException e = rejects("input x[" + over + "]\noutput y\nlaw l: y = sum(x)\n");
        assertTrue(mentions(e, "vector length must be between 1 and " + Limits.MAX_VECTOR_LENGTH), e.getMessage());
        rejects("input x[99999999999999999999999999]\noutput y\nlaw l: y = sum(x)\n");
        rejects("input x[0]\noutput y\nlaw l: y = 1\n");
        rejects("input x[-5]\noutput y\nlaw l: y = 1\n");
        rejects("input x[1e3]\noutput y\nlaw l: y = 1\n");
        rejects("input x[3]\noutput y\nlaw l: y = x[" + over + "]\n");
        rejects("input x[3]\noutput y\nlaw l: y = sum(x[0:99999999999])\n");
        rejects("input x[3]\noutput y\nlaw l: y = x[2147483648]\n");
        rejects("output y\nconst c = [" + "1, ".repeat(over) + "1]\nlaw l: y = sum(c)\n");
        rejects("output y\nlaw l: y = sum([" + "1, ".repeat(over) + "1])\n");
    }

    @Test
    void theLargestVectorLawIsAnsweredPromptly() throws Exception {
        // at the vector length limit a one-line law is legal; parsing it, and compiling and running its evaluator,
        // must stay about linear in its size (the child checks one scalar law and one residual per element, and
        // prints "parsed" and "evaluated" as it gets there)
        assertEquals("parsed\nevaluated", inChildJvm("largest-vector-law"));
    }

    // ---- hostile inputs that could exhaust the heap or the clock run in a child JVM ----------------------------

    /** Texts for {@link Child}, by key: built there, so nothing large crosses the process boundary. */
    static String hostileText(String key) {
        String name = "n".repeat(100_000);
        int n = Limits.MAX_VECTOR_LENGTH;
        switch (key) {
            case "misspelt-name": return "input " + name + "\noutput y\nlaw l: y = " + name + "q\n";
            case "misspelt-name-same-length": return "input " + name + "\noutput y\nlaw l: y = " + name.substring(1)
                    + "m\n";
            case "long-function": return "output y\nlaw l: y = " + name + "(1)\n";
            case "long-keyword": return name + " x\n";
            case "long-unit": return "input x " + name + "\noutput y\nlaw l: y = x\n";
            case "long-duplicate": return "input " + name + "\ninput " + name + "\noutput y\nlaw l: y = 1\n";
            case "largest-vector-law":
                return "input x[" + n + "]\noutput y[" + n + "]\nlaw l: y = exp(x) * x\n";
            default: throw new IllegalArgumentException(key);
        }
    }

    /**
     * Parses {@link #hostileText(String)} in a separate JVM with a 1 GiB heap, killed after {@link #CHILD_GUARD}, so an
     * input that exhausts the heap or hangs fails this test alone instead of taking the test run down with it.
     *
     * @return what the child printed ("parsed", "LawException"), or a description of what else happened
     */
    private static String inChildJvm(String key) throws Exception {
        String javaBinary = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        ProcessBuilder pb = new ProcessBuilder(javaBinary, "-Xmx1g", "-cp", System.getProperty("java.class.path"),
                Child.class.getName(), key);
        pb.redirectErrorStream(true);
        File log = File.createTempFile("lawful-hostile-", ".txt");
        log.deleteOnExit();
        pb.redirectOutput(log);
        Process p = pb.start();
        try {
            if (!p.waitFor(CHILD_GUARD.toMillis(), TimeUnit.MILLISECONDS)) {
                return "no answer within " + CHILD_GUARD.toSeconds() + " s; printed so far: '"
                        + Files.readString(log.toPath()).strip() + "'";
            }
            String out = Files.readString(log.toPath()).strip();
            return p.exitValue() == 0 ? out : "exit " + p.exitValue() + ": " + abbreviate(out);
        } finally {
            p.destroyForcibly();
            p.waitFor();
            log.delete();
        }
    }

    /** The child JVM's entry point: parses one hostile text and prints what happened, as one line. */
    static final class Child {
        private Child() {
        }

        public static void main(String[] args) {
            String text = hostileText(args[0]);
            try {
                LawSet laws = LawSet.parse("<hostile>", text);
                System.out.println("parsed");
                if (args[0].equals("largest-vector-law")) {
                    int n = Limits.MAX_VECTOR_LENGTH;
                    assertEquals(n, laws.expand().size());
                    // y = exp(x) * x at x = 0, y = 1: every residual is 1 - 0 = 1
                    double[] residuals = new double[n];
                    double[] y = new double[n];
                    java.util.Arrays.fill(y, 1);
                    laws.evaluator().residuals(new double[n], y, 1, residuals, null);
                    for (double r : residuals) {
                        assertEquals(1.0, r);
                    }
                    System.out.println("evaluated");
                }
            } catch (LawException e) {
                checkDiagnostics(text, e);
                System.out.println("LawException");
            } catch (Throwable t) {
                System.out.println("threw " + t);
                System.exit(2);
            }
        }
    }

    @Test
    void hugeUnitExponentsAreRejected() {
        for (String unit : List.of("m^99999", "m99999", "m^-99999", "m^65", "m^64 m^64", "m^64/m^-64",
                "km^64 km^64 km^64 km^64", "qm^64 qm^64 qm^64", "m^" + "9".repeat(10_000), "(".repeat(10_000) + "m"
                        + ")".repeat(10_000), "(((((((((((((((((((m)))))))))))))))))))", "m^^2", "m^", "m^+")) {
            LawException e = rejects("input x " + unit + "\noutput y " + unit + "\nlaw l: y = x\n");
            assertFalse(e.errors().isEmpty());
        }
        // exponents in expressions of quantities with units
        rejects("input x m\noutput y m\nlaw l: y = x^99999\n");
        rejects("input x m\noutput y m\nlaw l: y = pow(x, 1e308)\n");
        rejects("input x m\noutput y m\nlaw l: y = x^99999 / x^99998\n");
        rejects("input x m\noutput y m\nlaw l: y = x * x * x * x * x * x * x * x" + " * x".repeat(70) + "\n");
    }

    @Test
    void textOverTheSizeLimitIsRejected() {
        StringBuilder sb = new StringBuilder(HEAD);
        while (sb.length() < 1_153_434) { // 1.1 MiB
            sb.append("law l").append(sb.length()).append(": y = x\n");
        }
        String text = sb.toString();
        LawException e = rejects(text);
        assertTrue(mentions(e, "exceeds the limit of " + Limits.MAX_SOURCE_CHARS), e.getMessage());
        rejects("# " + "a".repeat(1_153_434) + "\n" + HEAD + "law l: y = x\n");
        rejects(HEAD + "law l: y = x" + " ".repeat(1_153_434) + "\n");
    }

    @Test
    void nanLookingLiteralsAreRejected() {
        for (String value : List.of("NaN", "nan", "-NaN", "Infinity", "-Infinity", "inf", "1e309", "1e999",
                "-1e309", "0x1p3", "0x10", "1e", "1e+", "1.5.5", "1..5", "1_000", "\u221e", "+1")) {
            rejects(HEAD + "const c = " + value + "\nlaw l: y = x * c\n");
            rejects(HEAD + "law l: y = x * " + value + "\n");
            rejects(HEAD + "const c = [1, " + value + "]\nlaw l: y = x * c[0]\n");
        }
        rejects(HEAD + "law l: y = x * 1e200 * 1e200 * NaN\n");
        rejects(HEAD + "law l: y = nan(x)\n");
    }

    @Test
    void lawTextReachesNothingButArithmetic() {
        // if any of these escaped the language the JVM would exit or a Java method would run; each must be an
        // ordinary error instead
        List<String> hostile = List.of("System.exit(1)", "java.lang.System.exit(1)", "exit(1)", "halt(0)",
                "Runtime.getRuntime().halt(0)", "getClass(x)", "x.getClass()", "Class.forName(x)", "forName(x)",
                "valueOf(x)", "values(x)", "ordinal(x)", "name(x)", "hashCode(x)", "toString(x)", "apply(x)",
                "EXP(x)", "Exp(x)", "Function.EXP(x)", "Math.sqrt(x)", "StrictMath.exp(x)", "sqrt.apply(x)",
                "exec(x)", "load(x)", "eval(x)", "import(x)", "new(x)", "this(x)", "super(x)", "x(x)");
        for (String h : hostile) {
            LawException e = rejects(HEAD + "law l: y = " + h + "\n");
            assertFalse(e.errors().isEmpty(), h);
            rejects(HEAD + h + "\n");
            rejects(HEAD + "let d = " + h + "\nlaw l: y = d\n");
        }
        LawException unknown = rejects(HEAD + "law l: y = exit(1)\n");
        assertTrue(mentions(unknown, "unknown function 'exit'"), unknown.getMessage());
        // after all that, a valid law set still evaluates plain arithmetic: y - 2x at x = 2, y = 5 is 1
        LawSet laws = LawSet.parse("<after>", HEAD + "law l: y = 2 * x\n");
        double[] residual = new double[1];
        laws.evaluator().residuals(new double[] {2}, new double[] {5}, 1, residual, null);
        assertEquals(1.0, residual[0]);
    }
}
