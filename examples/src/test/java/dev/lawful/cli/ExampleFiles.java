package dev.lawful.cli;

import static org.junit.jupiter.api.Assertions.fail;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

/** Finds the shipped example files; tests run in the module directory, or else in the project root. */
final class ExampleFiles {
    private ExampleFiles() {
    }

    /** @return {@code examples/laws/NAME} */
    static Path law(String name) {
        return find("laws", name);
    }

    /** @return {@code examples/data/NAME} */
    static Path data(String name) {
        return find("data", name);
    }

    private static Path find(String folder, String name) {
        for (Path p : List.of(Path.of(folder, name), Path.of("examples", folder, name))) {
            if (Files.isRegularFile(p)) {
                return p;
            }
        }
        return fail("cannot find the example " + folder + "/" + name + " from " + Path.of("").toAbsolutePath());
    }
}
