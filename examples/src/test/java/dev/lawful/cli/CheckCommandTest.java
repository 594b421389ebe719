package dev.lawful.cli;

import static dev.lawful.cli.LawfulTest.run;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import dev.lawful.algebra.Declaration;
import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.cli.LawfulTest.Captured;
import java.io.IOException;
import java.net.URISyntaxException;
import java.net.URL;
import java.nio.charset.StandardCharsets;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@code lawful check}: exit codes, the readable summary, the JSON form and the error report. */
class CheckCommandTest {

    @TempDir
    Path temp;

    // ---- the shipped steam reformer example ------------------------------------------------------------------

    @Test
    void steamReformerSummaryNamesEveryDeclarationInAlignedColumns() throws IOException {
        Path file = example("steam-reformer.law");
        Captured r = run("check", file.toString());
        assertEquals(0, r.code(), r.err());
        assertEquals("", r.err());
        List<String> lines = r.out().lines().toList();
        assertEquals(file + ": valid (4 laws, 4 scalar equations, 6 output elements)", lines.get(0));

        assertRow(lines, "inputs", "feed", "6", "mol/s");
        assertRow(lines, "inputs", "T", "1", "K");
        assertRow(lines, "outputs", "out", "6", "mol/s");
        // the atom counts are pure numbers, shown with unit 1
        for (String c : List.of("C", "H", "O", "N")) {
            assertRow(lines, "constants", c, "6", "1");
        }
        assertTrue(lines.contains("definitions  none"), r.out());

        // which outputs a balance involves follows from the nonzero atom counts of its element (the file's
        // constants); the nitrogen law involves out[5] only
        LawSet set = LawSet.read(file);
        Map<String, List<String>> expected = new LinkedHashMap<>();
        expected.put("carbon", nonzero(set, "C"));
        expected.put("hydrogen", nonzero(set, "H"));
        expected.put("oxygen", nonzero(set, "O"));
        expected.put("nitrogen", List.of("out[5]"));
        assertEquals(List.of("out[0]", "out[2]", "out[3]"), expected.get("carbon"));
        for (Map.Entry<String, List<String>> law : expected.entrySet()) {
            String row = assertRow(lines, "laws", law.getKey(), "1", "mol/s");
            int at = lines.stream().filter(l -> l.startsWith("laws ")).findFirst().orElseThrow().indexOf("outputs");
            assertEquals(String.join(", ", law.getValue()), row.substring(at), row);
            assertEquals(' ', row.charAt(at - 1), row);
        }

        // completed in the order of the complete statement, the rest free in output order
        assertTrue(lines.contains("completed    out[2], out[4], out[1], out[5]  (4 of 6 output elements)"), r.out());
        assertTrue(lines.contains("free         out[0], out[3]"), r.out());
        // atom counts are constants, so every coefficient is constant; 8.09 is the equilibrated condition number
        // below to three digits
        assertEquals("8.09", String.format(java.util.Locale.ROOT, "%.2f", reformerCondition(LawSet.read(file))));
        assertEquals("tier         constant-affine, condition number 8.09 (equilibrated)", lines.get(lines.size() - 1),
                r.out());
    }

    /**
     * The 2-norm condition number of the reformer's completed block dC/dy for out[2] (CO), out[4] (H2), out[1]
     * (H2O), out[5] (N2), rows C, H, O, N of the file's atom counts: [[1,0,0,0],[0,2,2,0],[1,0,1,0],[0,0,0,2]].
     * The N2 column is its own block with singular value 2; the other three columns B = [[1,0,0],[0,2,2],[1,0,1]]
     * have BᵀB = [[2,0,1],[0,4,4],[1,4,5]], whose characteristic polynomial is λ³ − 11λ² + 21λ − 4 (trace 11, sum
     * of principal minors 8 + 9 + 4, determinant det(B)² = 4). Its roots bracket 4, so the condition number is
     * sqrt(λmax / λmin). Source: hand derivation from the law file's constants (linear algebra, common practice).
     */
    /**
     * The condition number of the reformer's completed block, equilibrated at the generic reference point: row e is
     * element e's atom counts over the law's natural scale (the sum of the magnitudes of its terms, outlet and
     * inlet), column c is multiplied by the magnitude of out[c].
     */
    private static double reformerCondition(LawSet set) {
        double[][] atoms = {{1, 0, 1, 1, 0, 0}, {4, 2, 0, 0, 2, 0}, {0, 1, 1, 2, 0, 0}, {0, 0, 0, 0, 0, 2}};
        int[] completed = {2, 4, 1, 5};
        double[] x = dev.lawful.enforce.plan.ReferencePoint.generic(set).x();
        double[] y = dev.lawful.enforce.plan.ReferencePoint.generic(set).y();
        double[][] block = new double[4][4];
        for (int e = 0; e < 4; e++) {
            double scale = 0;
            for (int j = 0; j < 6; j++) {
                scale += Math.abs(atoms[e][j] * y[j]) + Math.abs(atoms[e][j] * x[j]);
            }
            for (int k = 0; k < 4; k++) {
                block[e][k] = atoms[e][completed[k]] * Math.abs(y[completed[k]]) / scale;
            }
        }
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition (2-norm condition number)
        return new org.apache.commons.math3.linear.SingularValueDecomposition(
                new org.apache.commons.math3.linear.Array2DRowRealMatrix(block)).getConditionNumber();
    }

    @Test
    void steamReformerJsonHasTheDocumentedKeysAndValues() throws IOException {
        Path file = example("steam-reformer.law");
        Captured r = run("check", file.toString(), "--json");
        assertEquals(0, r.code(), r.err());
        assertEquals("", r.err());
        Map<String, Object> doc = object(Json.parse(r.out()));
        assertEquals(Set.of("file", "valid", "inputs", "outputs", "constants", "definitions", "laws", "limits",
                "tier", "condition", "completed", "free", "warnings"), doc.keySet());
        assertEquals(List.of(), doc.get("limits"));
        assertEquals(file.toString(), doc.get("file"));
        assertEquals(Boolean.TRUE, doc.get("valid"));

        List<Object> inputs = list(doc.get("inputs"));
        assertEquals(2, inputs.size());
        assertItem(inputs.get(0), "feed", 6, "mol/s");
        assertItem(inputs.get(1), "T", 1, "K");
        assertItem(list(doc.get("outputs")).get(0), "out", 6, "mol/s");
        List<Object> constants = list(doc.get("constants"));
        assertEquals(4, constants.size());
        for (Object c : constants) {
            assertEquals("", object(c).get("unit"), "a pure number has the empty unit text");
            assertEquals(6.0, object(c).get("length"));
        }
        assertEquals(List.of(), doc.get("definitions"));

        LawSet set = LawSet.read(file);
        List<Object> laws = list(doc.get("laws"));
        assertEquals(List.of("carbon", "hydrogen", "oxygen", "nitrogen"),
                laws.stream().map(l -> object(l).get("name")).toList());
        for (Object l : laws) {
            Map<String, Object> law = object(l);
            assertEquals(Set.of("name", "unit", "length", "outputs"), law.keySet());
            assertEquals("mol/s", law.get("unit"));
            assertEquals(1.0, law.get("length"));
        }
        assertEquals(nonzero(set, "C"), object(laws.get(0)).get("outputs"));
        assertEquals(nonzero(set, "H"), object(laws.get(1)).get("outputs"));
        assertEquals(nonzero(set, "O"), object(laws.get(2)).get("outputs"));
        assertEquals(List.of("out[5]"), object(laws.get(3)).get("outputs"));
        // Source: the file's statement "complete out[2], out[4], out[1], out[5]"
        assertEquals(List.of("out[2]", "out[4]", "out[1]", "out[5]"), doc.get("completed"));
        assertEquals(List.of("out[0]", "out[3]"), doc.get("free"));
        assertEquals("constant-affine", doc.get("tier"));
        double condition = reformerCondition(set);
        assertEquals(condition, (Double) doc.get("condition"), 1e-12 * condition);
        assertEquals(List.of(), doc.get("warnings"));
    }

    @Test
    void tierFollowsHowTheCompletedOutputsEnterTheLaws() throws IOException {
        // Source: the tier definitions in DEVELOPERS.md (Vocabulary) and docs/mathematics.md: constant coefficients are constant-affine; the
        // district heating mixing law multiplies two completed outputs (m_back * T_back), which is nonlinear
        Map<String, Object> water = object(Json.parse(run("check", "--json",
                example("water-network.law").toString()).out()));
        assertEquals("constant-affine", water.get("tier"));
        assertEquals(List.of("supply", "p[0]", "p[3]", "p[4]"), water.get("completed"));
        assertEquals(List.of("p[1]", "p[2]"), water.get("free"));
        Captured heating = run("check", "--json", example("district-heating.law").toString());
        assertEquals(0, heating.code(), heating.err());
        Map<String, Object> doc = object(Json.parse(heating.out()));
        assertEquals("nonlinear", doc.get("tier"));
        assertTrue((Double) doc.get("condition") >= 1, "a 2-norm condition number is at least 1");
        assertEquals(List.of("T_return[0]", "T_return[1]", "T_return[2]"), doc.get("free"));
        // the completion's notes (here: Newton's starting point) are warnings without a place in the file
        for (Object w : list(doc.get("warnings"))) {
            assertEquals(Set.of("message"), object(w).keySet());
        }
        Captured text = run("check", example("district-heating.law").toString());
        assertTrue(text.out().lines().anyMatch(l -> l.startsWith("tier           nonlinear, condition number ")),
                text.out());
    }

    @Test
    void lawsThatCannotBeCompletedAreAnErrorOfTheFile() throws IOException {
        Path file = write("twice.law", "input x m\noutput y m\nlaw a: y = x\nlaw b: 2 * y = 2 * x\n");
        LawSet set = LawSet.read(file);
        LawException e = assertThrows(LawException.class, () -> dev.lawful.enforce.Completion.of(set));
        Captured r = run("check", file.toString());
        assertEquals(1, r.code());
        assertEquals("", r.out());
        assertEquals(e.getMessage() + "\n", r.err(), "the core's own message, word for word");
        Captured json = run("check", "--json", file.toString());
        assertEquals(1, json.code());
        Map<String, Object> doc = object(Json.parse(json.out()));
        assertEquals(Boolean.FALSE, doc.get("valid"));
        assertEquals(e.errors().get(0).message(), object(list(doc.get("errors")).get(0)).get("message"));
    }

    // ---- the other shipped examples --------------------------------------------------------------------------

    @Test
    void districtHeatingShowsVectorLawsAndDefinitions() throws IOException {
        Path file = example("district-heating.law");
        // the mixing law's unit (kg/s times K) is derived by the core; the summary shows the core's spelling
        String mixingUnit = LawSet.read(file).lawUnit("mixing").display();
        Captured r = run("check", file.toString());
        assertEquals(0, r.code(), r.err());
        List<String> lines = r.out().lines().toList();
        assertEquals(file + ": valid (3 laws, 5 scalar equations, 8 output elements)", lines.get(0));
        assertRow(lines, "outputs", "T_return", "3", "K");
        assertRow(lines, "outputs", "Q", "3", "kW");
        assertRow(lines, "constants", "cp", "1", "kJ/(kg K)");
        assertRow(lines, "definitions", "cooling", "3", "T_supply - T_return");
        assertRow(lines, "definitions", "given", "3", "m * cp * cooling");
        // element i of the loop balance Q = m * cp * (T_supply - T_return) involves Q[i] and T_return[i]; the
        // summary lists the union over the three elements, in output order
        assertTrue(assertRow(lines, "laws", "loop_energy", "3", "kW")
                .endsWith("  T_return[0], T_return[1], T_return[2], Q[0], Q[1], Q[2]"), r.out());
        assertTrue(assertRow(lines, "laws", "mass", "1", "kg/s").endsWith("  m_back"), r.out());
        assertTrue(assertRow(lines, "laws", "mixing", "1", mixingUnit)
                .endsWith("  T_return[0], T_return[1], T_return[2], m_back, T_back"), r.out());
        assertTrue(lines.contains("completed      Q[0], Q[1], Q[2], m_back, T_back  (5 of 8 output elements)"),
                r.out());
        assertTrue(lines.contains("free           T_return[0], T_return[1], T_return[2]"), r.out());

        Map<String, Object> doc = object(Json.parse(run("check", file.toString(), "--json").out()));
        Map<String, Object> loop = object(list(doc.get("laws")).get(0));
        assertEquals("loop_energy", loop.get("name"));
        assertEquals(3.0, loop.get("length"));
        assertEquals("kW", loop.get("unit"));
        Map<String, Object> cooling = object(list(doc.get("definitions")).get(0));
        assertEquals(Map.of("name", "cooling", "length", 3.0, "expression", "T_supply - T_return"), cooling);
    }

    @Test
    void everyShippedExampleIsValidAndItsJsonAgreesWithTheLawSet() throws IOException {
        Path dir = example("steam-reformer.law").getParent();
        int files = 0;
        try (DirectoryStream<Path> laws = Files.newDirectoryStream(dir, "*.law")) {
            for (Path file : laws) {
                files++;
                Captured r = run("check", file.toString(), "--json");
                assertEquals(0, r.code(), file + ": " + r.err());
                Map<String, Object> doc = object(Json.parse(r.out()));
                LawSet set = LawSet.read(file);
                assertEquals(set.inputs().size(), list(doc.get("inputs")).size(), file.toString());
                for (int i = 0; i < set.inputs().size(); i++) {
                    Declaration.Variable v = set.inputs().get(i);
                    assertItem(list(doc.get("inputs")).get(i), v.name(), v.size(), v.unit().text());
                }
                for (int i = 0; i < set.outputs().size(); i++) {
                    Declaration.Variable v = set.outputs().get(i);
                    assertItem(list(doc.get("outputs")).get(i), v.name(), v.size(), v.unit().text());
                }
                double equations = 0;
                List<String> names = set.outputNames();
                for (Object l : list(doc.get("laws"))) {
                    Map<String, Object> law = object(l);
                    equations += (Double) law.get("length");
                    List<Object> outs = list(law.get("outputs"));
                    assertFalse(outs.isEmpty(), file + ": law " + law.get("name") + " involves no output");
                    int last = -1;
                    for (Object o : outs) {
                        int k = names.indexOf(o);
                        assertTrue(k > last, file + ": " + o + " is not an output element in output order");
                        last = k;
                    }
                }
                assertEquals(set.expand().size(), equations, file + ": scalar equations");
                List<String> completed = new ArrayList<>();
                for (int k : set.completedOutputs()) {
                    completed.add(names.get(k));
                }
                assertEquals(completed, doc.get("completed"), file.toString());
            }
        }
        assertTrue(files >= 3, "expected the shipped examples in " + dir);
    }

    // ---- files with errors -----------------------------------------------------------------------------------

    @Test
    void brokenFilePrintsEveryDiagnosticWordForWord() throws Exception {
        Path file = resource("check/broken.law");
        Captured r = run("check", file.toString());
        assertEquals(1, r.code());
        assertEquals("", r.out());
        assertEquals(expected(file), r.err());
        // exactly the core's own formatting of the findings
        LawException e = assertThrows(LawException.class, () -> LawSet.read(file));
        assertEquals(e.getMessage() + "\n", r.err());
    }

    /**
     * A law is shown in the file's declared units where a side is one product of them: R * P with R in ohm and P in
     * MW reads {@code ohm MW} (its SI form is kg2 m4 s-6 A-2). In plant.law: a side that is one declared quantity
     * keeps its unit (kW, a vector law), a product combines repeated symbols (kJ/s), and sums on both sides keep
     * the coherent SI unit (mol s-1).
     */
    @Test
    void lawUnitsReadInTheDeclaredUnitsWordForWord() throws Exception {
        for (String name : List.of("check/joule.law", "check/plant.law")) {
            Path file = resource(name);
            Captured r = run("check", file.toString());
            assertEquals(0, r.code(), r.err());
            assertEquals("", r.err());
            assertEquals(expected(file), r.out(), name);
            // the JSON form names the same unit the core reports residuals in
            LawSet set = LawSet.read(file);
            for (Object l : list(object(Json.parse(run("check", "--json", file.toString()).out())).get("laws"))) {
                String law = (String) object(l).get("name");
                assertEquals(set.lawUnit(law).text(), object(l).get("unit"), law);
            }
        }
    }

    @Test
    void brokenFileJsonListsTheErrors() throws Exception {
        Path file = resource("check/broken.law");
        Captured r = run("check", "--json", file.toString());
        assertEquals(1, r.code());
        assertEquals(expected(file), r.err(), "the diagnostics still go to standard error");
        Map<String, Object> doc = object(Json.parse(r.out()));
        assertEquals(Set.of("file", "valid", "errors", "warnings"), doc.keySet());
        assertEquals(file.toString(), doc.get("file"));
        assertEquals(Boolean.FALSE, doc.get("valid"));

        // each finding's first line in the expectation file is "file:line:column: message"
        Pattern head = Pattern.compile("^" + Pattern.quote(file.toString()) + ":(\\d+):(\\d+): (.*)$",
                Pattern.MULTILINE);
        Matcher m = head.matcher(expected(file));
        List<Object> errors = list(doc.get("errors"));
        int i = 0;
        while (m.find()) {
            Map<String, Object> error = object(errors.get(i++));
            assertEquals(Set.of("line", "column", "message"), error.keySet());
            assertEquals(Double.parseDouble(m.group(1)), error.get("line"));
            assertEquals(Double.parseDouble(m.group(2)), error.get("column"));
            assertEquals(m.group(3), error.get("message"));
        }
        assertEquals(4, i);
        assertEquals(i, errors.size());
        assertEquals(List.of(), doc.get("warnings"));
    }

    @Test
    void missingFileIsExitTwoWithAPlainMessage() {
        String missing = temp.resolve("no-such.law").toString();
        Captured r = run("check", missing);
        assertEquals(2, r.code());
        assertEquals("", r.out());
        assertEquals("lawful check: cannot read " + missing + ": no such file\n", r.err());
        Captured json = run("check", missing, "--json");
        assertEquals(2, json.code());
        assertEquals("", json.out());
        assertEquals(r.err(), json.err());
    }

    @Test
    void directoryIsExitTwo() {
        Captured r = run("check", temp.toString());
        assertEquals(2, r.code());
        assertEquals("", r.out());
        assertEquals("lawful check: cannot read " + temp + ": it is a directory\n", r.err());
    }

    @Test
    void badUsageIsExitTwo() {
        Captured unknown = run("check", "--bogus", example("steam-reformer.law").toString());
        assertEquals(2, unknown.code());
        assertEquals("", unknown.out());
        // the error and one line pointing to the help, not the whole help after it (which would scroll the error away)
        assertEquals("Unknown option: '--bogus'\nRun 'lawful check --help' for the options and what they do.\n",
                unknown.err());

        Captured none = run("check");
        assertEquals(2, none.code());
        assertEquals("", none.out());
        assertTrue(none.err().startsWith("Missing required parameter: 'FILE.law'\n"), none.err());

        Captured two = run("check", "a.law", "b.law");
        assertEquals(2, two.code());
        assertEquals("", two.out());
        assertTrue(two.err().contains("b.law"), two.err());
    }

    @Test
    void helpOfCheckIsExitZero() {
        Captured r = run("check", "--help");
        assertEquals(0, r.code());
        assertEquals("", r.err());
        assertTrue(r.out().startsWith("Usage: lawful check [-hV] [--json] FILE.law\n"), r.out());
        String text = LawfulTest.words(r.out());
        assertTrue(text.contains("--json print one JSON object instead of the readable summary"), text);
        assertTrue(text.contains("Exit status: 0 the file is valid 1 the file has errors, or its laws cannot be"
                + " completed 2 usage error, or the file cannot be read"), text);
    }

    // ---- written in temporary files --------------------------------------------------------------------------

    @Test
    void fileWithoutCompletionSaysSo() throws IOException {
        Path file = write("plain.law", "input x m\noutput y m\nlaw same: y = x\n");
        Captured r = run("check", file.toString());
        assertEquals(0, r.code(), r.err());
        List<String> lines = r.out().lines().toList();
        // the one law involves the one output, so the automatic choice can only be y
        assertTrue(lines.contains("completed    y  (1 of 1 output element, chosen automatically: the file has no"
                + " complete statement)"), r.out());
        assertTrue(lines.contains("free         none"), r.out());
        assertTrue(lines.contains("constants    none"), r.out());
        Map<String, Object> doc = object(Json.parse(run("check", "--json", file.toString()).out()));
        assertEquals(List.of("y"), doc.get("completed"));
        assertEquals(List.of(), doc.get("free"));
        assertEquals(List.of(Map.of("name", "same", "unit", "m", "length", 1.0, "outputs", List.of("y"))),
                doc.get("laws"));
    }

    @Test
    void longOutputListsWrapUnderTheirColumn() throws IOException {
        // c keeps the 41 laws independent, so the file can be completed (check reports a file that cannot)
        Path file = write("long.law", "input a[40] kg\noutput b[40] kg\noutput c kg\nlaw each: b = a\n"
                + "law all: sum(b) + c = sum(a)\n");
        Captured r = run("check", file.toString());
        assertEquals(0, r.code(), r.err());
        List<String> lines = r.out().lines().toList();
        int first = lines.indexOf(lines.stream().filter(l -> l.startsWith("  each ")).findFirst().orElseThrow());
        int column = lines.stream().filter(l -> l.startsWith("laws ")).findFirst().orElseThrow().indexOf("outputs");
        List<String> listed = new ArrayList<>();
        int i = first;
        do {
            String line = lines.get(i);
            assertTrue(line.length() <= TextReport.WIDTH, line);
            assertTrue(i == first || line.substring(0, column).isBlank(), line);
            for (String e : line.substring(column).split(",")) {
                listed.add(e.trim());
            }
            i++;
        } while (!lines.get(i).startsWith("  all "));
        assertTrue(i - first > 1, "forty elements should need more than one line");
        List<String> all = new ArrayList<>();
        for (int k = 0; k < 40; k++) {
            all.add("b[" + k + "]");
        }
        assertEquals(all, listed);
    }

    @Test
    void unitsAndNamesOutsideAsciiSurviveTheStreamCharset() throws IOException {
        Path file = write("we\"ird \u00b5.law", "input x \u00b5m\noutput y m\nlaw same: y = x\n");
        for (java.nio.charset.Charset cs : List.of(StandardCharsets.UTF_8, StandardCharsets.ISO_8859_1)) {
            Captured r = LawfulTest.run(cs, "check", file.toString(), "--json");
            assertEquals(0, r.code(), r.err());
            Map<String, Object> doc = object(Json.parse(r.out()));
            assertEquals(file.toString(), doc.get("file"), cs.name());
            assertEquals("\u00b5m", object(list(doc.get("inputs")).get(0)).get("unit"), cs.name());
            Captured text = LawfulTest.run(cs, "check", file.toString());
            assertTrue(text.out().lines().anyMatch(l -> l.matches("  x +1  \u00b5m")), text.out());
        }
    }

    private static final String LIMITED = String.join("\n",
            "input  feed_total mol/s",
            "output out[2] mol/s",
            "output P W",
            "law    split: sum(out) = feed_total",
            "limit  share: 0 <= out <= feed_total",
            "limit  rain: P >= 0",
            "");

    @Test
    void limitsAreListedWithLengthUnitAndOutputs() throws IOException {
        Path file = write("limited.law", LIMITED);
        Captured r = run("check", file.toString());
        assertEquals(0, r.code(), r.err());
        List<String> lines = r.out().lines().toList();
        assertEquals(file + ": valid (1 law, 1 scalar equation, 5 scalar limits, 3 output elements)", lines.get(0));
        assertEquals("  share            4  mol/s  out[0], out[1]", assertRow(lines, "limits", "share", "4", "mol/s"));
        assertEquals("  rain             1  W      P", assertRow(lines, "limits", "rain", "1", "W"));
        Map<String, Object> doc = object(Json.parse(run("check", "--json", file.toString()).out()));
        List<Object> limits = list(doc.get("limits"));
        assertEquals(2, limits.size());
        assertEquals(Map.of("name", "share", "unit", "mol/s", "length", 4.0, "inequality", "0 <= out <= feed_total",
                "outputs", List.of("out[0]", "out[1]")), limits.get(0));
        assertEquals(Map.of("name", "rain", "unit", "W", "length", 1.0, "inequality", "P >= 0",
                "outputs", List.of("P")), limits.get(1));
    }

    @Test
    void aLawFileWithoutLimitsShowsNoLimitsSection() throws IOException {
        Captured r = run("check", example("steam-reformer.law").toString());
        assertFalse(r.out().lines().anyMatch(l -> l.startsWith("limits")), r.out());
    }

    @Test
    void emptyFileIsValidAndSaysNone() throws IOException {
        Path file = write("empty.law", "# nothing yet\n");
        Captured r = run("check", file.toString());
        assertEquals(0, r.code(), r.err());
        List<String> lines = r.out().lines().toList();
        assertEquals(file + ": valid (0 laws, 0 scalar equations, 0 output elements)", lines.get(0));
        for (String section : List.of("inputs", "outputs", "constants", "definitions", "laws")) {
            assertTrue(lines.stream().anyMatch(l -> l.matches(section + " +none")), section + "\n" + r.out());
        }
        assertTrue(lines.stream().anyMatch(l -> l.matches("completed +none: the file has no laws")), r.out());
        Map<String, Object> doc = object(Json.parse(run("check", "--json", file.toString()).out()));
        assertTrue(doc.containsKey("tier") && doc.get("tier") == null, doc.toString());
        assertTrue(doc.containsKey("condition") && doc.get("condition") == null, doc.toString());
        assertEquals(List.of(), doc.get("completed"));
        assertEquals(List.of(), doc.get("free"));
    }

    // ---- helpers ---------------------------------------------------------------------------------------------

    /**
     * Finds the row of {@code name} in section {@code section} and checks that its length ends, and its unit (or
     * expression) starts, in the columns of the section's header.
     *
     * @return the row
     */
    private static String assertRow(List<String> lines, String section, String name, String length, String unit) {
        int header = -1;
        for (int i = 0; i < lines.size(); i++) {
            if (lines.get(i).startsWith(section + " ")) {
                header = i;
                break;
            }
        }
        assertTrue(header >= 0, "no section " + section + " in\n" + String.join("\n", lines));
        String head = lines.get(header);
        int lengthEnd = head.indexOf("length") + "length".length();
        int unitAt = Math.max(head.indexOf("unit"), head.indexOf("expression"));
        for (int i = header + 1; i < lines.size() && lines.get(i).startsWith("  "); i++) {
            String row = lines.get(i);
            if (row.startsWith("  " + name + " ")) {
                assertEquals(length, row.substring(lengthEnd - length.length(), lengthEnd), row);
                assertTrue(row.substring(0, lengthEnd - length.length()).endsWith(" "), row);
                assertEquals(unit, row.substring(unitAt, Math.min(row.length(), unitAt + unit.length())), row);
                assertTrue(row.length() == unitAt + unit.length() || row.charAt(unitAt + unit.length()) == ' ', row);
                return row;
            }
        }
        return fail("no row " + name + " in section " + section + " of\n" + String.join("\n", lines));
    }

    private static void assertItem(Object item, String name, int length, String unit) {
        assertEquals(Map.of("name", name, "length", (double) length, "unit", unit), item);
    }

    /** @return the output elements {@code out[i]} where constant {@code name} is nonzero */
    private static List<String> nonzero(LawSet set, String name) {
        Declaration.Constant c = set.constants().stream().filter(k -> k.name().equals(name)).findFirst().orElseThrow();
        List<String> out = new ArrayList<>();
        for (int i = 0; i < c.size(); i++) {
            if (c.values().get(i) != 0) {
                out.add("out[" + i + "]");
            }
        }
        return out;
    }

    /** @return a shipped example law file; tests run in the module directory, or else in the project root */
    private static Path example(String name) {
        for (Path p : List.of(Path.of("laws", name), Path.of("examples", "laws", name))) {
            if (Files.isRegularFile(p)) {
                return p;
            }
        }
        return fail("cannot find the example " + name + " from " + Path.of("").toAbsolutePath());
    }

    private static Path resource(String name) throws URISyntaxException {
        URL url = CheckCommandTest.class.getResource("/" + name);
        assertNotNull(url, name);
        return Path.of(url.toURI());
    }

    /** @return the expectation file next to {@code law}, with {@code @FILE@} standing for its name */
    private static String expected(Path law) throws IOException {
        Path expectation = law.resolveSibling(law.getFileName().toString().replace(".law", ".expected"));
        return Files.readString(expectation, StandardCharsets.UTF_8).replace("@FILE@", law.toString());
    }

    private Path write(String name, String text) throws IOException {
        return Files.writeString(temp.resolve(name), text, StandardCharsets.UTF_8);
    }

    @SuppressWarnings("unchecked")
    private static Map<String, Object> object(Object o) {
        assertTrue(o instanceof Map, () -> "not a JSON object: " + o);
        return (Map<String, Object>) o;
    }

    @SuppressWarnings("unchecked")
    private static List<Object> list(Object o) {
        assertTrue(o instanceof List, () -> "not a JSON array: " + o);
        return (List<Object>) o;
    }

    /**
     * A strict reader of one JSON text (RFC 8259): objects become {@link LinkedHashMap}s, arrays {@link List}s,
     * numbers {@link Double}s; anything else, trailing text included, fails the test.
     */
    static final class Json {
        private final String s;
        private int pos;

        private Json(String s) {
            this.s = s;
        }

        static Object parse(String text) {
            Json j = new Json(text);
            Object v = j.value();
            j.space();
            if (j.pos != text.length()) {
                fail("trailing text at " + j.pos + " in " + text);
            }
            return v;
        }

        private Object value() {
            space();
            if (pos >= s.length()) {
                return fail("unexpected end of JSON");
            }
            char c = s.charAt(pos);
            if (c == '{') {
                pos++;
                Map<String, Object> map = new LinkedHashMap<>();
                space();
                if (peek('}')) {
                    return map;
                }
                do {
                    space();
                    String key = string();
                    space();
                    expect(':');
                    assertFalse(map.containsKey(key), "duplicate key " + key);
                    map.put(key, value());
                    space();
                } while (peek(','));
                expect('}');
                return map;
            }
            if (c == '[') {
                pos++;
                List<Object> list = new ArrayList<>();
                space();
                if (peek(']')) {
                    return list;
                }
                do {
                    list.add(value());
                    space();
                } while (peek(','));
                expect(']');
                return list;
            }
            if (c == '"') {
                return string();
            }
            for (String word : List.of("true", "false", "null")) {
                if (s.startsWith(word, pos)) {
                    pos += word.length();
                    return word.equals("null") ? null : Boolean.valueOf(word);
                }
            }
            Matcher m = Pattern.compile("-?(0|[1-9][0-9]*)(\\.[0-9]+)?([eE][+-]?[0-9]+)?").matcher(s);
            if (m.find(pos) && m.start() == pos && m.end() > pos) {
                pos = m.end();
                return Double.parseDouble(m.group());
            }
            return fail("unexpected '" + c + "' at " + pos);
        }

        private String string() {
            expect('"');
            StringBuilder sb = new StringBuilder();
            while (true) {
                char c = s.charAt(pos++);
                if (c == '"') {
                    return sb.toString();
                }
                if (c < 0x20) {
                    fail("unescaped control character in a string at " + pos);
                }
                if (c != '\\') {
                    sb.append(c);
                    continue;
                }
                char e = s.charAt(pos++);
                switch (e) {
                    case '"', '\\', '/' -> sb.append(e);
                    case 'b' -> sb.append('\b');
                    case 'f' -> sb.append('\f');
                    case 'n' -> sb.append('\n');
                    case 'r' -> sb.append('\r');
                    case 't' -> sb.append('\t');
                    case 'u' -> {
                        sb.append((char) Integer.parseInt(s.substring(pos, pos + 4), 16));
                        pos += 4;
                    }
                    default -> fail("bad escape \\" + e);
                }
            }
        }

        private void space() {
            while (pos < s.length() && " \t\n\r".indexOf(s.charAt(pos)) >= 0) {
                pos++;
            }
        }

        private boolean peek(char c) {
            if (pos < s.length() && s.charAt(pos) == c) {
                pos++;
                return true;
            }
            return false;
        }

        private void expect(char c) {
            if (!peek(c)) {
                fail("expected '" + c + "' at " + pos + " in " + s);
            }
        }
    }
}
