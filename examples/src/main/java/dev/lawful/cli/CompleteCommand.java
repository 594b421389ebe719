package dev.lawful.cli;

import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.EnforcementException;
import dev.lawful.enforce.LawResiduals;
import dev.lawful.enforce.OnBadSample;
import dev.lawful.enforce.ResidualReport;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.io.CsvTable;
import dev.lawful.io.CsvWriter;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;
import picocli.CommandLine.Spec;

/**
 * {@code lawful complete FILE.law --in data.csv --out full.csv [--keep-going]}: computes the completed outputs of
 * every row so that the laws hold, and writes the full table.
 *
 * <p>The input CSV names every input and every free output element of the law file (the outputs the network
 * predicts; {@code lawful check} lists them), in any order. A column for a completed output is ignored with a
 * note (it is computed), and so is any column the law file does not know. The completed outputs are those of the
 * law file's {@code complete} statement, or an automatic well-conditioned choice when it has none
 * ({@link Completion#of(LawSet)}).
 *
 * <p>The output CSV has the inputs (as read, bit for bit) and then every output in declared order, numbers in the
 * shortest form that reads back to the same double ({@link CsvWriter}), so {@code lawful verify} sees exactly what
 * was computed. With {@code --keep-going} a row that cannot be completed (a NaN or infinite input or free output,
 * a singular system, Newton not converging) gets NaN in every output, and a last column {@code status} says why
 * for every row ({@code ok}, or {@link SampleStatus#describe(byte)}; named {@code status_} when the law file
 * already has an element called {@code status}). Without it, the first such row stops the command with its line
 * number and nothing is written. The file is written to a temporary file next to the target and then moved into
 * place, so a failure never leaves half a file.
 *
 * <p>Exit status: {@value Lawful#EXIT_OK} written; {@value Lawful#EXIT_INVALID} a row cannot be completed (without
 * {@code --keep-going}), the law file has errors, or its laws cannot be completed; {@value Lawful#EXIT_USAGE}
 * usage error, a file that cannot be read or written, or a CSV problem.
 */
@Command(name = "complete",
        mixinStandardHelpOptions = true,
        version = Lawful.VERSION,
        description = {
            "Reads a CSV file of inputs and free outputs (the outputs a network predicts; 'lawful check' lists them), "
                    + "computes the completed outputs of every row so that every law holds, and writes a CSV file "
                    + "with the inputs and every output in declared order.",
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

    @Parameters(index = "0", paramLabel = "FILE.law", description = "the law file (UTF-8 text)")
    private Path file;

    @Option(names = "--in", required = true, paramLabel = "IN.csv",
            description = "the CSV file: one row per sample, a column for every input and free output element")
    private Path in;

    @Option(names = "--out", required = true, paramLabel = "OUT.csv",
            description = "the CSV file to write (replaced if it exists)")
    private Path outFile;

    @Option(names = "--keep-going",
            description = "write a row that cannot be completed as NaN outputs and add a status column saying why, "
                    + "instead of stopping at the first such row")
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
        DataFiles.Data data = DataFiles.readColumns("complete", in, file.toString(),
                DataFiles.needed(laws, completion.freeNames(), "a free output"),
                new HashSet<>(completion.completedNames()));
        for (String note : data.notes()) {
            err.println(note);
        }
        CsvTable table = data.table();
        int rows = table.rows();
        double[] x = table.gather(laws.inputNames());
        double[] z = table.gather(completion.freeNames());
        double[] y = new double[rows * laws.outputWidth()];
        byte[] status = keepGoing ? new byte[rows] : null;
        try {
            completion.forward(x, z, rows, y, status, completion.newWorkspace());
        } catch (EnforcementException e) {
            throw new CommandFailure(Lawful.EXIT_INVALID, "lawful complete: " + in + ": line "
                    + table.line(e.sample()) + ": cannot complete this row: " + detail(e) + "; nothing was"
                    + " written (--keep-going writes such rows as NaN with a status column)");
        }
        List<Integer> bad = new ArrayList<>();
        if (status != null) {
            for (int s = 0; s < rows; s++) {
                if (status[s] != SampleStatus.OK) {
                    bad.add(s);
                    // never leave a number in a row that failed, whatever the enforcer filled in
                    Arrays.fill(y, s * laws.outputWidth(), (s + 1) * laws.outputWidth(), Double.NaN);
                }
            }
        }
        write(laws, x, y, rows, status);
        out.println(file + ": completed " + String.join(", ", completion.completedNames()) + " ("
                + completion.tier().label() + ", condition number " + LawSummary.threeDigits(completion.condition())
                + " equilibrated) from " + (completion.freeNames().isEmpty() ? "no free outputs"
                : String.join(", ", completion.freeNames())));
        out.println("wrote " + outFile + ": " + rows + (rows == 1 ? " row" : " rows") + " of " + in
                + (status == null ? "" : ", with a status column"));
        if (bad.isEmpty()) {
            ResidualReport check = ResidualReport.of(laws, x, y, rows, 0);
            double worst = 0;
            for (LawResiduals l : check.laws()) {
                worst = Math.max(worst, l.relative().max());
            }
            out.println("largest relative residual |lhs - rhs| / scale: " + LawSummary.threeDigits(worst));
        } else {
            StringBuilder lines = new StringBuilder();
            for (int i = 0; i < Math.min(LINES_SHOWN, bad.size()); i++) {
                int s = bad.get(i);
                lines.append(i == 0 ? "" : ", ").append("line ").append(table.line(s)).append(" (")
                        .append(SampleStatus.describe(status[s])).append(')');
            }
            if (bad.size() > LINES_SHOWN) {
                lines.append(" and ").append(bad.size() - LINES_SHOWN).append(" more");
            }
            err.println("lawful complete: note: " + bad.size() + " of " + rows + " rows could not be completed;"
                    + " their outputs are NaN and the status column says why: " + lines);
        }
        return Lawful.EXIT_OK;
    }

    /** @return the enforcer's reason without its leading sample index and its hint for library callers */
    private static String detail(EnforcementException e) {
        String m = e.getMessage() == null ? SampleStatus.describe(e.status()) : e.getMessage();
        m = m.replaceFirst("^sample \\d+: ", "");
        int hint = m.indexOf(" (use OnBadSample");
        return hint >= 0 ? m.substring(0, hint) : m;
    }

    private void write(LawSet laws, double[] x, double[] y, int rows, byte[] status) throws CommandFailure {
        List<String> header = new ArrayList<>(laws.inputNames());
        header.addAll(laws.outputNames());
        Set<String> taken = new HashSet<>(header);
        String statusName = "status";
        while (taken.contains(statusName)) {
            statusName += "_";
        }
        if (status != null) {
            header.add(statusName);
        }
        int nIn = laws.inputWidth();
        int nOut = laws.outputWidth();
        Path target = outFile.toAbsolutePath();
        if (!Files.isDirectory(target.getParent())) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful complete: cannot write " + outFile + ": no such"
                    + " directory " + target.getParent());
        }
        if (Files.isDirectory(target)) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful complete: cannot write " + outFile + ": it is a"
                    + " directory");
        }
        Path temp = null;
        try {
            temp = Files.createTempFile(target.getParent(), ".lawful-", ".csv.tmp");
            try (Writer w = Files.newBufferedWriter(temp, StandardCharsets.UTF_8)) {
                CsvWriter csv = new CsvWriter(w).header(header);
                for (int s = 0; s < rows; s++) {
                    csv.values(x, s * nIn, nIn).values(y, s * nOut, nOut);
                    if (status != null) {
                        csv.value(SampleStatus.describe(status[s]));
                    }
                    csv.endRow();
                }
            }
            try {
                Files.move(temp, target, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
            } catch (AtomicMoveNotSupportedException e) {
                Files.move(temp, target, StandardCopyOption.REPLACE_EXISTING);
            }
            temp = null;
        } catch (IOException | java.io.UncheckedIOException e) {
            IOException io = e instanceof IOException i ? i : ((java.io.UncheckedIOException) e).getCause();
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful complete: cannot write " + outFile + ": "
                    + CheckCommand.reason(io));
        } finally {
            if (temp != null) {
                try {
                    Files.deleteIfExists(temp);
                } catch (IOException ignored) {
                    // the temporary file is hidden and harmless; the real error is already being reported
                }
            }
        }
    }
}
