package dev.lawful.cli;

import java.io.InputStream;
import java.io.OutputStream;
import java.io.PrintStream;
import java.io.PrintWriter;
import java.io.Writer;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Spec;
import picocli.CommandLine.UnmatchedArgumentException;

/**
 * The {@code lawful} command line: {@code lawful check FILE.law [--json]},
 * {@code lawful complete FILE.law --in DATA.csv --out FULL.csv [--keep-going]},
 * {@code lawful verify FILE.law --in FULL.csv [--tol T] [--json]}, {@code lawful help [COMMAND]}, {@code --help}
 * and {@code --version} on every command.
 *
 * <p>Exit status: {@value #EXIT_OK} on success, {@value #EXIT_INVALID} when a law file has errors, the data break a
 * law ({@code verify}) or a row cannot be completed ({@code complete}), {@value #EXIT_USAGE} for a usage error or a
 * file that cannot be read or is malformed, {@value #EXIT_INTERNAL} for an internal error (a bug, printed with its
 * stack trace).
 */
@Command(name = "lawful",
        mixinStandardHelpOptions = true,
        version = Lawful.VERSION,
        synopsisSubcommandLabel = "COMMAND",
        description = "Checks law files (the analytic laws, such as conservation of mass, energy or elements, that a "
                + "network's outputs are made to obey exactly), completes tables of data so that they obey them, "
                + "and verifies how well data obey them.",
        subcommands = {CheckCommand.class, CompleteCommand.class, VerifyCommand.class, DemoCommand.class,
            CommandLine.HelpCommand.class},
        commandListHeading = "%nCommands:%n",
        exitCodeListHeading = "%nExit status:%n",
        exitCodeList = {
            "0:success",
            "1:the law file has errors, the data break a law (verify), or a row cannot be completed (complete)",
            "2:usage error, or a file that cannot be read or is malformed",
            "3:internal error (a bug)"},
        footerHeading = "%nCaution:%n",
        footer = "Lawful makes a surrogate obey the laws you write; it does not make the surrogate valid or safe. "
                + "Validate it against trusted models and the applicable codes, and have it reviewed by a licensed "
                + "professional, before it informs any real decision.")
public final class Lawful implements Runnable {

    /** The version line printed by {@code --version}. */
    public static final String VERSION = "lawful 0.1.0-SNAPSHOT";

    /** Exit status of a successful command. */
    public static final int EXIT_OK = 0;
    /** Exit status when a law file has errors, data break a law, or a row cannot be completed. */
    public static final int EXIT_INVALID = 1;
    /** Exit status of a usage error (picocli's default for bad options), or of a file that cannot be read or is malformed. */
    public static final int EXIT_USAGE = 2;
    /** Exit status of an internal error: an unexpected exception, which is a bug. */
    public static final int EXIT_INTERNAL = 3;

    @Spec
    private CommandSpec spec;

    private InputStream stdin = InputStream.nullInputStream();
    private PrintStream stdout = new PrintStream(OutputStream.nullOutputStream());
    private boolean errTerminal;

    /** Creates the top command; picocli calls this. */
    public Lawful() {
    }

    /** @return standard input, for {@code --in -} */
    InputStream stdin() {
        return stdin;
    }

    /** @return standard output as bytes, for {@code --out -} (data are written to it unescaped) */
    PrintStream stdout() {
        return stdout;
    }

    /** @return whether standard error is a terminal, so a progress display may be drawn on it */
    boolean standardErrorIsTerminal() {
        return errTerminal;
    }

    /** @return the worker threads of {@code complete} and {@code verify}: one per available processor */
    int threads() {
        return Pipeline.defaultThreads();
    }

    /** Runs when no command is given: that is a usage error. */
    @Override
    public void run() {
        throw new ParameterException(spec.commandLine(), "Missing required command (try 'lawful check FILE.law')");
    }

    /**
     * Runs the command line and exits the JVM with its status.
     *
     * @param args the arguments
     */
    public static void main(String... args) {
        // JavaCPP's loader (under ND4J, for lawful demo) warns on standard error that Deeplearning4j 1.0.0-M2.1's own
        // JavaCPP and OpenBLAS versions differ; through SLF4J the warning reaches the command line's logging
        // backend, which discards it
        if (System.getProperty("org.bytedeco.javacpp.logger") == null) {
            System.setProperty("org.bytedeco.javacpp.logger", "slf4j");
        }
        System.exit(run(System.in, System.out, System.err, RowProgress.standardErrorIsTerminal(), args));
    }

    /**
     * Runs the command line without exiting, so it can be embedded and tested.
     *
     * @param out  receives results (summaries, JSON, help); written in this stream's own character encoding
     * @param err  receives diagnostics and usage errors
     * @param args the arguments, as on the command line
     * @return the exit status: one of {@link #EXIT_OK}, {@link #EXIT_INVALID}, {@link #EXIT_USAGE},
     *         {@link #EXIT_INTERNAL}
     */
    public static int run(PrintStream out, PrintStream err, String... args) {
        return run(InputStream.nullInputStream(), out, err, false, args);
    }

    /**
     * Runs the command line without exiting, with a standard input.
     *
     * @param in       standard input, read by {@code --in -}
     * @param out      receives results, and the data of {@code --out -} (as bytes)
     * @param err      receives diagnostics, usage errors and, when {@code terminal}, the progress display
     * @param terminal whether {@code err} is a terminal
     * @param args     the arguments, as on the command line
     * @return the exit status, as {@link #run(PrintStream, PrintStream, String...)}
     */
    public static int run(InputStream in, PrintStream out, PrintStream err, boolean terminal, String... args) {
        PrintWriter o = writer(out);
        PrintWriter e = writer(err);
        Lawful top = new Lawful();
        top.stdin = in;
        top.stdout = out;
        top.errTerminal = terminal;
        CommandLine cmd = new CommandLine(top);
        cmd.setOut(o);
        cmd.setErr(e);
        cmd.setParameterExceptionHandler(Lawful::usageError);
        cmd.setExecutionExceptionHandler((ex, line, parsed) -> {
            line.getErr().println("lawful: internal error: " + ex);
            ex.printStackTrace(line.getErr());
            return EXIT_INTERNAL;
        });
        try {
            return cmd.execute(args);
        } finally {
            o.flush();
            e.flush();
        }
    }

    /**
     * Prints a usage error: the message, for an unknown command the nearest command name when one is near (picocli's
     * own suggestions would offer any command), and one line saying where the help is. The whole help is not
     * printed: it would scroll the error out of sight.
     *
     * @return the exit status {@link #EXIT_USAGE}
     */
    private static int usageError(ParameterException ex, String[] args) {
        CommandLine line = ex.getCommandLine();
        PrintWriter err = line.getErr();
        err.println(ex.getMessage());
        if (ex instanceof UnmatchedArgumentException u && !u.getUnmatched().isEmpty()
                && !line.getSubcommands().isEmpty()) {
            String near = dev.lawful.algebra.Names.nearest(u.getUnmatched().get(0), line.getSubcommands().keySet());
            if (near != null) {
                err.println("Did you mean 'lawful " + near + "'?");
            }
        }
        err.println("Run '" + line.getCommandSpec().qualifiedName() + " --help' for the options and what they do.");
        return EXIT_USAGE;
    }

    /**
     * A writer that hands its characters to {@code stream}, so they are encoded with the stream's charset (a
     * {@code PrintWriter} built on the stream directly would use the platform default instead), with every control
     * character escaped ({@link Printable}): messages quote law and data files, and an escape sequence in a file
     * must not reach the terminal.
     */
    private static PrintWriter writer(PrintStream stream) {
        return new PrintWriter(new Writer() {
            @Override
            public void write(char[] buffer, int offset, int length) {
                stream.print(Printable.escape(String.valueOf(buffer, offset, length)));
            }

            @Override
            public void flush() {
                stream.flush();
            }

            @Override
            public void close() {
                stream.flush();
            }
        });
    }
}
