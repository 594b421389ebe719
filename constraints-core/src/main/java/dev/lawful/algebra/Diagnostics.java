package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/**
 * Collects the findings of one pass over a source. Parsing and checking report here and go on where they can,
 * so a user sees every error of a file at once. At most {@link Limits#MAX_ERRORS} errors are kept; a final note
 * says how many more there were.
 */
public final class Diagnostics {
    private final SourceText source;
    private final List<Diagnostic> list = new ArrayList<>();
    private int errors;
    private int dropped;

    /** @param source the text every span of this reporter refers to */
    public Diagnostics(SourceText source) {
        this.source = source;
    }

    /** @return the text the spans refer to */
    public SourceText source() {
        return source;
    }

    /** Reports an error at {@code span}. */
    public void error(Span span, String message) {
        if (errors >= Limits.MAX_ERRORS) {
            dropped++;
            return;
        }
        errors++;
        list.add(new Diagnostic(Diagnostic.Severity.ERROR, source, clamp(span), message));
    }

    /** Reports a warning at {@code span}; warnings never make a law set invalid. */
    public void warning(Span span, String message) {
        list.add(new Diagnostic(Diagnostic.Severity.WARNING, source, clamp(span), message));
    }

    private Span clamp(Span span) {
        int length = source.text().length();
        int offset = Math.min(span.offset(), length);
        return new Span(offset, Math.min(span.length(), length - offset));
    }

    /** @return whether any error was reported */
    public boolean hasErrors() {
        return errors > 0;
    }

    /** @return whether the error limit was reached, so further checking only adds noise */
    public boolean full() {
        return errors >= Limits.MAX_ERRORS;
    }

    /** @return the findings in the order they were reported */
    public List<Diagnostic> all() {
        return Collections.unmodifiableList(list);
    }

    /** @throws LawException carrying every finding when any error was reported */
    public void throwIfErrors() {
        if (errors > 0) {
            List<Diagnostic> sorted = new ArrayList<>(list);
            // stable: findings at one place keep the order they were reported in
            sorted.sort(java.util.Comparator.comparingInt(d -> d.span().offset()));
            throw new LawException(sorted, dropped);
        }
    }
}
