package dev.lawful.algebra;

/**
 * One finding about a law source: where it is and what is wrong.
 *
 * @param severity error or warning
 * @param source   the text the position refers to
 * @param span     the characters the finding is about
 * @param message  what was expected and what was found, in one sentence without a trailing period
 */
public record Diagnostic(Severity severity, SourceText source, Span span, String message) {

    /** How serious a finding is. Only errors make a law set invalid. */
    public enum Severity { ERROR, WARNING }

    /** @return the one-based line of the start of {@link #span()} */
    public int line() {
        return source.line(span.offset());
    }

    /** @return the one-based column of the start of {@link #span()} */
    public int column() {
        return source.column(span.offset());
    }

    /**
     * Formats the finding as three lines: {@code name:line:column: message} (warnings say {@code warning:} before
     * the message), the source line, and carets under the place (one caret per character of the span on that
     * line, at least one). A line longer than 120 characters is shown as a 120-character window around the place,
     * with {@code ...} where it was cut.
     *
     * @return the formatted finding, ending without a newline
     */
    public String format() {
        int line = line();
        int column = column();
        String text = source.lineText(line);
        int at = column - 1;
        int from = 0;
        int to = text.length();
        if (text.length() > MAX_SHOWN) {
            // very long lines are shown as a window around the place, marked with ellipses
            from = Math.max(0, Math.min(at - MAX_SHOWN / 2, text.length() - MAX_SHOWN));
            to = Math.min(text.length(), from + MAX_SHOWN);
        }
        String head = from > 0 ? "..." : "";
        StringBuilder sb = new StringBuilder();
        sb.append(source.name()).append(':').append(line).append(':').append(column).append(": ");
        if (severity == Severity.WARNING) {
            sb.append("warning: ");
        }
        sb.append(message).append('\n');
        sb.append(head).append(text, from, to).append(to < text.length() ? "..." : "").append('\n');
        sb.append(" ".repeat(head.length()));
        for (int i = from; i < at; i++) {
            sb.append(i < text.length() && text.charAt(i) == '\t' ? '\t' : ' ');
        }
        int carets = Math.max(1, Math.min(span.length(), to - at));
        sb.append("^".repeat(carets));
        return sb.toString();
    }

    /** Longest part of a source line shown under a message. */
    private static final int MAX_SHOWN = 120;

    @Override
    public String toString() {
        return format();
    }
}
