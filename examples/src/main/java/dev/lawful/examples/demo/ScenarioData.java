package dev.lawful.examples.demo;

import dev.lawful.examples.TruthModel;
import java.util.SplittableRandom;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.stream.IntStream;

/**
 * A scenario's generated data: {@code rows} input rows drawn by the truth model from one seeded generator, and the
 * true outputs it computes for them (in parallel; the result does not depend on the thread count). Rows whose
 * computation does not converge are left out and counted, never kept with wrong values.
 *
 * @param x       inputs, {@code rows × inputWidth}, the law file's declared order and units
 * @param y       true outputs, {@code rows × outputWidth}
 * @param rows    number of rows kept
 * @param dropped rows left out because the truth computation did not converge
 */
public record ScenarioData(double[] x, double[] y, int rows, int dropped) {

    /**
     * @param truth    the truth model
     * @param rows     rows to draw
     * @param seed     seed of the input generator
     * @param progress where to report progress
     * @param label    the task name shown
     * @return the data
     */
    public static ScenarioData generate(TruthModel truth, int rows, long seed, Progress progress, String label) {
        int k = truth.inputWidth();
        int p = truth.outputWidth();
        double[] x = new double[rows * k];
        SplittableRandom random = new SplittableRandom(seed);
        for (int s = 0; s < rows; s++) {
            truth.sample(random, x, s * k);
        }
        double[] y = new double[rows * p];
        boolean[] ok = new boolean[rows];
        AtomicInteger done = new AtomicInteger();
        try (Progress.Task task = progress.start(label, rows)) {
            IntStream.range(0, rows).parallel().forEach(s -> {
                try {
                    truth.solve(x, s * k, y, s * p);
                    ok[s] = true;
                } catch (IllegalStateException e) {
                    ok[s] = false;
                }
                int d = done.incrementAndGet();
                if ((d & 255) == 0 || d == rows) {
                    synchronized (task) {
                        task.stepTo(d);
                    }
                }
            });
        }
        int kept = 0;
        for (int s = 0; s < rows; s++) {
            if (ok[s]) {
                if (kept != s) {
                    System.arraycopy(x, s * k, x, kept * k, k);
                    System.arraycopy(y, s * p, y, kept * p, p);
                }
                kept++;
            }
        }
        if (kept < 10) {
            throw new IllegalStateException("the truth model of " + truth.lawFile() + " converged on only " + kept
                    + " of " + rows + " rows; the demo needs at least 10");
        }
        return new ScenarioData(java.util.Arrays.copyOf(x, kept * k), java.util.Arrays.copyOf(y, kept * p), kept,
                rows - kept);
    }
}
