package dev.lawful.bench;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.util.Arrays;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;

/**
 * What the laws cost at inference, in <b>microseconds per batch</b> of {@value TrainingStepBench#BATCH} samples:
 * <ul>
 *   <li>{@code output}: DL4J {@code MultiLayerNetwork.output} of the {@link TrainingStepBench} network (same
 *       shapes, same law sets, float32), without laws ({@code laws=none}, the baseline) and with the law layer of
 *       each tier;</li>
 *   <li>{@code coreForward}: the deployment path without DL4J, {@link Completion#forward(float[], float[], int,
 *       float[], byte[], Completion.Workspace)} on a batch of head outputs (uniform in [-1, 1): the law sets'
 *       cost does not depend on the trained weights);</li>
 *   <li>{@code coreHandWritten}: its baseline, the same completion of that one law set written by hand (each of
 *       the 4 laws solves for its own completed output: a quotient, a product, or scalar Newton on the cubic;
 *       double inside, no checks).</li>
 * </ul>
 * The two states have their own parameters ({@code laws}, {@code shape} for the network; {@code tier} for the
 * core), so each benchmark runs only over its own; the core forks never load ND4J. Full grid:
 * {@code -p shape=headline,small,large}.
 */
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MICROSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class InferenceBench {
    /** A trained-shape network and its input batch. */
    @State(Scope.Thread)
    public static class Network {
        /** none (the baseline), constant-affine, affine or nonlinear. */
        @Param({"none", "constant-affine", "affine", "nonlinear"})
        public String laws;

        /** headline, small or large ({@link TrainingStepBench#hidden(String)}). */
        @Param({"headline"})
        public String shape;

        MultiLayerNetwork net;
        INDArray features;

        /** Builds the network and the batch. */
        @Setup(Level.Trial)
        public void setUp() {
            net = TrainingStepBench.network(laws, shape);
            features = TrainingStepBench.data().getFeatures();
        }
    }

    /** The core completion of one tier's law set and a batch of head outputs. */
    @State(Scope.Thread)
    public static class Core {
        /** constant-affine, affine or nonlinear ({@link TrainingStepBench#lawText(String)}). */
        @Param({"constant-affine", "affine", "nonlinear"})
        public String tier;

        static final int LAWS = 4;
        static final int FIRST_SUMMED = 10;

        Completion completion;
        Completion.Workspace workspace;
        float[] head;
        float[] out;
        int free;
        /** A_k of law k, the coefficients of y[10..60). */
        double[] coefficients;

        /** Builds the completion and the batch, and checks the hand-written kernel against it. */
        @Setup(Level.Trial)
        public void setUp() {
            LawSet laws = LawSet.parse(tier + ".law", TrainingStepBench.lawText(tier));
            completion = Completion.of(laws);
            workspace = completion.newWorkspace();
            free = completion.freeWidth();
            int[] expected = new int[free];
            Arrays.setAll(expected, j -> LAWS + j);
            if (!Arrays.equals(completion.freeOutputs(), expected)) {
                throw new IllegalStateException("free outputs are not y[4:60] in order");
            }
            int summed = TrainingStepBench.OUTPUTS - FIRST_SUMMED;
            coefficients = new double[LAWS * summed];
            for (int k = 0; k < LAWS; k++) {
                for (int j = FIRST_SUMMED; j < TrainingStepBench.OUTPUTS; j++) {
                    coefficients[k * summed + j - FIRST_SUMMED] = (j * 7 + k * 3) % 5 - 2;
                }
            }
            int batch = TrainingStepBench.BATCH;
            head = new float[batch * free];
            SplittableRandom random = new SplittableRandom(7);
            for (int i = 0; i < head.length; i++) {
                head[i] = (float) (2 * random.nextDouble() - 1);
            }
            out = new float[batch * TrainingStepBench.OUTPUTS];
            float[] library = new float[out.length];
            completion.forward(null, head, batch, library, null, workspace);
            handWritten(head, batch, out);
            double largest = 0;
            double worst = 0;
            for (int i = 0; i < out.length; i++) {
                largest = Math.max(largest, Math.abs(library[i]));
                worst = Math.max(worst, Math.abs(library[i] - out[i]));
            }
            if (!(worst <= 1e-6 * Math.max(1, largest))) {
                throw new IllegalStateException("hand-written completion disagrees with the library by " + worst);
            }
        }

        /** The completion of {@link TrainingStepBench#lawText(String)} by hand, into {@code y} (declared order). */
        void handWritten(float[] z, int batch, float[] y) {
            int p = TrainingStepBench.OUTPUTS;
            int summed = p - FIRST_SUMMED;
            int skip = FIRST_SUMMED - LAWS;
            for (int s = 0; s < batch; s++) {
                int zo = s * free;
                int yo = s * p;
                double d0 = 0;
                double d1 = 0;
                double d2 = 0;
                double d3 = 0;
                for (int j = 0; j < summed; j++) {
                    double v = z[zo + skip + j];
                    d0 += coefficients[j] * v;
                    d1 += coefficients[summed + j] * v;
                    d2 += coefficients[2 * summed + j] * v;
                    d3 += coefficients[3 * summed + j] * v;
                }
                y[yo] = (float) complete(0, d0, z, zo);
                y[yo + 1] = (float) complete(1, d1, z, zo);
                y[yo + 2] = (float) complete(2, d2, z, zo);
                y[yo + 3] = (float) complete(3, d3, z, zo);
                System.arraycopy(z, zo, y, yo + LAWS, free);
            }
        }

        private double complete(int k, double rhs, float[] z, int zo) {
            if (tier.equals("constant-affine")) {
                // y[k] + (k+1) y[4+k] = rhs; y[4+k] is free output k
                return rhs - (k + 1) * (double) z[zo + k];
            }
            if (tier.equals("affine")) {
                // (1 + y[59-k]^2) y[k] = rhs; y[59-k] is the last free outputs
                double c = z[zo + free - 1 - k];
                return rhs / (1 + c * c);
            }
            // y^3 + y = rhs by Newton from 0, to rounding level of the larger side
            double v = 0;
            for (int iteration = 0; iteration < 60; iteration++) {
                double residual = v * v * v + v - rhs;
                if (Math.abs(residual) <= 0x1p-50 * (Math.abs(v * v * v) + Math.abs(v) + Math.abs(rhs))) {
                    break;
                }
                v -= residual / (3 * v * v + 1);
            }
            return v;
        }
    }

    /** DL4J inference of the whole network on the batch, with or without the law layer. */
    @Benchmark
    public INDArray output(Network network) {
        return network.net.output(network.features);
    }

    /** The core alone: complete a batch of head outputs (float in and out, double inside). */
    @Benchmark
    public float[] coreForward(Core core) {
        core.completion.forward(null, core.head, TrainingStepBench.BATCH, core.out, null, core.workspace);
        return core.out;
    }

    /** Baseline of {@code coreForward}: the same completion written by hand for this law set. */
    @Benchmark
    public float[] coreHandWritten(Core core) {
        core.handWritten(core.head, TrainingStepBench.BATCH, core.out);
        return core.out;
    }
}
