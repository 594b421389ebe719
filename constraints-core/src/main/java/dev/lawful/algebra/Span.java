package dev.lawful.algebra;

/**
 * A half-open range of characters {@code [offset, offset + length)} in a law source text.
 *
 * @param offset index of the first character, zero-based
 * @param length number of characters; zero marks a position between characters (for example end of file)
 */
public record Span(int offset, int length) {

    /** @throws IllegalArgumentException when offset or length is negative */
    public Span {
        if (offset < 0 || length < 0) {
            throw new IllegalArgumentException("span offset and length must be >= 0, found " + offset + ", " + length);
        }
    }

    /** @return the index just past the last character */
    public int end() {
        return offset + length;
    }

    /** @return the smallest span covering this one and {@code other} */
    public Span to(Span other) {
        int start = Math.min(offset, other.offset);
        return new Span(start, Math.max(end(), other.end()) - start);
    }
}
