package dev.lawful.enforce;

/** Copying between caller batches (double or float) and the enforcers' double work arrays. */
final class Batches {
    private Batches() {
    }

    /** Copies {@code count} values from {@code src[from..]} to the start of {@code dst}. */
    static void load(double[] src, int from, double[] dst, int count) {
        if (count > 0) {
            System.arraycopy(src, from, dst, 0, count);
        }
    }

    /** Widens {@code count} floats from {@code src[from..]} to the start of {@code dst}. */
    static void load(float[] src, int from, double[] dst, int count) {
        for (int i = 0; i < count; i++) {
            dst[i] = src[from + i];
        }
    }

    /** Rounds {@code count} values from the start of {@code src} to float, into {@code dst[to..]}. */
    static void store(double[] src, float[] dst, int to, int count) {
        for (int i = 0; i < count; i++) {
            dst[to + i] = (float) src[i];
        }
    }
}
