package dev.lawful.cli;

import dev.lawful.algebra.Diagnostic;
import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.AccessDeniedException;
import java.nio.file.FileSystemException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.Spec;

/**
 * {@code lawful check FILE.law [--json]}: reads a law file, checks it, and prints what it declares.
 *
 * <p>On success it prints a readable summary (inputs, outputs, constants, definitions, each law with its unit and
 * the output elements it involves, the completed and free outputs, the tier and the condition number of the
 * completion), or with {@code --json} one JSON object (see {@link JsonReport}); warnings go to standard error. The
 * completion is {@link Completion#of(LawSet)}: the file's {@code complete} statement, or an automatic choice when
 * there is none; when it is impossible (dependent laws, a singular choice) that is an error of the file. When the file has errors, every finding is printed to
 * standard error exactly as {@link LawException#getMessage()} formats it ({@code file:line:column: message}, the
 * source line and a caret line), and with {@code --json} a JSON object listing them is printed to standard output
 * as well. A file that cannot be read gives {@code lawful check: cannot read FILE: reason} on standard error and
 * nothing on standard output.
 *
 * <p>Exit status: {@value Lawful#EXIT_OK} valid, {@value Lawful#EXIT_INVALID} errors in the file (its laws
 * cannot be completed included), {@value Lawful#EXIT_USAGE} usage error or unreadable file.
 */
@Command(name = "check",
        mixinStandardHelpOptions = true,
        version = Lawful.VERSION,
        description = {
            "Reads a law file, checks it, and summarises its inputs, outputs, constants, definitions, laws (with "
                    + "their units and the output elements each involves), the completed and free outputs, how the "
                    + "laws are solved (the tier) and the condition number of the completed outputs (equilibrated: each law "
                    + "divided by the magnitude of its terms, each output scaled by its size, so the number does not "
                    + "depend on the units declared).",
            "Errors are printed to standard error as file:line:column: message, with the source line and a caret."},
        exitCodeListHeading = "%nExit status:%n",
        exitCodeList = {
            "0:the file is valid",
            "1:the file has errors, or its laws cannot be completed",
            "2:usage error, or the file cannot be read"})
public final class CheckCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @Parameters(index = "0", paramLabel = "FILE.law", description = "the law file to check (UTF-8 text)")
    private Path file;

    @Option(names = "--json", description = "print one JSON object instead of the readable summary")
    private boolean json;

    /** Creates the command; picocli calls this and fills in the arguments. */
    public CheckCommand() {
    }

    /**
     * Checks the file and prints the report.
     *
     * @return the exit status
     */
    @Override
    public Integer call() {
        PrintWriter out = spec.commandLine().getOut();
        PrintWriter err = spec.commandLine().getErr();
        String name = file.toString();
        LawSet set;
        try {
            if (Files.isDirectory(file)) {
                err.println("lawful check: cannot read " + name + ": it is a directory");
                return Lawful.EXIT_USAGE;
            }
            set = LawSet.read(file);
        } catch (IOException e) {
            err.println("lawful check: cannot read " + name + ": " + reason(e));
            return Lawful.EXIT_USAGE;
        } catch (LawException e) {
            err.println(e.getMessage());
            if (json) {
                JsonReport.invalid(name, e, out);
            }
            return Lawful.EXIT_INVALID;
        }
        Completion completion = null;
        if (!set.laws().isEmpty()) {
            try {
                completion = Completion.of(set);
            } catch (LawException e) {
                for (Diagnostic w : set.warnings()) {
                    err.println(w.format());
                }
                err.println(e.getMessage());
                if (json) {
                    JsonReport.invalid(name, e, out);
                }
                return Lawful.EXIT_INVALID;
            }
        }
        for (Diagnostic w : set.warnings()) {
            err.println(w.format());
        }
        if (completion != null) {
            for (String w : completion.warnings()) {
                err.println(name + ": warning: " + w);
            }
        }
        LawSummary summary = LawSummary.of(name, set, completion);
        if (json) {
            JsonReport.valid(summary, out);
        } else {
            TextReport.print(summary, out);
        }
        return Lawful.EXIT_OK;
    }

    /**
     * @param e the failure to read a file
     * @return why the file could not be read, in a few plain words
     */
    static String reason(IOException e) {
        if (e instanceof NoSuchFileException) {
            return "no such file";
        }
        if (e instanceof AccessDeniedException) {
            return "permission denied";
        }
        if (e instanceof java.nio.file.FileAlreadyExistsException
                || e instanceof java.nio.file.NotDirectoryException) {
            return ((FileSystemException) e).getFile() + " is a file, not a folder";
        }
        if (e instanceof FileSystemException f && f.getReason() != null) {
            return f.getReason();
        }
        return e.getMessage() != null ? e.getMessage() : e.getClass().getSimpleName();
    }
}
