package dev.lawful.bench;

import dev.lawful.dl4j.ConstrainedGraph;
import dev.lawful.dl4j.LawSpec;
import java.util.concurrent.TimeUnit;
import org.deeplearning4j.nn.conf.WorkspaceMode;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.MultiDataSet;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.learning.config.Adam;
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
 * The graph path users with input-dependent laws train with: one training step of a {@link ConstrainedGraph}
 * (graph input → ReLU layers of {@link TrainingStepBench#hidden(String)} → free-output head → law vertex → MSE), on
 * the same batch, shapes and tiers as {@link TrainingStepBench}, the laws taking the graph's 64 inputs as law inputs
 * (each law adds {@code u[k]}, so the vertex's input gradient is exercised too). {@code benchmarks/layer-share.sh}
 * with {@code NET=graph} gives the law vertex's share of the step.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Warmup(iterations = 3, time = 2)
@Measurement(iterations = 5, time = 2)
@Fork(1)
public class GraphTrainingStepBench {
    @Param({"none", "constant-affine", "affine", "nonlinear", "constant-affine+limits"})
    public String laws;

    @Param({"headline", "small"})
    public String shape;

    ComputationGraph graph;
    MultiDataSet data;

    /**
     * @return {@link TrainingStepBench#lawText(String)} with the graph's features as law inputs: {@code input
     *         u[64]}, and each law's right-hand side gains {@code + u[k]}
     */
    static String lawText(String tier) {
        String text = TrainingStepBench.lawText(tier);
        StringBuilder sb = new StringBuilder("input u[" + TrainingStepBench.FEATURES + "]\n");
        for (String line : text.split("\n")) {
            sb.append(line.startsWith("law l") ? line + " + u[" + line.charAt(5) + "]" : line).append('\n');
        }
        return sb.toString();
    }

    /** Builds the graph of this trial's tier and shape, and the batch. */
    @Setup(Level.Trial)
    public void setUp() {
        Nd4j.setDefaultDataTypes(DataType.FLOAT, DataType.FLOAT);
        LawSpec spec = LawSpec.of(lawText(laws.equals("none") ? "constant-affine" : laws));
        ConstrainedGraph.Builder b = ConstrainedGraph.builder(spec).hidden(TrainingStepBench.hidden(shape))
                .activation(Activation.RELU).updater(new Adam(1e-3)).dataType(DataType.FLOAT).seed(42)
                .workspaceMode(WorkspaceMode.ENABLED);
        graph = laws.equals("none") ? b.buildUnconstrained() : b.build();
        DataSet d = TrainingStepBench.data();
        data = new MultiDataSet(d.getFeatures(), d.getLabels());
    }

    /** One optimiser step on the batch. */
    @Benchmark
    public ComputationGraph fit() {
        graph.fit(data);
        return graph;
    }
}
