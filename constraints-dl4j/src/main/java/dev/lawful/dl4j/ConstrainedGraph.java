package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.Objects;
import org.deeplearning4j.nn.conf.ComputationGraphConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.WorkspaceMode;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.weights.WeightInit;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.learning.config.IUpdater;
import org.nd4j.linalg.lossfunctions.ILossFunction;
import org.nd4j.linalg.lossfunctions.impl.LossMSE;

/**
 * Wires a constrained {@code ComputationGraph} so users need not learn vertex plumbing:
 * <pre>
 *   "x" (the law inputs) → "hidden0" … "hidden{k-1}" (dense) → "head" (dense, freeWidth, identity)
 *   ("x", "head") → "laws" ({@link LawVertex}) → "loss" (loss layer, identity)
 * </pre>
 * The network input is the law set's inputs in declared order and units; the labels are all outputs in declared
 * order. {@code graph.output(x)[0]} then gives outputs for which every law holds.
 *
 * <p>With {@link Builder#normalizedWith(DataNormalization)} the graph trains on normalised features and labels (the
 * normalizer's statistics are folded into the law vertex, see {@link LawVertex#normalizedWith}): its input is then
 * the normalised law inputs, its output the normalised outputs, and the laws hold on the outputs mapped back to
 * physical units ({@code LawVertex.getOutputScaling().toPhysical}, or {@code normalizer.revertLabels}).
 */
public final class ConstrainedGraph {
    /** Name of the network input (the law inputs x). */
    public static final String INPUT = "x";
    /** Name of the dense head that predicts the free outputs. */
    public static final String HEAD = "head";
    /** Name of the law vertex. */
    public static final String LAWS = "laws";
    /** Name of the loss layer (the graph's output). */
    public static final String OUTPUT = "loss";

    private ConstrainedGraph() {
    }

    /**
     * @param spec the laws; they must declare inputs (the network input), otherwise use {@link LawLayer}
     * @return a builder
     */
    public static Builder builder(LawSpec spec) {
        return new Builder(spec);
    }

    /** Settings of a constrained graph; every setting has a default. */
    public static final class Builder {
        private final LawSpec spec;
        private int[] hidden = {32, 32};
        private Activation activation = Activation.TANH;
        private IUpdater updater = new Adam(1e-2);
        private DataType dataType = DataType.FLOAT;
        private ILossFunction loss = new LossMSE();
        private long seed = 12345;
        private WorkspaceMode workspaceMode = WorkspaceMode.ENABLED;
        private LawVertex normalizedVertex;

        private Builder(LawSpec spec) {
            this.spec = Objects.requireNonNull(spec, "spec");
        }

        /** Widths of the dense hidden layers (default 32, 32); none connects the input straight to the head. */
        public Builder hidden(int... widths) {
            for (int w : widths) {
                if (w < 1) {
                    throw new IllegalArgumentException("hidden layer widths must be at least 1, found " + w);
                }
            }
            this.hidden = widths.clone();
            return this;
        }

        /** Activation of the hidden layers (default tanh); the head is always identity. */
        public Builder activation(Activation activation) {
            this.activation = Objects.requireNonNull(activation, "activation");
            return this;
        }

        /** Updater (default Adam, learning rate 0.01). */
        public Builder updater(IUpdater updater) {
            this.updater = Objects.requireNonNull(updater, "updater");
            return this;
        }

        /** The network's data type (default FLOAT); the laws are enforced in double either way. */
        public Builder dataType(DataType dataType) {
            this.dataType = Objects.requireNonNull(dataType, "dataType");
            return this;
        }

        /** Loss on the full output vector (default mean squared error). */
        public Builder loss(ILossFunction loss) {
            this.loss = Objects.requireNonNull(loss, "loss");
            return this;
        }

        /** Seed of the weight initialisation (default 12345). */
        public Builder seed(long seed) {
            this.seed = seed;
            return this;
        }

        /** Workspace mode for training and inference (default ENABLED). */
        public Builder workspaceMode(WorkspaceMode mode) {
            this.workspaceMode = Objects.requireNonNull(mode, "mode");
            return this;
        }

        /**
         * Trains on data normalised by {@code normalizer} while the laws hold in physical units: folds its feature and
         * label statistics into the law vertex ({@link LawVertex#normalizedWith}). Fit it first with
         * {@code normalizer.fitLabel(true); normalizer.fit(iterator);} and normalise the training data with it.
         *
         * @param normalizer a fitted {@code NormalizerStandardize} or {@code NormalizerMinMaxScaler} with labels
         * @return this builder
         * @throws IllegalArgumentException when the normalizer does not match the law set (the message says what to
         *         change)
         */
        public Builder normalizedWith(DataNormalization normalizer) {
            this.normalizedVertex = new LawVertex(spec).normalizedWith(normalizer);
            return this;
        }

        /**
         * @return the configuration
         * @throws IllegalArgumentException when the law set declares no inputs (use {@link LawLayer})
         * @throws dev.lawful.algebra.LawException when the laws cannot be completed
         */
        public ComputationGraphConfiguration configuration() {
            Completion c = spec.completion();
            if (c.inputWidth() == 0) {
                throw new IllegalArgumentException("the law set declares no inputs, so there is nothing to connect to"
                        + " the law vertex's first input; use LawLayer after the head of a MultiLayerNetwork");
            }
            ComputationGraphConfiguration.GraphBuilder g = new NeuralNetConfiguration.Builder()
                    .seed(seed)
                    .dataType(dataType)
                    .updater(updater)
                    .weightInit(WeightInit.XAVIER)
                    .trainingWorkspaceMode(workspaceMode)
                    .inferenceWorkspaceMode(workspaceMode)
                    .graphBuilder()
                    .addInputs(INPUT)
                    .setInputTypes(InputType.feedForward(c.inputWidth()));
            String previous = INPUT;
            int width = c.inputWidth();
            for (int i = 0; i < hidden.length; i++) {
                String name = "hidden" + i;
                g.addLayer(name, new DenseLayer.Builder().nIn(width).nOut(hidden[i]).activation(activation).build(),
                        previous);
                previous = name;
                width = hidden[i];
            }
            g.addLayer(HEAD, new DenseLayer.Builder().nIn(width).nOut(c.freeWidth()).activation(Activation.IDENTITY)
                    .build(), previous);
            LawVertex vertex = normalizedVertex == null ? new LawVertex(spec) : normalizedVertex.clone();
            g.addVertex(LAWS, vertex, INPUT, HEAD);
            g.addLayer(OUTPUT, new LossLayer.Builder().lossFunction(loss).activation(Activation.IDENTITY).build(), LAWS);
            g.setOutputs(OUTPUT);
            return g.build();
        }

        /** @return the initialised graph */
        public ComputationGraph build() {
            ComputationGraph graph = new ComputationGraph(configuration());
            graph.init();
            return graph;
        }
    }
}
