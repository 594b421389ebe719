package dev.lawful.algebra;

import java.util.List;

/**
 * The one exception a user sees for bad law text or a bad builder call: it carries every finding of the pass,
 * each with its position. {@link #getMessage()} is the formatted findings, one block per finding, ready to
 * print.
 */
public final class LawException extends RuntimeException {
    private static final long serialVersionUID = 1L;
    private final transient List<Diagnostic> diagnostics;
    private final int dropped;

    /**
     * @param diagnostics the findings (at least one error)
     * @param dropped     how many further errors were not kept because of {@link Limits#MAX_ERRORS}
     */
    public LawException(List<Diagnostic> diagnostics, int dropped) {
        super(render(diagnostics, dropped));
        this.diagnostics = List.copyOf(diagnostics);
        this.dropped = dropped;
    }

    /** @return how many further errors were found but not kept (beyond {@link Limits#MAX_ERRORS}) */
    public int dropped() {
        return dropped;
    }

    /** @return every finding, errors and warnings, in the order reported */
    public List<Diagnostic> diagnostics() {
        return diagnostics;
    }

    /** @return only the errors */
    public List<Diagnostic> errors() {
        return diagnostics.stream().filter(d -> d.severity() == Diagnostic.Severity.ERROR).toList();
    }

    private static String render(List<Diagnostic> diagnostics, int dropped) {
        StringBuilder sb = new StringBuilder();
        for (Diagnostic d : diagnostics) {
            if (sb.length() > 0) {
                sb.append('\n');
            }
            sb.append(d.format());
        }
        if (dropped > 0) {
            sb.append('\n').append(dropped).append(" more error").append(dropped == 1 ? "" : "s")
                    .append(" not shown (limit ").append(Limits.MAX_ERRORS).append(')');
        }
        return sb.toString();
    }
}
