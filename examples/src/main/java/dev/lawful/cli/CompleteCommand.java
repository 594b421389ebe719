package dev.lawful.cli;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.EnforcementException;
import dev.lawful.enforce.OnBadSample;
import dev.lawful.enforce.SampleStatus;
import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.ParentCommand;
import picocli.CommandLine.Spec;

/**
 * {@code lawful complete FILE.law --in DATA --out OUT [--keep-going]}: computes the completed outputs of every row
 * so that the laws hold, and writes the full table.
 *
 * <p>The data (CSV, NumPy {@code .npy}/{@code .npz}, HDF5 or NetCDF-4; {@link DataInput}) name every input and every
 * free output element of the law file (the outputs the network predicts; {@code lawful check} lists them), in any
 * order. A column for a completed output is ignored with a note (it is computed), and so is any column the law file
 * does not know; an element that no law or limit involves may be absent (a note says so, and the output leaves it out).
 * The completed outputs are those of the law file's {@code complete} statement, or an automatic well-conditioned choice
 * when it has none ({@link Completion#of(LawSet)}).
 *
 * <p>The rows are read, completed and written in chunks on every core, in constant memory, in the input's order
 * ({@link Streamed}). The output has the inputs (as read, bit for bit) and then every output in declared order: as CSV
 * with numbers in the shortest form that reads back to the same double, so {@code lawful verify} sees exactly what was
 * computed, as a float64 {@code .npy} array when the name ends in {@code .npy}, or as a {@code .npz} archive of one
 * float64 member per element, which names its columns, when it ends in {@code .npz} ({@link NpzOutput}). With
 * {@code --keep-going} (CSV only) a row that cannot be completed (a NaN or infinite input or free output, a singular
 * system, Newton not converging) gets NaN in every output, and a last column {@code status} says why for every row
 * ({@code ok}, or {@link SampleStatus#describe(byte)}; named {@code status_} when the law file already has an element
 * called {@code status}). Without it, the first such row stops the command with its line and column and nothing is
 * written. Where the output goes follows {@link OutputTarget}: {@code -} is standard output (the summary then goes to
 * standard error), a link is written through, a special file in place, a regular file only replaced once everything is
 * written. A law file with limits adds a line saying how many rows the limits moved (a row is moved exactly when one of
 * its free outputs differs from the value read).
 *
 * <p>Exit status: {@value Lawful#EXIT_OK} written; {@value Lawful#EXIT_INVALID} a row cannot be completed (without
 * {@code --keep-going}), the law file has errors, or its laws cannot be completed; {@value Lawful#EXIT_USAGE}
 * usage error, a file that cannot be read or written, or a data problem.
 */
@Command(name = "complete",
        mixinStandardHelpOptions = true,
        version = Lawful.VERSION,
        description = {
            "Reads a data file (CSV, NumPy .npy or .npz, HDF5 or NetCDF-4) of inputs and free outputs (the outputs a "
                    + "network predicts; 'lawful check' lists them), computes the completed outputs of every row so "
                    + "that every law holds, and writes a CSV (or NumPy .npy or .npz) file with the inputs and every "
                    + "output in declared order, in chunks on every core and in the input's order.",
            "Numbers are written in the shortest form that reads back to the same double, so 'lawful verify' sees "
                    + "exactly what was computed. Columns the law file does not know, and columns of completed "
                    + "outputs, are ignored with a note."},
        exitCodeListHeading = "%nExit status:%n",
        exitCodeList = {
            "0:the output file was written",
            "1:a row cannot be completed (without --keep-going; nothing is written), the law file has errors, or "
                    + "its laws cannot be completed",
            "2:usage error, a file that cannot be read or written, or a CSV problem (missing or misnamed column, "
                    + "row of the wrong length, value that is not a number, no data rows)"},
        footerHeading = "%nCaution:%n",
        footer = "Exact laws do not make a surrogate valid: validate it against trusted models and the applicable "
                + "codes before it informs real decisions.")
public final class CompleteCommand implements Callable<Integer> {
    /** Lines of bad rows named in the note of {@code --keep-going} before the rest are only counted. */
    private static final int LINES_SHOWN = 10;

    @Spec
    private CommandSpec spec;

    @ParentCommand
    private Lawful parent;

    @Parameters(index = "0", paramLabel = "FILE.law", description = "the law file (UTF-8 text)")
    private Path file;

    @Mixin
    private DataInput input;

    @Option(names = "--out", required = true, paramLabel = "OUT",
            description = "the file to write: CSV; a NumPy .npy file (one float64 array without names) when its "
                    + "name ends in .npy; a NumPy .npz archive (one float64 member per element, such as feed.npy "
                    + "of shape (rows, 6), read back without --columns) when it ends in .npz; - for CSV on standard "
                    + "output. A file is replaced only once everything is written; a link is written through")
    private String outFile;

    @Option(names = "--keep-going",
            description = "write a row that cannot be completed as NaN outputs and add a status column saying why, "
                    + "instead of stopping at the first such row (CSV output only: .npy and .npz hold numbers only)")
    private boolean keepGoing;

    /** Creates the command; picocli calls this and fills in the arguments. */
    public CompleteCommand() {
    }

    /**
     * Reads the files, completes every row and writes the output file.
     *
     * @return the exit status
     */
    @Override
    public Integer call() {
        PrintWriter out = spec.commandLine().getOut();
        PrintWriter err = spec.commandLine().getErr();
        try {
            return complete(out, err);
        } catch (CommandFailure f) {
            err.println(f.getMessage());
            return f.status();
        }
    }

    /**
     * What one worker thread keeps: its completion workspace and the largest relative residual of the rows it
     * completed. Only that largest value is printed, so it is computed alone (one evaluation of the laws per row and
     * a comparison), not through a whole residual report, which cost twice the completion itself.
     */
    private static final class Work {
        final Completion.Workspace completion;
        final LawEvaluator evaluator;
        final LawEvaluator.Workspace evaluation;
        double worst;

        Work(Completion c, LawSet laws) {
            completion = c.newWorkspace();
            evaluator = laws.evaluator();
            evaluation = evaluator.newWorkspace();
        }

        /** Raises {@link #worst} to the largest |r| / scale of the rows (infinity for a residual that is not finite). */
        void addRows(double[] x, double[] y, int n) {
            int laws = evaluator.lawCount();
            double[] r = Scratch.doubles(Scratch.RESIDUAL, n * laws);
            double[] scale = Scratch.doubles(Scratch.SCALE, n * laws);
            evaluator.residuals(x, y, n, r, scale, evaluation);
            double w = worst;
            for (int i = 0; i < n * laws; i++) {
                double m = Math.abs(r[i]);
                // as the residual report defines it: a zero scale makes any nonzero residual infinitely large
                double rel = !Double.isFinite(m) ? Double.POSITIVE_INFINITY
                        : scale[i] == 0 ? (m == 0 ? 0 : Double.POSITIVE_INFINITY) : m / scale[i];
                w = Math.max(w, rel);
            }
            worst = w;
        }
    }

    /** A chunk's output: its bytes, or why its first bad row cannot be completed; its bad rows; rows moved. */
    private record Done(Ascii bytes, String failure, List<long[]> bad, long badCount, long moved) {
    }

    private int complete(PrintWriter out, PrintWriter err) throws CommandFailure {
        LawSet laws = DataFiles.readLaws("complete", file, err);
        Completion completion;
        try {
            completion = Completion.builder(laws).onBadSample(keepGoing ? OnBadSample.MASK : OnBadSample.THROW)
                    .build();
        } catch (LawException e) {
            throw new CommandFailure(Lawful.EXIT_INVALID, e.getMessage());
        }
        for (String w : completion.warnings()) {
            err.println("lawful complete: note: " + file + ": " + w);
        }
        try (RowSource source = input.open("complete", parent.stdin())) {
            DataFiles.Selection sel = DataFiles.select("complete", source, file.toString(),
                    DataFiles.needed(laws, completion.freeNames(), "a free output"),
                    new HashSet<>(completion.completedNames()), DataFiles.unused(laws));
            for (String note : sel.notes()) {
                err.println(note);
            }
            OutputTarget target = target();
            TableOutput table = TableOutput.of(outFile, laws, sel, keepGoing);
            PrintWriter report = target.isStandardOutput() ? err : out;
            try {
                Summary s = write(laws, completion, source, sel, target, table, err);
                table.finish(target, s.rows());
                target.commit();
                summary(report, laws, completion, source, target, table, s);
            } finally {
                table.release();
                target.abandon();
            }
            return Lawful.EXIT_OK;
        } catch (IOException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful complete: cannot write " + outFile + ": "
                    + CheckCommand.reason(e));
        }
    }

    private OutputTarget target() throws CommandFailure {
        try {
            return OutputTarget.of(outFile, parent.stdout());
        } catch (IOException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful complete: cannot write " + outFile + ": "
                    + CheckCommand.reason(e));
        }
    }

    /** The rows completed, the bad rows, the rows limits moved and the largest relative residual. */
    private record Summary(long rows, List<long[]> bad, long badCount, long moved, double worst) {
    }

    private Summary write(LawSet laws, Completion completion, RowSource source, DataFiles.Selection sel,
                          OutputTarget target, TableOutput table, PrintWriter err) throws CommandFailure, IOException {
        table.start(target);
        boolean limits = laws.expand().limitCount() > 0;
        int[] freeAt = new int[completion.freeNames().size()];
        for (int j = 0; j < freeAt.length; j++) {
            freeAt[j] = laws.outputNames().indexOf(completion.freeNames().get(j));
        }
        List<long[]> bad = new ArrayList<>();
        long[] counts = new long[2];
        Streamed<Work> run = Streamed.run("complete", source, sel, parent, err, () -> new Work(completion, laws),
                laws.inputWidth(), (rows, x, z, w) -> chunk(laws, completion, source, rows, x, z, w, table, freeAt,
                        limits), (rows, done) -> {
                    if (done.failure() != null) {
                        throw new CommandFailure(Lawful.EXIT_INVALID, done.failure());
                    }
                    table.write(done.bytes());
                    table.recycle(done.bytes());
                    for (long[] b : done.bad()) {
                        if (bad.size() < LINES_SHOWN) {
                            bad.add(b);
                        }
                    }
                    counts[0] += done.badCount();
                    counts[1] += done.moved();
                    return true;
                });
        double worst = 0;
        if (counts[0] == 0) {
            for (Work w : run.workspaces()) {
                worst = Math.max(worst, w.worst);
            }
        }
        return new Summary(run.rows(), bad, counts[0], counts[1], worst);
    }

    /** Completes one chunk on a worker and formats its rows. */
    private Done chunk(LawSet laws, Completion completion, RowSource source, RowSource.Rows rows, double[] x,
                       double[] z, Work w, TableOutput table, int[] freeAt, boolean limits) {
        int n = rows.count();
        int width = laws.outputWidth();
        double[] y = Scratch.doubles(Scratch.Y, n * width);
        byte[] status = keepGoing ? Scratch.zeroBytes(n) : null;
        try {
            completion.forward(x, z, n, y, status, w.completion);
        } catch (EnforcementException e) {
            return new Done(null, failure(e, source, rows, x, z, laws, completion), List.of(), 0, 0);
        }
        List<long[]> bad = new ArrayList<>();
        long badCount = 0;
        long moved = 0;
        for (int s = 0; s < n; s++) {
            if (status != null && status[s] != SampleStatus.OK) {
                badCount++;
                if (bad.size() < LINES_SHOWN) {
                    bad.add(new long[] {rows.tags()[s], status[s]});
                }
                // never leave a number in a row that failed, whatever the enforcer filled in
                java.util.Arrays.fill(y, s * width, (s + 1) * width, Double.NaN);
            } else if (limits && moved(y, s * width, z, s * freeAt.length, freeAt)) {
                moved++;
            }
        }
        if (badCount == 0) {
            w.addRows(x, y, n);
        }
        return new Done(table.rows(x, laws.inputWidth(), y, width, status, n), null, bad, badCount, moved);
    }

    /** @return whether a free output in the output differs from the value read (rows inside every limit are bit for bit) */
    private static boolean moved(double[] y, int yAt, double[] z, int zAt, int[] freeAt) {
        for (int j = 0; j < freeAt.length; j++) {
            if (Double.doubleToRawLongBits(y[yAt + freeAt[j]]) != Double.doubleToRawLongBits(z[zAt + j])) {
                return true;
            }
        }
        return false;
    }

    private String failure(EnforcementException e, RowSource source, RowSource.Rows rows, double[] x, double[] z,
                           LawSet laws, Completion completion) {
        int s = e.sample();
        long tag = rows.tags()[s];
        String why = detail(e);
        if (e.status() == SampleStatus.NOT_FINITE) {
            List<String> names = new ArrayList<>(laws.inputNames());
            names.addAll(completion.freeNames());
            int nIn = laws.inputWidth();
            int nFree = completion.freeNames().size();
            for (int j = 0; j < names.size(); j++) {
                double v = j < nIn ? x[s * nIn + j] : z[s * nFree + j - nIn];
                if (!Double.isFinite(v)) {
                    why = "column '" + names.get(j) + "': " + describe(rows, tag, names.get(j), v);
                    break;
                }
            }
        }
        return "lawful complete: " + source.name() + ": " + source.place(tag) + ": cannot complete this row: " + why
                + "; nothing was written (--keep-going writes such rows as NaN with a status column)";
    }

    /** @return what a non-finite value is, with the text read when the source kept it */
    private static String describe(RowSource.Rows rows, long tag, String column, double v) {
        for (RowSource.NonFinite o : rows.odd()) {
            if (o.tag() == tag && o.column().equals(column)) {
                return o.describe();
            }
        }
        return new RowSource.NonFinite(tag, column, null, v).describe();
    }

    /** @return the enforcer's reason without its leading sample index and its hint for library callers */
    private static String detail(EnforcementException e) {
        String m = e.getMessage() == null ? SampleStatus.describe(e.status()) : e.getMessage();
        m = m.replaceFirst("^sample \\d+: ", "");
        int hint = m.indexOf(" (use OnBadSample");
        return hint >= 0 ? m.substring(0, hint) : m;
    }

    private void summary(PrintWriter report, LawSet laws, Completion completion, RowSource source,
                         OutputTarget target, TableOutput table, Summary s) {
        long rows = s.rows();
        report.println(file + ": completed " + String.join(", ", completion.completedNames()) + " ("
                + completion.tier().label() + ", condition number " + LawSummary.threeDigits(completion.condition())
                + " equilibrated) from " + (completion.freeNames().isEmpty() ? "no free outputs"
                : String.join(", ", completion.freeNames())));
        report.println("wrote " + target.shown() + ": " + rows + (rows == 1 ? " row" : " rows") + " of "
                + source.name() + (keepGoing ? ", with a status column" : ""));
        if (table.names() != null) {
            report.println("its columns (a .npy file has no names; read it back with --columns): "
                    + String.join(",", table.names()));
        }
        if (laws.expand().limitCount() > 0) {
            report.println("limits moved " + s.moved() + " of " + rows + (rows == 1 ? " row" : " rows")
                    + " (their free outputs changed to bring them inside; the others are as read)");
        }
        if (s.badCount() == 0) {
            report.println("largest relative residual |lhs - rhs| / scale: " + LawSummary.threeDigits(s.worst()));
            return;
        }
        StringBuilder lines = new StringBuilder();
        for (int i = 0; i < s.bad().size(); i++) {
            long[] b = s.bad().get(i);
            lines.append(i == 0 ? "" : ", ").append(source.place(b[0])).append(" (")
                    .append(SampleStatus.describe((byte) b[1])).append(')');
        }
        if (s.badCount() > LINES_SHOWN) {
            lines.append(" and ").append(s.badCount() - LINES_SHOWN).append(" more");
        }
        report.flush();
        PrintWriter err = spec.commandLine().getErr();
        err.println("lawful complete: note: " + s.badCount() + " of " + rows + " rows could not be completed;"
                + " their outputs are NaN and the status column says why: " + lines);
    }
}
