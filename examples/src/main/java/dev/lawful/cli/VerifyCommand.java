package dev.lawful.cli;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.LawResiduals;
import dev.lawful.enforce.ResidualReport;
import dev.lawful.io.CsvTable;
import dev.lawful.io.JsonWriter;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.Set;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.Spec;

/**
 * {@code lawful verify FILE.law --in full.csv [--tol T] [--json]}: how well the rows of a CSV file obey the laws.
 *
 * <p>The CSV header must name every input and output element of the law file ({@code name} or {@code name[i]}),
 * in any order; other columns are ignored with a note on standard error (see {@link DataFiles}). Each row is a
 * sample in the declared units. The report ({@link ResidualReport}) gives, for each scalar law, the largest, mean
 * and 99th-percentile residual in the law's unit and relative to the law's natural scale, the samples over the
 * tolerance, the NaN or infinite residuals and a histogram by decade; it is printed as aligned tables with a
 * verdict that names the worst line of the file for each law over the tolerance, or with {@code --json} as one
 * JSON object: {@code file}, {@code data}, {@code ignoredColumns}, {@code report} (the form of
 * {@link ResidualReport#writeJson}) and {@code worst} (for each scalar law, {@code {law, line}}: the line of the
 * file with the largest relative residual, null without samples). A file with limits adds, per scalar limit, the
 * rows outside it (its value g below 0, or NaN: limits have no tolerance) and the smallest g in the limit's unit
 * with its line ({@link LimitCheck}; {@code limits} in JSON).
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
            "Reports how well the rows of a CSV file obey the laws of a law file: for each scalar law the largest, "
                    + "mean and 99th-percentile residual |lhs - rhs| in the law's unit and relative to the law's "
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

    @Parameters(index = "0", paramLabel = "FILE.law", description = "the law file (UTF-8 text)")
    private Path file;

    @Option(names = "--in", required = true, paramLabel = "FULL.csv",
            description = "the CSV file: one row per sample, a column for every input and output element")
    private Path in;

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
        LawSet laws;
        DataFiles.Data data;
        try {
            laws = DataFiles.readLaws("verify", file, err);
            data = DataFiles.readColumns("verify", in, file.toString(),
                    DataFiles.needed(laws, laws.outputNames(), "an output"), Set.of());
        } catch (CommandFailure f) {
            err.println(f.getMessage());
            return f.status();
        }
        for (String note : data.notes()) {
            err.println(note);
        }
        CsvTable table = data.table();
        int rows = table.rows();
        double[] x = table.gather(laws.inputNames());
        double[] y = table.gather(laws.outputNames());
        ResidualReport report = ResidualReport.of(laws, x, y, rows, tolerance);
        LimitCheck limits = laws.expand().limitCount() == 0 ? null : LimitCheck.of(laws.expand(), x, y, table);
        if (json) {
            JsonWriter w = JsonWriter.pretty(out);
            w.beginObject().name("file").value(file.toString()).name("data").value(in.toString());
            w.name("ignoredColumns").beginArray();
            for (String c : data.extra()) {
                w.value(c);
            }
            w.endArray();
            report.writeJson(w.name("report"));
            w.name("worst").beginArray();
            for (LawResiduals l : report.laws()) {
                w.beginObject().name("law").value(l.name()).name("line");
                if (l.worstSample() < 0) {
                    w.nullValue();
                } else {
                    w.value(table.line(l.worstSample()));
                }
                w.endObject();
            }
            w.endArray();
            if (limits != null) {
                limits.writeJson(w.name("limits"));
            }
            w.endObject();
            out.println();
        } else {
            out.println(file + ": " + rows + (rows == 1 ? " row" : " rows") + " of " + in);
            out.println();
            out.print(report.toTable(k -> "line " + table.line(k)));
            if (limits != null) {
                limits.print(out, rows);
            }
        }
        boolean inside = limits == null || limits.allInside();
        return report.withinTolerance() && inside ? Lawful.EXIT_OK : Lawful.EXIT_INVALID;
    }
}
