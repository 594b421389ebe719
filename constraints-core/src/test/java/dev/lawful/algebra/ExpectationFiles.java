package dev.lawful.algebra;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.stream.Stream;

/**
 * Rewrites {@code src/test/resources/diagnostics/*.expected} from what the code produces now. Not a test: run it
 * after changing a message on purpose, then read the diff before committing (see DEVELOPERS.md).
 *
 * <pre>
 * mvn -B -q test-compile -pl constraints-core
 * java -cp constraints-core/target/classes:constraints-core/target/test-classes \
 *     dev.lawful.algebra.ExpectationFiles constraints-core/src/test/resources/diagnostics
 * </pre>
 */
public final class ExpectationFiles {
    private ExpectationFiles() {
    }

    /** @param args the diagnostics folder */
    public static void main(String[] args) throws IOException {
        Path dir = Path.of(args[0]);
        try (Stream<Path> files = Files.list(dir)) {
            for (Path law : (Iterable<Path>) files.filter(p -> p.toString().endsWith(".law")).sorted()::iterator) {
                String name = law.getFileName().toString();
                String text = Files.readString(law, StandardCharsets.UTF_8);
                String message;
                try {
                    LawSet.parse(name, text);
                    message = "(no error)";
                } catch (LawException e) {
                    message = e.getMessage();
                }
                Path expected = dir.resolve(name.substring(0, name.length() - 4) + ".expected");
                Files.writeString(expected, message, StandardCharsets.UTF_8);
            }
        }
    }
}
