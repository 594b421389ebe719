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
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.api.DataSet;
import org.nd4j.linalg.dataset.api.MultiDataSet;
import org.nd4j.linalg.dataset.api.MultiDataSetPreProcessor;
import org.nd4j.linalg.dataset.api.iterator.DataSetIterator;
import org.nd4j.linalg.dataset.api.iterator.MultiDataSetIterator;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.learning.config.IUpdater;
import org.nd4j.linalg.lossfunctions.ILossFunction;
import org.nd4j.linalg.lossfunctions.impl.LossL2;
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
    /** Name of the {@link LawPenaltyVertex} in a graph from {@link Builder#buildPenalized(double)}. */
    public static final String PENALTY = "penalty";
    /** Name of the penalty's sum-of-squares loss layer, the second output of a penalised graph. */
    public static final String PENALTY_OUTPUT = "penalty-loss";

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
    /**
     * The training data of a penalised graph ({@link Builder#buildPenalized(double)}): the features, the labels for
     * the predictions and zero labels ({@code [batch, terms]}: one per scalar law and per scalar limit, the labels' data type) for
     * the weighted residuals.
     *
     * @param spec the laws the graph penalises
     * @param data features (the law inputs) and labels (all outputs, declared order)
     * @return a two-output data set; the label mask, if any, applies to both outputs
     */
    public static MultiDataSet penaltyData(LawSpec spec, DataSet data) {
        // one weighted term per scalar law and per scalar limit (Penalty#termCount)
        int m = spec.lawSet().evaluator().lawCount() + spec.lawSet().expand().limitCount();
        INDArray labels = data.getLabels();
        INDArray zeros = Nd4j.zeros(labels.dataType(), labels.size(0), m);
        INDArray mask = data.getLabelsMaskArray();
        return new org.nd4j.linalg.dataset.MultiDataSet(new INDArray[] {data.getFeatures()},
                new INDArray[] {labels, zeros},
                data.getFeaturesMaskArray() == null ? null : new INDArray[] {data.getFeaturesMaskArray()},
                mask == null ? null : new INDArray[] {mask, mask});
    }

    /**
     * {@link #penaltyData(LawSpec, DataSet)} for each batch of {@code data}, which keeps its own pre-processor (a
     * normalizer set on it still applies).
     *
     * @param spec the laws the graph penalises
     * @param data the training batches
     * @return an iterator of two-output data sets over the same batches
     */
    public static MultiDataSetIterator penaltyData(LawSpec spec, DataSetIterator data) {
        Objects.requireNonNull(data, "data");
        return new MultiDataSetIterator() {
            private static final long serialVersionUID = 1L;
            private MultiDataSetPreProcessor preProcessor;

            @Override
            public MultiDataSet next(int num) {
                return wrap(data.next(num));
            }

            @Override
            public MultiDataSet next() {
                return wrap(data.next());
            }

            private MultiDataSet wrap(DataSet d) {
                MultiDataSet md = penaltyData(spec, d);
                if (preProcessor != null) {
                    preProcessor.preProcess(md);
                }
                return md;
            }

            @Override
            public boolean hasNext() {
                return data.hasNext();
            }

            @Override
            public void setPreProcessor(MultiDataSetPreProcessor preProcessor) {
                this.preProcessor = preProcessor;
            }

            @Override
            public MultiDataSetPreProcessor getPreProcessor() {
                return preProcessor;
            }

            @Override
            public boolean resetSupported() {
                return data.resetSupported();
            }

            @Override
            public boolean asyncSupported() {
                return false;
            }

            @Override
            public void reset() {
                data.reset();
            }
        };
    }

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
        private DataNormalization normalizer;

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
            this.normalizer = normalizer;
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
            ComputationGraphConfiguration.GraphBuilder g = base(c.inputWidth());
            String previous = hiddenLayers(g, c.inputWidth());
            int width = hidden.length == 0 ? c.inputWidth() : hidden[hidden.length - 1];
            g.addLayer(HEAD, new DenseLayer.Builder().nIn(width).nOut(c.freeWidth()).activation(Activation.IDENTITY)
                    .build(), previous);
            LawVertex vertex = normalizedVertex == null ? new LawVertex(spec) : normalizedVertex.clone();
            g.addVertex(LAWS, vertex, INPUT, HEAD);
            g.addLayer(OUTPUT, new LossLayer.Builder().lossFunction(loss).activation(Activation.IDENTITY).build(), LAWS);
            g.setOutputs(OUTPUT);
            return g.build();
        }

        /** The graph builder with the input declared. */
        private ComputationGraphConfiguration.GraphBuilder base(int inputWidth) {
            return new NeuralNetConfiguration.Builder()
                    .seed(seed)
                    .dataType(dataType)
                    .updater(updater)
                    .weightInit(WeightInit.XAVIER)
                    .trainingWorkspaceMode(workspaceMode)
                    .inferenceWorkspaceMode(workspaceMode)
                    .graphBuilder()
                    .addInputs(INPUT)
                    .setInputTypes(InputType.feedForward(inputWidth));
        }

        /** Adds the hidden layers; returns the name of the last one (the input when there are none). */
        private String hiddenLayers(ComputationGraphConfiguration.GraphBuilder g, int inputWidth) {
            String previous = INPUT;
            int width = inputWidth;
            for (int i = 0; i < hidden.length; i++) {
                String name = "hidden" + i;
                g.addLayer(name, new DenseLayer.Builder().nIn(width).nOut(hidden[i]).activation(activation).build(),
                        previous);
                previous = name;
                width = hidden[i];
            }
            return previous;
        }

        /** The law inputs' count, refusing a law set without inputs (it belongs in a MultiLayerNetwork). */
        private int inputWidth(String fix) {
            int w = spec.lawSet().inputWidth();
            if (w == 0) {
                throw new IllegalArgumentException("the law set declares no inputs, so the graph has no input to give"
                        + " its network; " + fix);
            }
            return w;
        }

        /**
         * The same network without laws, for comparison: {@code "x" → hidden layers → "head"} (dense, one output per
         * declared output, identity) {@code → "loss"}, with this builder's hidden layers, activation, updater, data
         * type, loss, seed and workspace mode. Trained on the same (normalised) data as the constrained graph.
         *
         * @return the configuration
         * @throws IllegalArgumentException when the law set declares no inputs
         */
        public ComputationGraphConfiguration unconstrainedConfiguration() {
            int in = inputWidth("use a MultiLayerNetwork");
            ComputationGraphConfiguration.GraphBuilder g = base(in);
            String previous = hiddenLayers(g, in);
            int width = hidden.length == 0 ? in : hidden[hidden.length - 1];
            g.addLayer(HEAD, new DenseLayer.Builder().nIn(width).nOut(spec.lawSet().outputWidth())
                    .activation(Activation.IDENTITY).build(), previous);
            g.addLayer(OUTPUT, new LossLayer.Builder().lossFunction(loss).activation(Activation.IDENTITY).build(), HEAD);
            g.setOutputs(OUTPUT);
            return g.build();
        }

        /** @return the initialised graph of {@link #unconstrainedConfiguration()} */
        public ComputationGraph buildUnconstrained() {
            ComputationGraph graph = new ComputationGraph(unconstrainedConfiguration());
            graph.init();
            return graph;
        }

        /**
         * The soft baseline: the unconstrained network plus a {@link LawPenaltyVertex} on (x, head) whose weighted
         * residuals feed a sum-of-squares loss layer against zero labels, so the score per example is
         * {@code loss(ŷ, y) + λ Σ_i (r_i/u_i)²}, the same as {@link LawPenaltyLoss} gives for laws without inputs:
         * <pre>
         *   "x" → hidden layers → "head" (all outputs) → "loss"                       (output 0: the predictions)
         *   ("x", "head") → "penalty" → "penalty-loss" (LossL2, labels 0)            (output 1)
         * </pre>
         * Train it on {@link ConstrainedGraph#penaltyData} (the labels plus zeros for the second output);
         * {@code graph.output(x)[0]} gives the predictions. With {@link #normalizedWith} the residuals are evaluated
         * in physical units.
         *
         * @param weight λ, finite and not negative
         * @return the configuration
         * @throws IllegalArgumentException when λ is negative or not finite, or the law set declares no inputs
         */
        public ComputationGraphConfiguration penalizedConfiguration(double weight) {
            return penalizedConfiguration(weight, null);
        }

        /**
         * {@link #penalizedConfiguration(double)} with per-law weights w_i.
         *
         * @param weight     λ, finite and not negative
         * @param lawWeights w_i, one per scalar law in 1/(law unit)², finite and not negative, or null for all 1
         * @return the configuration
         * @throws IllegalArgumentException when a weight is negative or not finite or the law weights do not fit
         */
        public ComputationGraphConfiguration penalizedConfiguration(double weight, double[] lawWeights) {
            int in = inputWidth("use LawPenaltyLoss in a MultiLayerNetwork");
            LawPenaltyVertex vertex = new LawPenaltyVertex(spec, weight);
            if (lawWeights != null) {
                vertex.setLawWeights(lawWeights);
                vertex.penalty();
            }
            if (normalizer != null) {
                vertex = vertex.normalizedWith(normalizer);
            }
            ComputationGraphConfiguration.GraphBuilder g = base(in);
            String previous = hiddenLayers(g, in);
            int width = hidden.length == 0 ? in : hidden[hidden.length - 1];
            g.addLayer(HEAD, new DenseLayer.Builder().nIn(width).nOut(spec.lawSet().outputWidth())
                    .activation(Activation.IDENTITY).build(), previous);
            g.addLayer(OUTPUT, new LossLayer.Builder().lossFunction(loss).activation(Activation.IDENTITY).build(), HEAD);
            g.addVertex(PENALTY, vertex, INPUT, HEAD);
            g.addLayer(PENALTY_OUTPUT, new LossLayer.Builder().lossFunction(new LossL2())
                    .activation(Activation.IDENTITY).build(), PENALTY);
            g.setOutputs(OUTPUT, PENALTY_OUTPUT);
            return g.build();
        }

        /**
         * @param weight λ, finite and not negative
         * @return the initialised graph of {@link #penalizedConfiguration(double)}
         */
        public ComputationGraph buildPenalized(double weight) {
            return buildPenalized(weight, null);
        }

        /**
         * @param weight     λ, finite and not negative
         * @param lawWeights w_i, one per scalar law, or null for all 1
         * @return the initialised graph of {@link #penalizedConfiguration(double, double[])}
         */
        public ComputationGraph buildPenalized(double weight, double[] lawWeights) {
            ComputationGraph graph = new ComputationGraph(penalizedConfiguration(weight, lawWeights));
            graph.init();
            return graph;
        }

        /** @return the initialised graph */
        public ComputationGraph build() {
            ComputationGraph graph = new ComputationGraph(configuration());
            graph.init();
            return graph;
        }
    }
}
