package dev.lawful.cli;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.LawResiduals;
import dev.lawful.enforce.ResidualAccumulator;
import dev.lawful.enforce.ResidualReport;
import dev.lawful.io.JsonWriter;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.ParentCommand;
import picocli.CommandLine.Spec;

/**
 * {@code lawful verify FILE.law --in DATA [--tol T] [--json]}: how well the rows of a data file obey the laws.
 *
 * <p>The data (CSV, NumPy {@code .npy}/{@code .npz}, HDF5 or NetCDF-4, or CSV on standard input; {@link DataInput})
 * must name every input and output element of the law file that a law or limit involves ({@code name} or
 * {@code name[i]}), in any order; other columns are ignored with a note on standard error (see {@link DataFiles}). The
 * rows are read and judged in chunks on every core, in constant memory; the report is merged exactly from the workers'
 * partial ones ({@link ResidualAccumulator}), so it has the same bits however the rows were split. Each row is a sample
 * in the declared units. The report ({@link ResidualReport}) gives, for each scalar law, the largest, mean and
 * 99th-percentile residual in the law's unit and relative to the law's natural scale, the samples over the tolerance,
 * the NaN or infinite residuals and a histogram by decade; it is printed as aligned tables with a verdict that names
 * the worst line of the file for each law over the tolerance, or with {@code --json} as one JSON object: {@code file},
 * {@code data}, {@code ignoredColumns}, {@code report} (the form of {@link ResidualReport#writeJson}) and {@code worst}
 * (for each scalar law, {@code {law, line}}: the line of the file with the largest relative residual, null without
 * samples). A file with limits adds, per scalar limit, the rows outside it (its value g below 0, or NaN: limits have no
 * tolerance) and the smallest g in the limit's unit with its line ({@link LimitCheck}; {@code limits} in JSON).
 *
 * <p>Exit status: {@value Lawful#EXIT_OK} every sample within tolerance for every law; {@value Lawful#EXIT_INVALID}
 * some relative residual over the tolerance (or NaN), a row outside a limit, or errors in the law file; {@value Lawful#EXIT_USAGE} usage
 * error, a file that cannot be read, or a CSV problem (missing or misnamed column, row of the wrong length, value
 * that is not a number, no data rows), each with its line number.
 */
@Command(name = "verify",
        mixinStandardHelpOptions = true,
        version = Lawful.VERSION,
        description = {
            "Reports how well the rows of a data file (CSV, NumPy .npy or .npz, HDF5 or NetCDF-4) obey the laws "
                    + "of a law file: for each scalar law the largest, mean and 99th-percentile residual |lhs - rhs| "
                    + "in the law's unit and relative to the law's "
                    + "natural scale, the rows over the tolerance, NaN or infinite residuals, and a histogram of the "
                    + "relative residual by decade.",
            "The CSV header names every input and output element (name or name[i]) in any order; other columns are "
                    + "ignored with a note. Lines starting with # are comments.",
            "For a law file with limits, it also reports for each scalar limit the rows outside it (g < 0, or NaN; "
                    + "limits have no tolerance) and the worst value in the limit's unit; a row outside a limit gives "
                    + "exit status 1."},
        exitCodeListHeading = "%nExit status:%n",
        exitCodeList = {
            "0:every row obeys every law within the tolerance",
            "1:a relative residual is over the tolerance (or NaN), or the law file has errors",
            "2:usage error, a file that cannot be read, or a CSV problem (missing or misnamed column, row of the "
                    + "wrong length, value that is not a number, no data rows)"},
        footerHeading = "%nCaution:%n",
        footer = "Exact laws do not make a surrogate valid: validate it against trusted models and the applicable "
                + "codes before it informs real decisions.")
public final class VerifyCommand implements Callable<Integer> {
    @Spec
    private CommandSpec spec;

    @ParentCommand
    private Lawful parent;

    @Parameters(index = "0", paramLabel = "FILE.law", description = "the law file (UTF-8 text)")
    private Path file;

    @Mixin
    private DataInput input;

    @Option(names = "--tol", paramLabel = "T", defaultValue = "1e-9",
            description = "largest relative residual |lhs - rhs| / scale accepted (default: ${DEFAULT-VALUE}). "
                    + "Laws completed in double hold to a few 1e-16 of their scale and `lawful complete` writes "
                    + "numbers that read back exactly, so 1e-9 leaves room for data passed through other tools with "
                    + "10 or more significant digits and still catches any real violation; use about 1e-6 for "
                    + "outputs computed in float32 (one float32 rounding is up to 6e-8 of a value).")
    private double tolerance;

    @Option(names = "--json", description = "print one JSON object instead of the tables")
    private boolean json;

    /** Creates the command; picocli calls this and fills in the arguments. */
    public VerifyCommand() {
    }

    /** What one worker thread accumulates. */
    private static final class Work {
        final ResidualAccumulator residuals;
        final LimitCheck limits;

        Work(LawSet laws, double tolerance) {
            residuals = new ResidualAccumulator(laws, tolerance);
            limits = laws.expand().limitCount() == 0 ? null : new LimitCheck(laws.expand());
        }
    }

    /**
     * Reads the files, computes the report and prints it.
     *
     * @return the exit status
     * @throws ParameterException when the tolerance is negative, infinite or NaN (a usage error, exit 2)
     */
    @Override
    public Integer call() {
        PrintWriter out = spec.commandLine().getOut();
        PrintWriter err = spec.commandLine().getErr();
        if (!(tolerance >= 0) || Double.isInfinite(tolerance)) {
            throw new ParameterException(spec.commandLine(), "--tol must be a finite number >= 0, found "
                    + tolerance);
        }
        try {
            return verify(out, err);
        } catch (CommandFailure f) {
            err.println(f.getMessage());
            return f.status();
        }
    }

    private int verify(PrintWriter out, PrintWriter err) throws CommandFailure {
        LawSet laws = DataFiles.readLaws("verify", file, err);
        try (RowSource source = input.open("verify", parent.stdin())) {
            DataFiles.Selection sel = DataFiles.select("verify", source, file.toString(),
                    DataFiles.needed(laws, laws.outputNames(), "an output"), Set.of(), DataFiles.unused(laws));
            for (String note : sel.notes()) {
                err.println(note);
            }
            Streamed<Work> run = Streamed.run("verify", source, sel, parent, err, () -> new Work(laws, tolerance),
                    (rows, x, y, w) -> {
                        w.residuals.add(x, y, rows.count(), rows.firstRow(), rows.tags());
                        if (w.limits != null) {
                            w.limits.add(x, y, rows.count(), rows.firstRow(), rows.tags());
                        }
                    }, laws.inputWidth());
            Work all = run.workspaces().get(0);
            for (Work w : run.workspaces().subList(1, run.workspaces().size())) {
                all.residuals.merge(w.residuals);
                if (all.limits != null) {
                    all.limits.merge(w.limits);
                }
            }
            print(out, source, sel, run.rows(), all);
            boolean inside = all.limits == null || all.limits.allInside();
            return all.residuals.report().withinTolerance() && inside ? Lawful.EXIT_OK : Lawful.EXIT_INVALID;
        } catch (java.io.IOException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful verify: cannot read " + input.in + ": "
                    + CheckCommand.reason(e));
        }
    }

    private void print(PrintWriter out, RowSource source, DataFiles.Selection sel, long rows, Work all) {
        ResidualReport report = all.residuals.report();
        Map<Integer, Long> tagOf = new HashMap<>();
        for (int i = 0; i < report.laws().size(); i++) {
            tagOf.put(report.laws().get(i).worstSample(), all.residuals.worstTag(i));
        }
        String place = source instanceof CsvSource ? "line" : "row";
        if (json) {
            JsonWriter w = JsonWriter.pretty(out);
            w.beginObject().name("file").value(file.toString()).name("data").value(source.name());
            w.name("ignoredColumns").beginArray();
            for (String c : sel.extra()) {
                w.value(c);
            }
            w.endArray();
            w.name("absentColumns").beginArray();
            for (String c : sel.absent()) {
                w.value(c);
            }
            w.endArray();
            report.writeJson(w.name("report"));
            w.name("worst").beginArray();
            for (LawResiduals l : report.laws()) {
                w.beginObject().name("law").value(l.name()).name(place);
                if (l.worstSample() < 0) {
                    w.nullValue();
                } else {
                    w.value(tagOf.get(l.worstSample()));
                }
                w.endObject();
            }
            w.endArray();
            if (all.limits != null) {
                all.limits.writeJson(w.name("limits"), place);
            }
            w.endObject();
            out.println();
        } else {
            out.println(file + ": " + rows + (rows == 1 ? " row" : " rows") + " of " + source.name());
            out.println();
            out.print(report.toTable(k -> source.place(tagOf.get(k))));
            coverage(out, report);
            if (all.limits != null) {
                all.limits.print(out, rows, source);
            }
        }
    }

    /**
     * When some residual is NaN or infinite, says how many rows max, mean and p99 cover (the rows whose residual is
     * finite), so that a 0 over a handful of finite rows is not read as a statement about all of them.
     */
    private static void coverage(PrintWriter out, ResidualReport report) {
        List<LawResiduals> partial = report.laws().stream().filter(l -> l.nonFinite() > 0).toList();
        if (partial.isEmpty()) {
            return;
        }
        StringBuilder sb = new StringBuilder("max, mean and p99 cover only the rows with a finite residual:");
        for (LawResiduals l : partial) {
            sb.append(' ').append(l.name()).append(' ').append(l.finite()).append(" of ").append(l.samples())
                    .append(" rows,");
        }
        sb.setLength(sb.length() - 1);
        out.println(sb);
    }
}
