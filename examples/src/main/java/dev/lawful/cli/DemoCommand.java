package dev.lawful.cli;

import dev.lawful.examples.demo.DemoReport;
import dev.lawful.examples.demo.Progress;
import dev.lawful.examples.demo.Scenario;
import dev.lawful.examples.demo.ScenarioTrainer;
import dev.lawful.examples.demo.Scenarios;
import java.io.IOException;
import java.io.PrintStream;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.ParentCommand;
import picocli.CommandLine.Spec;

/**
 * {@code lawful demo [reformer|column|exchanger|all] [--out DIR] [--epochs N] [--samples N] [--seed S] [--quiet]}:
 * runs worked scenarios end to end. For each it generates data with the scenario's physical model, trains three
 * networks on the same data, split and seed (unconstrained, soft penalty, exact law vertex), prints the comparison
 * table and writes the report (table, JSON, CSV, plots) under {@code DIR/NAME}. Progress bars go to standard error
 * when it is a terminal, results to standard output.
 *
 * <p>Exit status: {@value Lawful#EXIT_OK} when the run finished and the exact network obeyed every law within the
 * documented bound on every test row; {@value Lawful#EXIT_INVALID} when it did not (a defect to report);
 * {@value Lawful#EXIT_USAGE} for a usage error or a report that cannot be written.
 */
@Command(name = "demo",
        mixinStandardHelpOptions = true,
        version = Lawful.VERSION,
        description = {
            "Runs worked scenarios end to end: generates data with a physical model, trains three networks on the "
                    + "same data (unconstrained, with a soft law penalty, and with the laws enforced exactly), and "
                    + "compares their test error and law residuals in a table, JSON, CSV files and plots.",
            "Scenarios: reformer (steam reformer outlet, element balances), column (single-column moist "
                    + "atmosphere, water and energy budgets), exchanger (counterflow heat exchanger, energy balance "
                    + "with temperature-dependent heat capacities), or all."},
        exitCodeListHeading = "%nExit status:%n",
        exitCodeList = {
            "0:finished; the exact network obeyed every law within the documented bound",
            "1:the exact network missed the documented bound on some test row (please report it)",
            "2:usage error, or the report cannot be written"},
        footerHeading = "%nCaution:%n",
        footer = "The scenarios are demonstrations with simplified physics and demo parameters. A surrogate that obeys "
                + "its laws can still be wrong; no result here is a basis for operating or designing real plant or "
                + "forecasts without validation against trusted models, the applicable codes and licensed review.")
public final class DemoCommand implements Callable<Integer> {

    @Spec
    private CommandSpec spec;

    @ParentCommand
    private Lawful parent;

    @Parameters(index = "0", arity = "0..1", paramLabel = "SCENARIO", defaultValue = "all",
            description = "reformer, column, exchanger or all (default: ${DEFAULT-VALUE})")
    private String scenario;

    @Option(names = "--out", paramLabel = "DIR", defaultValue = "lawful-demo",
            description = "where the reports go, one folder per scenario (default: ${DEFAULT-VALUE})")
    private Path out;

    @Option(names = "--epochs", paramLabel = "N", description = "training epochs (default: the scenario's)")
    private Integer epochs;

    @Option(names = "--samples", paramLabel = "N", description = "rows generated, 80%% for training (default: the"
            + " scenario's)")
    private Integer samples;

    @Option(names = "--seed", paramLabel = "S", defaultValue = "1",
            description = "seed of data, split, initialisation and minibatch order (default: ${DEFAULT-VALUE})")
    private long seed;

    @Option(names = "--quiet", description = "no progress display (there is none when standard error is not a"
            + " terminal)")
    private boolean quiet;

    /** Creates the command; picocli calls this. */
    public DemoCommand() {
    }

    @Override
    public Integer call() {
        PrintWriter o = spec.commandLine().getOut();
        PrintWriter e = spec.commandLine().getErr();
        List<Scenario> chosen;
        if (scenario.equals("all")) {
            chosen = Scenarios.all();
        } else {
            Scenario s = Scenarios.named(scenario);
            if (s == null) {
                String near = dev.lawful.algebra.Names.nearest(scenario, Scenarios.names());
                e.println("lawful demo: unknown scenario '" + scenario + "'; choose one of "
                        + String.join(", ", Scenarios.names()) + " or all"
                        + (near == null ? "" : " (did you mean '" + near + "'?)"));
                return Lawful.EXIT_USAGE;
            }
            chosen = List.of(s);
        }
        if ((epochs != null && epochs < 1) || (samples != null && samples < 10)) {
            e.println("lawful demo: --epochs must be at least 1 and --samples at least 10");
            return Lawful.EXIT_USAGE;
        }
        String unusable = unusable(out, chosen);
        if (unusable != null) {
            e.println(unusable);
            return Lawful.EXIT_USAGE;
        }
        int status = Lawful.EXIT_OK;
        // bars are redrawn with carriage returns: only on a terminal, never into a log file or a pipe
        Progress progress = quiet || !parent.standardErrorIsTerminal() ? Progress.quiet()
                : Progress.console(new PrintStream(new WriterStream(e), true));
        for (Scenario s : chosen) {
            Scenario sized = s.withSize(samples == null ? s.samples() : samples, epochs == null ? s.epochs() : epochs);
            o.println("== " + s.title() + " ==");
            o.println("Caution: " + s.caution());
            o.flush();
            ScenarioTrainer.Outcome outcome = ScenarioTrainer.run(sized, seed, progress);
            Path dir = out.resolve(s.name());
            List<Path> files;
            DemoReport report = DemoReport.of(outcome);
            try {
                files = report.write(dir);
            } catch (IOException ex) {
                e.println("lawful demo: cannot write the report to " + dir + ": " + ex.getMessage());
                return Lawful.EXIT_USAGE;
            }
            o.println(report.table());
            o.println(report.verdict());
            o.println("Report and plots: " + dir.toAbsolutePath().normalize());
            for (Path f : files) {
                o.println("  " + f.getFileName());
            }
            o.println();
            o.flush();
            if (!report.exactWithinBound() || !report.exactInsideLimits()) {
                status = Lawful.EXIT_INVALID;
            }
        }
        return status;
    }

    /**
     * Checks before any training that the report folders can be made and written, so a bad {@code --out} fails in a
     * second rather than after minutes of training: each scenario's folder is created (with its parents) and a file
     * is created in it and deleted.
     *
     * @return the message for standard error, or null when every folder is writable
     */
    private static String unusable(Path out, List<Scenario> chosen) {
        if (Files.exists(out) && !Files.isDirectory(out)) {
            return "lawful demo: --out " + out + " is a file; give a folder (it is created if missing)";
        }
        for (Path p = out.toAbsolutePath().getParent(); p != null; p = p.getParent()) {
            if (Files.exists(p)) {
                if (!Files.isDirectory(p)) {
                    return "lawful demo: cannot write the report to " + out + ": " + p + " is a file, not a folder;"
                            + " give a writable folder with --out";
                }
                break;
            }
        }
        for (Scenario s : chosen) {
            Path dir = out.resolve(s.name());
            try {
                Files.createDirectories(dir);
                Files.delete(Files.createTempFile(dir, ".lawful-", ".probe"));
            } catch (IOException ex) {
                return "lawful demo: cannot write the report to " + dir + ": " + CheckCommand.reason(ex)
                        + "; give a writable folder with --out";
            }
        }
        return null;
    }

    /** Bytes to a writer, for the progress bars (they draw on a stream). */
    private static final class WriterStream extends java.io.OutputStream {
        private final PrintWriter writer;

        WriterStream(PrintWriter writer) {
            this.writer = writer;
        }

        @Override
        public void write(int b) {
            writer.write(b);
        }

        @Override
        public void write(byte[] b, int off, int len) {
            writer.write(new String(b, off, len, java.nio.charset.StandardCharsets.UTF_8));
        }

        @Override
        public void flush() {
            writer.flush();
        }
    }
}
