package dev.lawful.algebra;

import java.util.List;
import java.util.SplittableRandom;
import java.util.function.Consumer;

/**
 * Repeatable randomised trials for property tests, on JUnit alone. Each trial gets its own generator seeded from
 * the property's seed and the trial number, so a failure names the seed that reproduces it:
 * {@code -Dlawful.trial.seed=S} runs only that trial. There is no shrinking: a property should put the input it
 * generated into its assertion messages.
 *
 * <p>The helpers below are the few generator pieces the properties share. The number helpers return a bound now
 * and then, because boundaries are where most mistakes are.
 */
final class Trials {
    private static final long GOLDEN = 0x9E3779B97F4A7C15L;

    private Trials() {
    }

    /**
     * Runs {@code property} on {@code tries} generators.
     *
     * @param name     shown in a failure
     * @param seed     the property's fixed base seed
     * @param tries    number of trials
     * @param property the check; it throws (an assertion error) when the property does not hold
     */
    static void run(String name, long seed, int tries, Consumer<SplittableRandom> property) {
        String only = System.getProperty("lawful.trial.seed");
        if (only != null) {
            property.accept(new SplittableRandom(Long.parseLong(only)));
            return;
        }
        for (int i = 0; i < tries; i++) {
            long s = seed + GOLDEN * i;
            try {
                property.accept(new SplittableRandom(s));
            } catch (AssertionError | RuntimeException | StackOverflowError e) {
                throw new AssertionError(name + ": trial " + i + " of " + tries + " failed; rerun it alone with"
                        + " -Dlawful.trial.seed=" + s + "\n" + e, e);
            }
        }
    }

    /** @return an element of {@code options}, each equally likely */
    static <T> T pick(SplittableRandom r, List<T> options) {
        return options.get(r.nextInt(options.size()));
    }

    /** @return an index into {@code weights}, chosen with probability {@code weights[i] / sum(weights)} */
    static int weighted(SplittableRandom r, int... weights) {
        int total = 0;
        for (int w : weights) {
            total += w;
        }
        int x = r.nextInt(total);
        int i = 0;
        while (x >= weights[i]) {
            x -= weights[i++];
        }
        return i;
    }

    /** Shuffles {@code list} in place, every order equally likely (Fisher-Yates). */
    static <T> void shuffle(SplittableRandom r, List<T> list) {
        for (int i = list.size() - 1; i > 0; i--) {
            int j = r.nextInt(i + 1);
            list.set(i, list.set(j, list.get(i)));
        }
    }

    /**
     * @return a number in {@code [min, max]} ({@code max < Long.MAX_VALUE}): one time in ten one of {@code min},
     *         {@code min + 1}, {@code max - 1}, {@code max} (clamped to the range), otherwise uniform
     */
    static long between(SplittableRandom r, long min, long max) {
        if (r.nextInt(10) == 0) {
            long[] edges = {min, min + 1, max - 1, max};
            return Math.max(min, Math.min(max, edges[r.nextInt(edges.length)]));
        }
        return r.nextLong(min, max + 1);
    }

    /** @return {@link #between(SplittableRandom, long, long)} for ints */
    static int between(SplittableRandom r, int min, int max) {
        return (int) between(r, (long) min, (long) max);
    }

    /**
     * @return a container size in {@code [0, max]}: half the time uniform, half the time skewed to small sizes
     *         ({@code max * u^3}), so short inputs are common as well as long ones; the edges now and then
     */
    static int size(SplittableRandom r, int max) {
        if (r.nextBoolean()) {
            return between(r, 0, max);
        }
        double u = r.nextDouble();
        return (int) Math.round(max * u * u * u);
    }
}
