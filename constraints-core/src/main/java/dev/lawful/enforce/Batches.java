package dev.lawful.enforce;

/**
 * Copying between caller batches (double or float) and the enforcers' double work arrays. The {@code Object}
 * forms take either kind, so an enforcer writes its chunk loop once for both entry points.
 */
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

    /** Copies or widens {@code count} values from a {@code double[]} or {@code float[]} batch (null when 0). */
    static void load(Object src, int from, double[] dst, int count) {
        if (count == 0) {
            return;
        }
        if (src instanceof double[] d) {
            load(d, from, dst, count);
        } else {
            load((float[]) src, from, dst, count);
        }
    }

    /** Copies or rounds {@code count} values into a {@code double[]} or {@code float[]} batch at {@code to}. */
    static void store(double[] src, Object dst, int to, int count) {
        if (count == 0) {
            return;
        }
        if (dst instanceof double[] d) {
            System.arraycopy(src, 0, d, to, count);
        } else {
            store(src, (float[]) dst, to, count);
        }
    }
}
