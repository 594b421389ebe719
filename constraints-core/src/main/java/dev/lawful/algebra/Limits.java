package dev.lawful.algebra;

/**
 * Hard limits that keep a hostile or broken law file from exhausting the stack, the heap or the clock. Each is
 * reported as an ordinary diagnostic when exceeded.
 */
public final class Limits {
    /** Largest accepted source, in characters (about 1 MiB). */
    public static final int MAX_SOURCE_CHARS = 1 << 20;
    /** Deepest expression tree: every operator, call, index and parenthesis counts one level. */
    public static final int MAX_NESTING_DEPTH = 256;
    /** Longest vector (declared or literal). */
    public static final int MAX_VECTOR_LENGTH = 100_000;
    /** Most scalar expression nodes one law set may expand into, derivatives included. */
    public static final int MAX_SCALAR_NODES = 2_000_000;
    /** Largest magnitude of a unit exponent (m^k). */
    public static final int MAX_UNIT_EXPONENT = 64;
    /** Errors kept per pass; the rest are counted. */
    public static final int MAX_ERRORS = 50;

    private Limits() {
    }
}
