package dev.lawful;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Deque;
import java.util.List;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;

/**
 * The core's shape rules (DEVELOPERS.md, Code style): no main source file over 500 lines of code (blank and comment
 * lines not counted) and no method or constructor over 60 lines, so the classes that grow stay split.
 */
class SourceShapeTest {
    private static final int MAX_CODE_LINES = 500;
    private static final int MAX_METHOD_LINES = 60;
    /** A line that opens a method or constructor body: a parameter list, optional throws, then the brace. */
    private static final Pattern SIGNATURE = Pattern.compile("\\)\\s*(throws [\\w., ]+)?\\s*\\{\\s*$");
    private static final Pattern STATEMENT = Pattern.compile("^\\s*(\\}\\s*)?(if|for|while|switch|catch|"
            + "synchronized|else|try|do|return|new)\\b");

    @Test
    void mainSourcesStayWithinTheSizeRules() throws IOException {
        Path root = Path.of("src/main/java");
        assertTrue(Files.isDirectory(root), "run from the module directory: " + root.toAbsolutePath());
        List<String> problems = new ArrayList<>();
        List<Path> files;
        try (Stream<Path> walk = Files.walk(root)) {
            files = walk.filter(p -> p.toString().endsWith(".java")).sorted().toList();
        }
        assertTrue(files.size() > 50, "found only " + files.size() + " source files under " + root);
        for (Path file : files) {
            List<String> code = code(Files.readAllLines(file, StandardCharsets.UTF_8));
            long lines = code.stream().filter(l -> !l.isBlank()).count();
            if (lines > MAX_CODE_LINES) {
                problems.add(root.relativize(file) + ": " + lines + " lines of code (at most " + MAX_CODE_LINES + ")");
            }
            problems.addAll(longMethods(root.relativize(file).toString(), code));
        }
        assertEquals(List.of(), problems);
    }

    @Test
    void theCounterSeesCodeNotComments() {
        List<String> code = code(List.of("/** a", " * b */", "int a; // c", "", "String s = \"/* no */\";",
                "/* d */ int b;"));
        assertEquals(List.of("", "", "int a; ", "", "String s = \"\";", " int b;"), code);
        List<String> body = new ArrayList<>(List.of("void m() {"));
        for (int i = 0; i < MAX_METHOD_LINES + 1; i++) {
            body.add("    if (x) { y(); }");
        }
        body.add("}");
        assertEquals(1, longMethods("M.java", body).size(), "a 62-line method is reported");
        assertEquals(0, longMethods("M.java", body.subList(1, body.size() - 1)).size(), "statements are not methods");
    }

    /** @return the lines with comments removed and string literals emptied (so braces in them do not count) */
    static List<String> code(List<String> lines) {
        List<String> out = new ArrayList<>();
        boolean inComment = false;
        for (String s : lines) {
            StringBuilder code = new StringBuilder();
            int j = 0;
            while (j < s.length()) {
                if (inComment) {
                    int end = s.indexOf("*/", j);
                    if (end < 0) {
                        j = s.length();
                        break;
                    }
                    inComment = false;
                    j = end + 2;
                } else if (s.startsWith("/*", j)) {
                    inComment = true;
                    j += 2;
                } else if (s.startsWith("//", j)) {
                    break;
                } else if (s.charAt(j) == '"' || s.charAt(j) == '\'') {
                    char quote = s.charAt(j);
                    int k = j + 1;
                    while (k < s.length() && s.charAt(k) != quote) {
                        k += s.charAt(k) == '\\' ? 2 : 1;
                    }
                    code.append(quote).append(quote);
                    j = k + 1;
                } else {
                    code.append(s.charAt(j++));
                }
            }
            out.add(code.toString());
        }
        return out;
    }

    /** @return one problem per method or constructor body longer than the rule, found by matching braces */
    static List<String> longMethods(String file, List<String> code) {
        List<String> problems = new ArrayList<>();
        Deque<int[]> open = new ArrayDeque<>();
        for (int line = 0; line < code.size(); line++) {
            String text = code.get(line);
            for (int c = 0; c < text.length(); c++) {
                if (text.charAt(c) == '{') {
                    boolean method = c == text.length() - 1 || text.substring(c + 1).isBlank();
                    method &= SIGNATURE.matcher(text).find() && !STATEMENT.matcher(text).find()
                            && !text.contains("->");
                    open.push(new int[] {line, method ? 1 : 0});
                } else if (text.charAt(c) == '}' && !open.isEmpty()) {
                    int[] start = open.pop();
                    if (start[1] == 1 && line - start[0] > MAX_METHOD_LINES) {
                        problems.add(file + ":" + (start[0] + 1) + ": a method of " + (line - start[0]) + " lines (at"
                                + " most " + MAX_METHOD_LINES + "): " + code.get(start[0]).trim());
                    }
                }
            }
        }
        return problems;
    }
}
