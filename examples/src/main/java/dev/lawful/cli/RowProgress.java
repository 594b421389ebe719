package dev.lawful.cli;

import java.io.PrintWriter;
import java.util.Locale;

/**
 * A one-line progress display on standard error for long runs: rows done, rows per second and, when the input's
 * size is known, a bar and the share done. It appears only when standard error is a terminal (never a {@code \r}
 * in a log file) and only after the first {@value #DELAY_NANOS_SHOWN} seconds, and is redrawn at most four times a
 * second; {@link #done()} ends its line.
 */
final class RowProgress {
    private static final long DELAY_NANOS = 2_000_000_000L;
    /** The delay before the display appears, in seconds, for the class comment. */
    static final int DELAY_NANOS_SHOWN = 2;
    private static final long INTERVAL_NANOS = 250_000_000L;
    private static final int BAR = 30;

    private final PrintWriter err;
    private final boolean shown;
    private final long totalBytes;
    private final long start = System.nanoTime();
    private long last;
    private boolean drawn;

    /**
     * @param err        standard error
     * @param terminal   whether standard error is a terminal
     * @param totalBytes the input's size in bytes, or -1 when unknown (standard input)
     */
    RowProgress(PrintWriter err, boolean terminal, long totalBytes) {
        this.err = err;
        this.shown = terminal;
        this.totalBytes = totalBytes;
    }

    /** Shows the progress after a chunk: the rows and bytes done so far. */
    void update(long rows, long bytes) {
        if (!shown) {
            return;
        }
        long now = System.nanoTime();
        if (now - start < DELAY_NANOS || now - last < INTERVAL_NANOS) {
            return;
        }
        last = now;
        double seconds = (now - start) / 1e9;
        StringBuilder line = new StringBuilder("\r");
        if (totalBytes > 0) {
            double share = Math.min(1, (double) bytes / totalBytes);
            int filled = (int) Math.round(share * BAR);
            line.append('[').append("#".repeat(filled)).append(" ".repeat(BAR - filled)).append("] ")
                    .append(String.format(Locale.ROOT, "%3.0f%% ", 100 * share));
        }
        line.append(String.format(Locale.ROOT, "%,d rows, %,.0f rows/s", rows, rows / seconds));
        err.print(line);
        err.flush();
        drawn = true;
    }

    /** Ends the display's line, if it was drawn. */
    void done() {
        if (drawn) {
            err.println();
            err.flush();
        }
    }

    /**
     * @return whether the process's standard error is a terminal, on Linux (its descriptor 2 names a terminal
     *         device); false elsewhere or when it cannot be told
     */
    static boolean standardErrorIsTerminal() {
        try {
            String target = java.nio.file.Files.readSymbolicLink(java.nio.file.Path.of("/proc/self/fd/2")).toString();
            return target.startsWith("/dev/pts/") || target.startsWith("/dev/tty");
        } catch (java.io.IOException | UnsupportedOperationException | SecurityException e) {
            return false;
        }
    }
}
