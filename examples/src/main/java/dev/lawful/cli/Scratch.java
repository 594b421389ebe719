package dev.lawful.cli;

/**
 * Per-thread work arrays for the chunk pipeline, so that a worker allocates nothing per chunk once its arrays have
 * grown to the largest chunk: a steady stream of fresh arrays is what makes the collector grow the default heap far
 * beyond what the work needs (docs/design-notes.md, "Streaming the command line"). An array handed out is valid
 * until the same thread asks for the same slot again; it may be longer than asked for, and holds whatever the last
 * use left (the caller writes every element it reads).
 */
final class Scratch {
    /** Slots of double arrays. */
    static final int VALUES = 0;
    static final int X = 1;
    static final int REST = 2;
    static final int Y = 3;
    static final int RESIDUAL = 4;
    static final int SCALE = 5;
    private static final int SLOTS = 6;
    private static final ThreadLocal<Scratch> PER_THREAD = ThreadLocal.withInitial(Scratch::new);

    private final double[][] doubles = new double[SLOTS][0];
    private long[] longs = new long[0];
    private byte[] bytes = new byte[0];

    private Scratch() {
    }

    /** @return this thread's double array of slot {@code slot}, at least {@code n} long */
    static double[] doubles(int slot, int n) {
        Scratch s = PER_THREAD.get();
        if (s.doubles[slot].length < n) {
            s.doubles[slot] = new double[n];
        }
        return s.doubles[slot];
    }

    /** @return this thread's long array, at least {@code n} long */
    static long[] longs(int n) {
        Scratch s = PER_THREAD.get();
        if (s.longs.length < n) {
            s.longs = new long[n];
        }
        return s.longs;
    }

    /** @return this thread's byte array, at least {@code n} long, its first {@code n} bytes zero */
    static byte[] zeroBytes(int n) {
        Scratch s = PER_THREAD.get();
        if (s.bytes.length < n) {
            s.bytes = new byte[n];
        }
        java.util.Arrays.fill(s.bytes, 0, n, (byte) 0);
        return s.bytes;
    }
}
