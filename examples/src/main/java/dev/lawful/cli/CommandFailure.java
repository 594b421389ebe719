package dev.lawful.cli;

/**
 * Ends a command early: the text to print on standard error and the exit status. Thrown by the steps shared by
 * {@code verify} and {@code complete} ({@link DataFiles}) and caught once in each command.
 */
final class CommandFailure extends Exception {
    private static final long serialVersionUID = 1L;
    private final int status;

    /**
     * @param status  the exit status, one of {@link Lawful#EXIT_INVALID} or {@link Lawful#EXIT_USAGE}
     * @param message the whole text for standard error (one or more lines, no final line end)
     */
    CommandFailure(int status, String message) {
        super(message);
        this.status = status;
    }

    /** @return the exit status */
    int status() {
        return status;
    }
}
