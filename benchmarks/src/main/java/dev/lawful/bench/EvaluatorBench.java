package dev.lawful.bench;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
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
 * Throughput of the compiled law evaluator per sample, against the same residuals written by hand.
 *
 * <p>Law sets: {@code reformer} (four element balances over six species, constant coefficients) and
 * {@code exchanger} (an energy balance with a cubic heat-capacity polynomial integrated in closed form, nonlinear
 * in the outlet temperatures). Scores are nanoseconds per sample ({@link OperationsPerInvocation} is the batch).
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class EvaluatorBench {
    static final int BATCH = 1024;

    static final String REFORMER = String.join("\n",
            "input feed[6] mol/s",
            "output out[6] mol/s",
            "const C = [1, 0, 1, 1, 0, 0]",
            "const H = [4, 2, 0, 0, 2, 0]",
            "const O = [0, 1, 1, 2, 0, 0]",
            "law carbon: dot(C, out) = dot(C, feed)",
            "law hydrogen: dot(H, out) = dot(H, feed)",
            "law oxygen: dot(O, out) = dot(O, feed)",
            "law nitrogen: out[5] = feed[5]", "");

    // demo coefficients of a cubic c_p(T) in J/(kg K); the integral is written out so the law is polynomial
    static final String EXCHANGER = String.join("\n",
            "input Th_in K", "input Tc_in K", "input mh kg/s", "input mc kg/s",
            "output Th_out K", "output Tc_out K",
            "const a = 1000 J/(kg K)", "const b = 0.1 J/(kg K2)", "const c = 1e-4 J/(kg K3)", "const d = 1e-8 J/(kg K4)",
            "let Hh = mh * (a * (Th_in - Th_out) + b / 2 * (Th_in^2 - Th_out^2) + c / 3 * (Th_in^3 - Th_out^3)"
                    + " + d / 4 * (Th_in^4 - Th_out^4))",
            "let Hc = mc * (a * (Tc_out - Tc_in) + b / 2 * (Tc_out^2 - Tc_in^2) + c / 3 * (Tc_out^3 - Tc_in^3)"
                    + " + d / 4 * (Tc_out^4 - Tc_in^4))",
            "law energy: Hh = Hc", "");

    @Param({"reformer", "exchanger"})
    public String laws;

    LawEvaluator evaluator;
    LawEvaluator.Workspace workspace;
    double[] x;
    double[] y;
    double[] residuals;
    double[] scales;
    double[] jacobianY;
    double[] jacobianX;

    @Setup(Level.Trial)
    public void setUp() {
        LawSet set = LawSet.parse(laws + ".law", laws.equals("reformer") ? REFORMER : EXCHANGER);
        evaluator = set.evaluator();
        workspace = evaluator.newWorkspace();
        SplittableRandom random = new SplittableRandom(42);
        x = new double[BATCH * set.inputWidth()];
        y = new double[BATCH * set.outputWidth()];
        for (int i = 0; i < x.length; i++) {
            x[i] = laws.equals("reformer") ? random.nextDouble() : 300 + 100 * random.nextDouble();
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = laws.equals("reformer") ? random.nextDouble() : 300 + 100 * random.nextDouble();
        }
        residuals = new double[BATCH * evaluator.lawCount()];
        scales = new double[BATCH * evaluator.lawCount()];
        jacobianY = new double[BATCH * evaluator.outputNonzeros()];
        jacobianX = new double[BATCH * evaluator.inputNonzeros()];
    }

    /** Residuals and natural scales of every law. */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] residuals() {
        evaluator.residuals(x, y, BATCH, residuals, scales, workspace);
        return residuals;
    }

    /** Residuals, scales and every Jacobian entry (dC/dy and dC/dx). */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] residualsAndJacobians() {
        evaluator.evaluate(x, y, BATCH, residuals, scales, jacobianY, jacobianX, workspace);
        return jacobianY;
    }

    /** Baseline: the same residuals written by hand for this one law set (plain sums, no compensation). */
    @Benchmark
    @OperationsPerInvocation(BATCH)
    public double[] handWritten() {
        if (laws.equals("reformer")) {
            for (int s = 0; s < BATCH; s++) {
                int i = s * 6;
                int r = s * 4;
                residuals[r] = y[i] + y[i + 2] + y[i + 3] - x[i] - x[i + 2] - x[i + 3];
                residuals[r + 1] = 4 * y[i] + 2 * y[i + 1] + 2 * y[i + 4] - 4 * x[i] - 2 * x[i + 1] - 2 * x[i + 4];
                residuals[r + 2] = y[i + 1] + y[i + 2] + 2 * y[i + 3] - x[i + 1] - x[i + 2] - 2 * x[i + 3];
                residuals[r + 3] = y[i + 5] - x[i + 5];
            }
        } else {
            for (int s = 0; s < BATCH; s++) {
                double thi = x[4 * s];
                double tci = x[4 * s + 1];
                double mh = x[4 * s + 2];
                double mc = x[4 * s + 3];
                double tho = y[2 * s];
                double tco = y[2 * s + 1];
                residuals[s] = mh * enthalpy(thi, tho) - mc * enthalpy(tco, tci);
            }
        }
        return residuals;
    }

    private static double enthalpy(double t1, double t2) {
        return 1000 * (t1 - t2) + 0.1 / 2 * (t1 * t1 - t2 * t2) + 1e-4 / 3 * (t1 * t1 * t1 - t2 * t2 * t2)
                + 1e-8 / 4 * (t1 * t1 * t1 * t1 - t2 * t2 * t2 * t2);
    }
}
