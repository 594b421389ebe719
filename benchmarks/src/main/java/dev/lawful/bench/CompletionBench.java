package dev.lawful.bench;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.util.Arrays;
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
 * Completion forward and backward per sample for one law set of each tier, double and float entry points. Scores
 * are nanoseconds per sample ({@link OperationsPerInvocation} is the batch). The hand-written baseline for the
 * constant-affine tier is the folded matrix-vector product alone.
 *
 * <p>Law sets (demo structures): {@code constant-affine}: the reformer element balances (6 outputs, 4 laws);
 * {@code affine}: column water and energy budgets whose layer weights are input pressure thicknesses (16
 * outputs, 2 laws, the completed outputs' coefficients depend on the inputs); {@code nonlinear}: a
 * counterflow exchanger energy balance with a cubic heat capacity (2 outputs, 1 law, Newton).
 *
 * <p>These are the law sets README quotes; {@link KernelBench} measures the same entry points on generated law
 * sets over batch, free outputs and laws, against full hand-written and ND4J baselines.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class CompletionBench {
    static final int BATCH = 1024;

    static final String CONSTANT_AFFINE = EvaluatorBench.REFORMER + "complete out[2], out[4], out[1], out[5]\n";

    static final String AFFINE = String.join("\n",
            "input dp[8] Pa", "input evaporation kg/(m2 s)", "input flux W/m2",
            "output dq[8] 1/s", "output dT[8] K/s",
            "const g = 9.80665 m/s2", "const cp = 1004 J/(kg K)",
            "law water: sum(dp * dq) / g = evaporation",
            "law energy: cp * sum(dp * dT) / g = flux",
            "complete dq[0], dT[0]", "");

    static final String NONLINEAR = EvaluatorBench.EXCHANGER.replace("law energy: Hh = Hc",
            "law energy: Hh = Hc\nguess Tc_out = Tc_in + (Th_in - Tc_in) / 2\ncomplete Tc_out");

    @Param({"constant-affine", "affine", "nonlinear"})
    public String tier;

    Completion completion;
    Completion.Workspace workspace;
    double[] x;
    double[] z;
    double[] y;
    double[] gy;
    double[] gz;
    double[] gx;
    float[] xf;
    float[] zf;
    float[] yf;
    double[] foldedM;
    /** The baseline's own rows (the reformer's six outputs and two free ones), whatever the tier's law set. */
    double[] baseY;
    double[] baseZ;

    @Setup(Level.Trial)
    public void setUp() {
        String text = tier.equals("constant-affine") ? CONSTANT_AFFINE : tier.equals("affine") ? AFFINE : NONLINEAR;
        LawSet laws = LawSet.parse(tier + ".law", text);
        completion = Completion.of(laws);
        workspace = completion.newWorkspace();
        SplittableRandom random = new SplittableRandom(7);
        x = new double[BATCH * completion.inputWidth()];
        z = new double[BATCH * completion.freeWidth()];
        for (int i = 0; i < x.length; i++) {
            x[i] = tier.equals("nonlinear") ? (i % 4 < 2 ? 300 + 100 * random.nextDouble() : 1 + random.nextDouble())
                    : 1 + random.nextDouble();
        }
        for (int i = 0; i < z.length; i++) {
            z[i] = tier.equals("nonlinear") ? 300 + 50 * random.nextDouble() : random.nextDouble();
        }
        if (tier.equals("nonlinear")) {
            // hot inlet above cold inlet, hot outlet between them: a physical exchanger
            for (int s = 0; s < BATCH; s++) {
                x[4 * s] = 380 + 20 * random.nextDouble();
                x[4 * s + 1] = 290 + 10 * random.nextDouble();
                z[s] = 330 + 20 * random.nextDouble();
            }
        }
        y = new double[BATCH * completion.outputWidth()];
        gy = new double[y.length];
        Arrays.fill(gy, 1.0);
        gz = new double[z.length];
        gx = new double[x.length];
        xf = new float[x.length];
        zf = new float[z.length];
        yf = new float[y.length];
        for (int i = 0; i < x.length; i++) {
            xf[i] = (float) x[i];
        }
        for (int i = 0; i < z.length; i++) {
            zf[i] = (float) z[i];
        }
        completion.forward(x, z, BATCH, y, null, workspace);
        foldedM = new double[4 * 2];
        baseY = new double[BATCH * 6];
        baseZ = new double[BATCH * 2];
        for (int i = 0; i < baseZ.length; i++) {
            baseZ[i] = random.nextDouble();
        }
        for (int i = 0; i < foldedM.length; i++) {
            foldedM[i] = random.nextDouble();
        }
    }

    /** Forward, double entry point: completed outputs with every law at rounding level. */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] forward() {
        completion.forward(x, z, BATCH, y, null, workspace);
        return y;
    }

    /** Forward, float entry point. */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public float[] forwardFloat() {
        completion.forward(xf, zf, BATCH, yf, null, workspace);
        return yf;
    }

    /** Backward: gradients on the free outputs and the inputs. */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] backward() {
        completion.backward(x, y, gy, BATCH, gz, gx, workspace);
        return gz;
    }

    /**
     * Baseline: the folded product y_c = M z alone for a 4×2 M (the reformer's shape), no refinement and no
     * residual check: the practical limit of the constant-affine tier.
     */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] foldedProductBaseline() {
        for (int s = 0; s < BATCH; s++) {
            for (int r = 0; r < 4; r++) {
                baseY[s * 6 + r] = foldedM[r * 2] * baseZ[s * 2] + foldedM[r * 2 + 1] * baseZ[s * 2 + 1];
            }
        }
        return baseY;
    }
}
