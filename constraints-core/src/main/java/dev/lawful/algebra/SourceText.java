package dev.lawful.algebra;

import java.util.Arrays;
import java.util.Objects;

/**
 * A named law source text with line bookkeeping, so diagnostics can be printed as {@code name:line:column}.
 * Lines and columns are one-based; a column counts characters (tabs count as one).
 */
public final class SourceText {
    private final String name;
    private final String text;
    private final int[] lineStarts;

    /**
     * @param name shown in diagnostics, usually the file name
     * @param text the whole source
     */
    public SourceText(String name, String text) {
        this.name = Objects.requireNonNull(name, "name");
        this.text = Objects.requireNonNull(text, "text");
        int[] starts = new int[16];
        int count = 0;
        starts[count++] = 0;
        for (int i = 0; i < text.length(); i++) {
            if (text.charAt(i) == '\n') {
                if (count == starts.length) {
                    starts = Arrays.copyOf(starts, count * 2);
                }
                starts[count++] = i + 1;
            }
        }
        this.lineStarts = Arrays.copyOf(starts, count);
    }

    /** @return the name shown in diagnostics */
    public String name() {
        return name;
    }

    /** @return the whole source text */
    public String text() {
        return text;
    }

    /** @return the one-based line holding {@code offset} (an offset at the very end maps to the last line) */
    public int line(int offset) {
        int i = Arrays.binarySearch(lineStarts, Math.min(Math.max(offset, 0), text.length()));
        return i >= 0 ? i + 1 : -i - 1;
    }

    /** @return the one-based column of {@code offset} within its line */
    public int column(int offset) {
        int clamped = Math.min(Math.max(offset, 0), text.length());
        return clamped - lineStarts[line(clamped) - 1] + 1;
    }

    /** @return the text of the one-based {@code line}, without its line terminator */
    public String lineText(int line) {
        int start = lineStarts[line - 1];
        int end = line < lineStarts.length ? lineStarts[line] - 1 : text.length();
        if (end > start && text.charAt(end - 1) == '\r') {
            end--;
        }
        return text.substring(start, Math.max(start, end));
    }

    /** @return the source text covered by {@code span} */
    public String slice(Span span) {
        return text.substring(span.offset(), Math.min(span.end(), text.length()));
    }
}
