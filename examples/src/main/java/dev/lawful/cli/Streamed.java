package dev.lawful.cli;

import java.io.PrintWriter;
import java.util.ArrayList;
import java.util.List;
import java.util.function.Supplier;

/**
 * Runs a command's work over a data file in chunks ({@link Pipeline}): each worker parses a chunk's wanted columns,
 * splits them into inputs x and the rest, and hands them to the command's task; the results come back in input
 * order. Also the notes every streamed command prints: the first few values read as infinity (with the text read,
 * since {@code 1e999} becomes infinity as {@code Infinity} does), the progress display, and the refusal of a file without data rows.
 *
 * @param <W> a worker's workspace
 */
final class Streamed<W> {
    /** Values read as infinity named in notes, at most. */
    static final int NOTES = 3;

    /** The command's work on one chunk, on a worker thread. */
    interface Task<W, R> {
        /**
         * @param rows the chunk's parsed rows
         * @param x    their inputs, row-major (the first {@code inputWidth} wanted columns)
         * @param rest the other wanted columns, row-major
         * @param w    the worker's workspace
         * @return the chunk's result for the sink (may be null)
         */
        R apply(RowSource.Rows rows, double[] x, double[] rest, W w) throws Exception;
    }

    /** Takes the results in input order; returns false to stop. */
    interface Sink<R> {
        boolean accept(RowSource.Rows rows, R result) throws Exception;
    }

    /** A task that needs no sink. */
    interface Consumer<W> {
        void accept(RowSource.Rows rows, double[] x, double[] rest, W w) throws Exception;
    }

    private final List<W> workspaces;
    private final long rows;

    private Streamed(List<W> workspaces, long rows) {
        this.workspaces = workspaces;
        this.rows = rows;
    }

    /** @return every worker's workspace, to merge */
    List<W> workspaces() {
        return workspaces;
    }

    /** @return the rows read */
    long rows() {
        return rows;
    }

    /** Like {@link #run(String, RowSource, DataFiles.Selection, Lawful, PrintWriter, Supplier, int, Task, Sink)}
     * for a task whose results are merged from the workspaces only. */
    static <W> Streamed<W> run(String command, RowSource source, DataFiles.Selection sel, Lawful parent,
                               PrintWriter err, Supplier<W> workspace, Consumer<W> task, int inputWidth)
            throws CommandFailure {
        return run(command, source, sel, parent, err, workspace, inputWidth, (rows, x, rest, w) -> {
            task.accept(rows, x, rest, w);
            return null;
        }, (rows, r) -> true);
    }

    /**
     * Reads every chunk, runs the task on the workers and gives the results to the sink in input order.
     *
     * @return the workspaces and the number of rows
     * @throws CommandFailure (exit 2) when the data are malformed or cannot be read, or have no rows; any failure
     *                        the task or the sink throws as a {@code CommandFailure}
     */
    static <W, R> Streamed<W> run(String command, RowSource source, DataFiles.Selection sel, Lawful parent,
                                  PrintWriter err, Supplier<W> workspace, int inputWidth, Task<W, R> task,
                                  Sink<R> sink) throws CommandFailure {
        String prefix = "lawful " + command + ": ";
        int k = sel.columnOf().length;
        Pipeline<RowSource.Chunk, Parsed<R>, W> pipeline = new Pipeline<>(parent.threads(), workspace);
        RowProgress progress = new RowProgress(err, parent.standardErrorIsTerminal(), source.size());
        List<RowSource.NonFinite> odd = new ArrayList<>();
        long[] done = new long[2];
        List<W> workspaces;
        try {
            workspaces = pipeline.run(source::next, (chunk, w) -> {
                RowSource.Rows rows = chunk.parse(sel.columnOf(), sel.names());
                int n = rows.count();
                double[] x = Scratch.doubles(Scratch.X, n * inputWidth);
                double[] rest = Scratch.doubles(Scratch.REST, n * (k - inputWidth));
                double[] v = rows.values();
                for (int s = 0; s < n; s++) {
                    System.arraycopy(v, s * k, x, s * inputWidth, inputWidth);
                    System.arraycopy(v, s * k + inputWidth, rest, s * (k - inputWidth), k - inputWidth);
                }
                return new Parsed<>(rows, chunk.bytes(), task.apply(rows, x, rest, w));
            }, parsed -> {
                for (RowSource.NonFinite o : parsed.rows.odd()) {
                    // an infinity may come from a finite-looking text (1e999); a NaN is what the file says
                    if (odd.size() < NOTES && !Double.isNaN(o.value())) {
                        odd.add(o);
                    }
                }
                done[0] += parsed.rows.count();
                done[1] += parsed.bytes;
                progress.update(done[0], done[1]);
                return sink.accept(parsed.rows, parsed.result);
            });
        } catch (CommandFailure f) {
            throw f;
        } catch (DataException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + e.getMessage());
        } catch (java.io.IOException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + "cannot read " + source.name() + ": "
                    + CheckCommand.reason(e));
        } catch (RuntimeException e) {
            throw e;
        } catch (Exception e) {
            throw new IllegalStateException(e);
        } finally {
            progress.done();
        }
        for (RowSource.NonFinite o : odd) {
            err.println(prefix + "note: " + source.name() + ": " + source.place(o.tag()) + ", column '" + o.column()
                    + "': " + o.describe());
        }
        if (done[0] == 0) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + source.name() + ": no data rows after the header ("
                    + source.headerPlace() + ")");
        }
        return new Streamed<>(workspaces, done[0]);
    }

    /** A chunk's rows, size and the task's result. */
    private record Parsed<R>(RowSource.Rows rows, long bytes, R result) {
    }
}
