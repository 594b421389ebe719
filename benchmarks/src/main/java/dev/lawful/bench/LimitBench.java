package dev.lawful.bench;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OperationsPerInvocation;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;

/**
 * What limits cost in a forward pass: the reformer's element balances with every outlet flow ≥ 0, over a batch in
 * which {@code touched} per cent of the samples complete to a negative flow and must be moved, against the same
 * completion without limits (the baseline). Nanoseconds per sample ({@link OperationsPerInvocation} is the batch).
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class LimitBench {
    static final int BATCH = 1024;
    private static final String REFORMER = String.join("\n",
            "input feed[6] mol/s",
            "output out[6] mol/s",
            "const C = [1, 0, 1, 1, 0, 0]",
            "const H = [4, 2, 0, 0, 2, 0]",
            "const O = [0, 1, 1, 2, 0, 0]",
            "const N = [0, 0, 0, 0, 0, 2]",
            "law carbon: dot(C, out) = dot(C, feed)",
            "law hydrogen: dot(H, out) = dot(H, feed)",
            "law oxygen: dot(O, out) = dot(O, feed)",
            "law nitrogen: dot(N, out) = dot(N, feed)",
            "complete out[2], out[4], out[1], out[5]", "");

    /** Per cent of the batch outside a limit before the step. */
    @Param({"0", "10", "100"})
    public int touched;

    public double[] x;
    public double[] z;
    public double[] y;
    public Completion limited;
    public Completion plain;
    public Completion.Workspace limitedWork;
    public Completion.Workspace plainWork;

    @Setup(Level.Trial)
    public void setUp() {
        limited = Completion.of(LawSet.parse("reformer-limits.law", REFORMER + "limit flows: out >= 0\n"));
        plain = Completion.of(LawSet.parse("reformer.law", REFORMER));
        limitedWork = limited.newWorkspace();
        plainWork = plain.newWorkspace();
        SplittableRandom r = new SplittableRandom(3);
        x = new double[BATCH * 6];
        z = new double[BATCH * 2];
        double[] row = new double[6];
        for (int s = 0; s < BATCH; s++) {
            boolean outside = s * 100 < touched * BATCH;
            // draw until the plain completion of the sample is outside (or inside) as asked, so the fraction is exact
            do {
                for (int i = 0; i < 6; i++) {
                    x[s * 6 + i] = 0.5 + r.nextDouble();
                }
                double carbon = x[s * 6] + x[s * 6 + 2] + x[s * 6 + 3];
                z[s * 2] = carbon * (outside ? 0.9 + 0.2 * r.nextDouble() : 0.05 + 0.1 * r.nextDouble());
                z[s * 2 + 1] = carbon * (outside ? 0.3 : 0.05 + 0.1 * r.nextDouble());
                plain.forward(java.util.Arrays.copyOfRange(x, s * 6, s * 6 + 6),
                        java.util.Arrays.copyOfRange(z, s * 2, s * 2 + 2), 1, row, null, plainWork);
            } while (outside == (java.util.Arrays.stream(row).min().orElseThrow() >= 0));
        }
        y = new double[BATCH * 6];
        byte[] status = new byte[BATCH];
        limited.forward(x, z, BATCH, y, status, limitedWork);
    }

    /** The completion with limits. */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] withLimits() {
        limited.forward(x, z, BATCH, y, null, limitedWork);
        return y;
    }

    /** Baseline: the same completion without limits (outputs may be negative). */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] withoutLimits() {
        plain.forward(x, z, BATCH, y, null, plainWork);
        return y;
    }
}
