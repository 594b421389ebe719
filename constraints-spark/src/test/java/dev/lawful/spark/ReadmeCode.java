package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

/**
 * Checks that README.md shows a test's example exactly as the test runs it: the lines between the test's markers
 * {@code // NAME:start} and {@code // NAME:end} (indented 12 spaces in the test), and every import the README lists
 * under {@code // the NAME's imports} that the test uses.
 */
final class ReadmeCode {
    private ReadmeCode() {
    }

    /**
     * @param testClass the test's simple name (its source is read from this module's test sources)
     * @param name      the marker name, such as {@code cluster-example}
     * @param imports   the README's comment line above the example's imports
     */
    static void assertShown(String testClass, String name, String imports) throws IOException {
        String test = Files.readString(Path.of("src/test/java/dev/lawful/spark/" + testClass + ".java"),
                StandardCharsets.UTF_8);
        String readme = Files.readString(Path.of("../README.md"), StandardCharsets.UTF_8);
        String start = "// " + name + ":start\n";
        int from = test.indexOf(start) + start.length();
        String region = test.substring(from, test.indexOf("            // " + name + ":end", from));
        StringBuilder code = new StringBuilder();
        for (String line : region.split("\n", -1)) {
            code.append(line.startsWith("            ") ? line.substring(12) : line).append('\n');
        }
        assertTrue(readme.contains(code.toString().stripTrailing() + "\n"), "README.md must contain the " + name
                + " exactly as " + testClass + " runs it; copy the region between its " + name + " markers into the"
                + " README's code block");
        int at = readme.indexOf(imports);
        assertTrue(at > 0, "README.md must list the " + name + "'s imports under '" + imports + "'");
        // the tests live in dev.lawful.spark, so they need no imports from that package
        for (String line : readme.substring(at, readme.indexOf("```", at)).split("\n")) {
            if (line.startsWith("import ") && !line.startsWith("import dev.lawful.spark.")) {
                assertTrue(test.contains("\n" + line + "\n"), "README import not used by " + testClass + ": " + line);
            }
        }
    }
}
