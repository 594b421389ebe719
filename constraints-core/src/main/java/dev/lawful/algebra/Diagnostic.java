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
     * line, at least one).
     *
     * @return the formatted finding, ending without a newline
     */
    public String format() {
        int line = line();
        int column = column();
        String text = source.lineText(line);
        StringBuilder sb = new StringBuilder();
        sb.append(source.name()).append(':').append(line).append(':').append(column).append(": ");
        if (severity == Severity.WARNING) {
            sb.append("warning: ");
        }
        sb.append(message).append('\n');
        sb.append(text).append('\n');
        for (int i = 1; i < column; i++) {
            sb.append(i - 1 < text.length() && text.charAt(i - 1) == '\t' ? '\t' : ' ');
        }
        int carets = Math.max(1, Math.min(span.length(), text.length() - column + 1));
        sb.append("^".repeat(carets));
        return sb.toString();
    }

    @Override
    public String toString() {
        return format();
    }
}
