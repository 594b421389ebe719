package dev.lawful.bench;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.dl4j.LawLayer;
import dev.lawful.dl4j.LawPenaltyLoss;
import dev.lawful.dl4j.LawSpec;
import java.util.Locale;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.WorkspaceMode;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.weights.WeightInit;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.lossfunctions.LossFunctions;
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
import org.openjdk.jmh.annotations.TearDown;
import org.openjdk.jmh.annotations.Warmup;

/**
 * One training step ({@code fit} on a batch of 1024, float32, Adam) of a 64-input, 60-output network, without
 * laws ({@code none}), with a law layer of each tier, and with the soft-penalty loss instead ({@code penalty}).
 * Shapes: {@code headline} 64 → 4×256 → 60, {@code small} 64 → 2×128 → 60, {@code large} 64 → 4×1024 → 60 (not in
 * the defaults: {@code -p shape=headline,small,large} for the full grid). Run with {@code OMP_NUM_THREADS=1}
 * ({@code benchmarks/run.sh} sets it). After the trial the largest |C|/scale over the batch is printed, in units of
 * 2⁻²⁴ (float32 rounding), for the law layers: the residual after training.
 *
 * <p>Law sets (demo structures over 60 outputs, 4 laws, completed y[0..3]): constant-affine balances with small
 * integer coefficients; affine laws whose completed output's coefficient depends on a free output
 * ({@code (1 + y[59-k]^2) * y[k] = ...}); nonlinear monotone cubics ({@code y[k]^3 + y[k] = ...}), so every
 * sample has one real root.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Warmup(iterations = 3, time = 2)
@Measurement(iterations = 5, time = 2)
@Fork(1)
public class TrainingStepBench {
    static final int BATCH = 1024;
    static final int FEATURES = 64;
    static final int OUTPUTS = 60;

    @Param({"none", "constant-affine", "affine", "nonlinear", "penalty", "constant-affine+limits"})
    public String laws;

    @Param({"headline", "small"})
    public String shape;

    MultiLayerNetwork net;
    DataSet data;
    LawSet lawSet;

    /**
     * @return a law set of the given tier over 60 outputs with 4 laws completing y[0..3]; {@code TIER+limits} adds a
     *         limit on every output that no sample touches ({@code y >= -1e9}), to measure what limits cost when none
     *         is touched
     */
    static String lawText(String tier) {
        if (tier.endsWith("+limits")) {
            return lawText(tier.substring(0, tier.length() - "+limits".length())) + "limit floor: y >= -1e9\n";
        }
        StringBuilder sb = new StringBuilder("output y[" + OUTPUTS + "]\n");
        for (int k = 0; k < 4; k++) {
            StringBuilder coefficients = new StringBuilder();
            for (int j = 10; j < OUTPUTS; j++) {
                coefficients.append(j > 10 ? ", " : "").append((j * 7 + k * 3) % 5 - 2);
            }
            sb.append("const A").append(k).append(" = [").append(coefficients).append("]\n");
            String lhs = tier.equals("affine") ? "(1 + y[" + (OUTPUTS - 1 - k) + "]^2) * y[" + k + "]"
                    : tier.equals("nonlinear") ? "y[" + k + "]^3 + y[" + k + "]"
                    : "y[" + k + "] + " + (k + 1) + " * y[" + (4 + k) + "]";
            sb.append("law l").append(k).append(": ").append(lhs).append(" = dot(A").append(k).append(", y[10:")
                    .append(OUTPUTS).append("])\n");
        }
        sb.append("complete y[0:4]\n");
        if (tier.equals("nonlinear")) {
            sb.append("guess y[0:4] = 0\n");
        }
        return sb.toString();
    }

    /** Builds the network of this trial's tier and shape, and the batch. */
    @Setup(Level.Trial)
    public void setUp() {
        net = network(laws, shape);
        data = data();
        lawSet = hasLawLayer(laws) ? LawLayer.of(lawText(laws)).lawCompletion().laws() : null;
    }

    /** @return whether the {@code laws} parameter puts a law layer after the head */
    static boolean hasLawLayer(String laws) {
        return !laws.equals("none") && !laws.equals("penalty");
    }

    /** @return the hidden layer widths of {@code headline}, {@code small} or {@code large} */
    static int[] hidden(String shape) {
        switch (shape) {
            case "headline":
                return new int[] {256, 256, 256, 256};
            case "small":
                return new int[] {128, 128};
            case "large":
                return new int[] {1024, 1024, 1024, 1024};
            default:
                throw new IllegalArgumentException("shape: expected headline, small or large, found " + shape);
        }
    }

    /**
     * The float32 network of this suite: dense ReLU layers of {@link #hidden(String)}, an identity head as wide as
     * the free outputs, then the law layer of the tier ({@code none}: none, 60-wide head; {@code penalty}: the
     * soft-penalty loss on the constant-affine laws), then the loss layer.
     *
     * @param laws  none, constant-affine, affine, nonlinear, penalty or constant-affine+limits
     * @param shape headline, small or large
     * @return an initialised network (seed 42, Adam 1e-3, workspaces enabled)
     */
    static MultiLayerNetwork network(String laws, String shape) {
        Nd4j.setDefaultDataTypes(DataType.FLOAT, DataType.FLOAT);
        boolean lawLayer = hasLawLayer(laws);
        LawLayer layer = lawLayer ? LawLayer.of(lawText(laws)) : null;
        int head = lawLayer ? layer.lawCompletion().freeWidth() : OUTPUTS;
        NeuralNetConfiguration.ListBuilder list = new NeuralNetConfiguration.Builder()
                .seed(42).dataType(DataType.FLOAT).updater(new Adam(1e-3)).weightInit(WeightInit.XAVIER)
                .trainingWorkspaceMode(WorkspaceMode.ENABLED).inferenceWorkspaceMode(WorkspaceMode.ENABLED)
                .list();
        int in = FEATURES;
        for (int h : hidden(shape)) {
            list.layer(new DenseLayer.Builder().nIn(in).nOut(h).activation(Activation.RELU).build());
            in = h;
        }
        list.layer(new DenseLayer.Builder().nIn(in).nOut(head).activation(Activation.IDENTITY).build());
        if (lawLayer) {
            list.layer(layer);
        }
        if (laws.equals("penalty")) {
            list.layer(new LossLayer.Builder(LawPenaltyLoss.of(LawSpec.of(lawText("constant-affine")), 1.0))
                    .activation(Activation.IDENTITY).build());
        } else {
            list.layer(new LossLayer.Builder(LossFunctions.LossFunction.MSE).activation(Activation.IDENTITY).build());
        }
        MultiLayerNetwork network = new MultiLayerNetwork(list.build());
        network.init();
        return network;
    }

    /** @return the batch of this suite: {@value #BATCH} rows of uniform features and labels in [-1, 1), seed 7 */
    static DataSet data() {
        SplittableRandom random = new SplittableRandom(7);
        float[] x = new float[BATCH * FEATURES];
        float[] y = new float[BATCH * OUTPUTS];
        for (int i = 0; i < x.length; i++) {
            x[i] = (float) (2 * random.nextDouble() - 1);
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = (float) (2 * random.nextDouble() - 1);
        }
        return new DataSet(Nd4j.create(x, new long[] {BATCH, FEATURES}), Nd4j.create(y, new long[] {BATCH, OUTPUTS}));
    }

    /** One optimiser step on the batch. */
    @Benchmark
    public MultiLayerNetwork fit() {
        net.fit(data);
        return net;
    }

    /** Prints the largest residual of the trained network's outputs, in float32 ulps of each law's scale. */
    @TearDown(Level.Trial)
    public void residualAfterTraining() {
        if (lawSet == null) {
            return;
        }
        INDArray out = net.output(data.getFeatures());
        double[] y = out.castTo(DataType.DOUBLE).dup('c').data().asDouble();
        LawEvaluator e = lawSet.evaluator();
        double[] r = new double[BATCH * e.lawCount()];
        double[] s = new double[BATCH * e.lawCount()];
        e.residuals(null, y, BATCH, r, s);
        double worst = 0;
        for (int i = 0; i < r.length; i++) {
            worst = Math.max(worst, s[i] > 0 ? Math.abs(r[i]) / s[i] : Math.abs(r[i]));
        }
        System.out.printf(Locale.ROOT, "%n[%s %s] after training: max |C|/scale = %.2f float32 ulps (2^-24)%n",
                laws, shape, worst / 0x1p-24);
    }
}
