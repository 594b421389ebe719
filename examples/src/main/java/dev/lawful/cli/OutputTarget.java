package dev.lawful.cli;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.nio.file.attribute.PosixFileAttributeView;
import java.util.concurrent.ThreadLocalRandom;

/**
 * Where a command writes a file, the way other command-line tools do:
 * <ul>
 *   <li>{@code -} is standard output, and so are {@code /dev/stdout}, {@code /dev/fd/1} and
 *       {@code /proc/self/fd/1};</li>
 *   <li>a symbolic link is written through: the file it points to gets the content and the link stays a link;</li>
 *   <li>a special file (a terminal, a pipe, {@code /dev/null}, {@code /dev/stdout}) is written directly;</li>
 *   <li>a regular file (or a new one) is written to a hidden temporary file beside it, which replaces it only when
 *       everything was written ({@link #commit()}), so a failure never leaves half a file. A new file gets the
 *       permissions the process's umask gives any new file; a replaced file keeps its own.</li>
 * </ul>
 * Content assembled before it is written (the members of a {@code .npz} archive) goes to further hidden files
 * beside the target ({@link #scratch()}), removed when the target is committed or abandoned.
 */
final class OutputTarget {
    /** Names of standard output on Linux and other Unix systems (common practice). */
    private static final java.util.Set<String> STANDARD_OUTPUT_NAMES = java.util.Set.of("/dev/stdout", "/dev/fd/1",
            "/proc/self/fd/1");
    /** Links followed at most, as the operating system's own limit on link chains. */
    private static final int MAX_LINKS = 40;

    private final String shown;
    private final Path target;
    private final OutputStream stdout;
    private final boolean direct;
    private Path temp;
    private OutputStream stream;
    private final java.util.List<Path> scratch = new java.util.ArrayList<>();

    private OutputTarget(String shown, Path target, OutputStream stdout, boolean direct) {
        this.shown = shown;
        this.target = target;
        this.stdout = stdout;
        this.direct = direct;
    }

    /**
     * @param argument the {@code --out} argument: a path, or {@code -}
     * @param stdout   standard output, for {@code -}
     * @return the target, not yet opened
     * @throws IOException when the path is a folder or its folder does not exist (the message says which)
     */
    static OutputTarget of(String argument, OutputStream stdout) throws IOException {
        if (argument.equals("-") || STANDARD_OUTPUT_NAMES.contains(argument)) {
            // /dev/stdout and its aliases are this process's standard output: written through the stream, so the
            // data and the summary (then on standard error) never overwrite each other in a redirected file
            return new OutputTarget(argument.equals("-") ? "standard output" : argument, null, stdout, true);
        }
        Path path = Path.of(argument);
        Path real = followLinks(path);
        if (Files.isDirectory(real)) {
            throw new IOException("it is a directory");
        }
        Path absolute = real.toAbsolutePath().normalize();
        if (Files.exists(real) && !Files.isRegularFile(real) || absolute.startsWith("/dev")
                || absolute.startsWith("/proc")) {
            // a device, a pipe or a terminal, or a name like /dev/stdout that stands for one even when it leads to a
            // regular file (a shell redirection): written in place, the path as given, so the system resolves it
            return new OutputTarget(argument, path, null, true);
        }
        Path parent = real.toAbsolutePath().getParent();
        if (parent == null || !Files.isDirectory(parent)) {
            throw new IOException("no such directory " + parent);
        }
        return new OutputTarget(argument, real, null, false);
    }

    /** @return the path a chain of symbolic links ends at (which need not exist), or the path itself */
    private static Path followLinks(Path path) throws IOException {
        Path p = path;
        for (int i = 0; i < MAX_LINKS && Files.isSymbolicLink(p); i++) {
            Path link = Files.readSymbolicLink(p);
            Path next = p.toAbsolutePath().getParent().resolve(link);
            if (next.startsWith("/proc") || next.startsWith("/dev")) {
                return p;
            }
            p = next;
        }
        return p;
    }

    /** @return the name for messages: the argument as given, or {@code standard output} */
    String shown() {
        return shown;
    }

    /** @return whether this is standard output (so messages go to standard error instead) */
    boolean isStandardOutput() {
        return target == null;
    }

    /**
     * @return the stream to write the content to (buffering is the caller's)
     * @throws IOException when the file cannot be created
     */
    OutputStream open() throws IOException {
        if (target == null) {
            stream = new OutputStream() {
                @Override
                public void write(int b) throws IOException {
                    stdout.write(b);
                }

                @Override
                public void write(byte[] b, int off, int len) throws IOException {
                    stdout.write(b, off, len);
                }

                @Override
                public void close() throws IOException {
                    stdout.flush();
                }
            };
        } else if (direct) {
            stream = Files.newOutputStream(target, StandardOpenOption.WRITE, StandardOpenOption.CREATE,
                    StandardOpenOption.TRUNCATE_EXISTING);
        } else {
            temp = createTemp();
            if (Files.exists(target)) {
                PosixFileAttributeView view = Files.getFileAttributeView(target, PosixFileAttributeView.class);
                if (view != null) {
                    Files.setPosixFilePermissions(temp, view.readAttributes().permissions());
                }
            }
            stream = Files.newOutputStream(temp, StandardOpenOption.WRITE, StandardOpenOption.TRUNCATE_EXISTING);
        }
        return stream;
    }

    /**
     * Creates a hidden empty file beside the target (in the folder of the path given, for a special file), for
     * content assembled before the target is written. It is removed by {@link #commit()} and {@link #abandon()},
     * whatever happens; the caller closes what it opened on it first.
     *
     * @return the new file
     * @throws IOException when it cannot be created, or for standard output, which has no folder
     */
    Path scratch() throws IOException {
        if (target == null) {
            throw new IOException("standard output has no folder for temporary files");
        }
        Path p = createTemp();
        scratch.add(p);
        return p;
    }

    /** A hidden file beside the target, created as any new file is (its permissions follow the umask). */
    private Path createTemp() throws IOException {
        Path dir = target.toAbsolutePath().getParent();
        for (int attempt = 0; ; attempt++) {
            Path p = dir.resolve("." + target.getFileName() + ".lawful-" + Long.toHexString(
                    ThreadLocalRandom.current().nextLong() >>> 16) + ".tmp");
            try {
                return Files.createFile(p);
            } catch (FileAlreadyExistsException e) {
                if (attempt > 100) {
                    throw e;
                }
            }
        }
    }

    /**
     * Closes the stream and puts the file in place; removes the scratch files.
     *
     * @throws IOException when closing or moving fails (the temporary file is then removed)
     */
    void commit() throws IOException {
        try {
            stream.close();
            if (temp == null) {
                return;
            }
            try {
                Files.move(temp, target, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
            } catch (AtomicMoveNotSupportedException e) {
                Files.move(temp, target, StandardCopyOption.REPLACE_EXISTING);
            }
            temp = null;
        } finally {
            abandon();
        }
    }

    /** Closes the stream and removes the temporary file and the scratch files, if any; never throws. */
    void abandon() {
        try {
            if (stream != null && target != null) {
                stream.close();
            }
        } catch (IOException ignored) {
            // the real error is already being reported
        }
        if (temp != null) {
            try {
                Files.deleteIfExists(temp);
            } catch (IOException ignored) {
                // the temporary file is hidden and harmless; the real error is already being reported
            }
            temp = null;
        }
        for (Path p : scratch) {
            try {
                Files.deleteIfExists(p);
            } catch (IOException ignored) {
                // hidden and harmless; the real error, if any, is already being reported
            }
        }
        scratch.clear();
    }

    /**
     * @return the file being written, open or not yet in place: the temporary file, or the target written directly
     * @throws IOException for standard output, which cannot be rewritten
     */
    Path written() throws IOException {
        if (target == null) {
            throw new IOException("standard output cannot be rewritten");
        }
        return temp != null ? temp : target;
    }
}
