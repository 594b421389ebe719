package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import org.deeplearning4j.nn.api.layers.LayerConstraint;
import org.deeplearning4j.nn.conf.ComputationGraphConfiguration;
import org.deeplearning4j.nn.conf.InputPreProcessor;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.graph.GraphVertex;
import org.deeplearning4j.nn.conf.graph.LayerVertex;
import org.deeplearning4j.nn.conf.layers.BaseLayer;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.FeedForwardLayer;
import org.deeplearning4j.nn.conf.layers.Layer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.conf.layers.OutputLayer;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.params.DefaultParamInitializer;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.activations.impl.ActivationIdentity;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.lossfunctions.LossFunctions;

/**
 * Turns an already trained, unconstrained network into a constrained one, ready for fine-tuning. The trained
 * network's output layer (a {@link DenseLayer} or {@link OutputLayer} with identity activation, weights W
 * {@code [nIn x p]} and bias b {@code [p]}) must predict all p outputs of the law set, in declared order. The result
 * keeps every other layer with copies of its trained parameters, replaces the output layer by a dense identity head
 * that predicts only the free outputs ({@link Completion#freeOutputs()} order), initialised from the matching columns
 * {@code W[:, free]} and {@code b[free]}, then appends the laws and an MSE loss layer (identity) on all outputs:
 * <pre>
 *   MultiLayerNetwork:  ... hidden layers ... → head (free outputs) → {@link LawLayer} → loss
 *   ComputationGraph:   ... hidden vertices ... → head; (graph input, head) → {@link LawVertex} → loss
 * </pre>
 * So before fine-tuning the wrapped network's free outputs are exactly the trained network's (the same
 * arithmetic on the same numbers), and its completed outputs are recomputed so that every law holds. The trained
 * network is never modified: configurations are cloned and parameters copied. The new network starts with a fresh
 * updater state; the head keeps the old output layer's updater, regularization, dropout and gradient normalization.
 */
public final class LawWrap {
    private LawWrap() {
    }

    /**
     * Wraps a trained {@code MultiLayerNetwork} whose last layer predicts every output of laws that need no
     * network inputs.
     *
     * @param trained the trained network (initialised); it is not modified
     * @param spec    the laws (without inputs); its completion decides which outputs stay free
     * @return a new initialised network: the copied layers, the free-output head, a {@link LawLayer} and an MSE
     *         loss layer; its output is all outputs in declared order
     * @throws IllegalArgumentException when the law set declares inputs (wrap a {@code ComputationGraph} instead),
     *         when the last layer is not a dense or output layer, is not linear, or does not predict exactly the
     *         law set's outputs
     * @throws dev.lawful.algebra.LawException when the laws cannot be completed
     */
    public static MultiLayerNetwork wrap(MultiLayerNetwork trained, LawSpec spec) {
        Objects.requireNonNull(trained, "trained");
        Completion c = Objects.requireNonNull(spec, "spec").completion();
        if (c.inputWidth() != 0) {
            throw new IllegalArgumentException("cannot wrap a MultiLayerNetwork: the law set declares "
                    + c.inputWidth() + " input element" + (c.inputWidth() == 1 ? "" : "s") + " ("
                    + String.join(", ", c.laws().inputNames()) + "), but a layer in a MultiLayerNetwork sees only the"
                    + " previous layer's activations; build the trained network as a ComputationGraph (input -> ..."
                    + " -> output layer, the input being the law inputs) and wrap it with"
                    + " LawWrap.wrap(ComputationGraph, LawSpec), whose law vertex receives the graph's input");
        }
        if (trained.getLayers() == null || trained.getnLayers() == 0) {
            throw new IllegalArgumentException("cannot wrap: the trained network has no layers; call init() on it"
                    + " (and train it) first");
        }
        MultiLayerConfiguration old = trained.getLayerWiseConfigurations();
        int last = trained.getnLayers() - 1;
        NeuralNetConfiguration outConf = old.getConf(last);
        DenseLayer head = head(outConf.getLayer(), "layer " + last, c);

        List<NeuralNetConfiguration> confs = new ArrayList<>();
        Map<Integer, InputPreProcessor> pre = new HashMap<>();
        for (int i = 0; i <= last; i++) {
            confs.add(i < last ? old.getConf(i).clone() : withLayer(outConf, head));
            InputPreProcessor p = old.getInputPreProcess(i);
            if (p != null) {
                pre.put(i, p.clone());
            }
        }
        confs.add(parameterFree(outConf, new LawLayer(spec)));
        confs.add(parameterFree(outConf, lossLayer()));
        MultiLayerConfiguration conf = new MultiLayerConfiguration.Builder()
                .confs(confs)
                .inputPreProcessors(pre)
                .backpropType(old.getBackpropType())
                .tBPTTForwardLength(old.getTbpttFwdLength())
                .tBPTTBackwardLength(old.getTbpttBackLength())
                .trainingWorkspaceMode(old.getTrainingWorkspaceMode())
                .inferenceWorkspaceMode(old.getInferenceWorkspaceMode())
                .cacheMode(old.getCacheMode())
                .validateOutputLayerConfig(old.isValidateOutputLayerConfig())
                .dataType(old.getDataType())
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        for (int i = 0; i < last; i++) {
            INDArray p = trained.getLayer(i).params();
            if (p != null && p.length() > 0) {
                net.getLayer(i).params().assign(p);
            }
        }
        copyHead(trained.getLayer(last), net.getLayer(last), c);
        return net;
    }

    /**
     * Wraps a trained {@code ComputationGraph} built as {@code input -> ... -> output layer}: one network input and
     * one network output, a dense or output layer that predicts every output of the law set. The head takes the old
     * output layer's name and place; a vertex {@code "laws"} (a {@link LawVertex} fed by the graph's input and the
     * head, or a {@link LawLayer} after the head when the laws need no inputs) and a loss layer {@code "loss"}
     * follow (a numeric suffix is added when a name is taken).
     *
     * @param trained the trained graph (initialised); it is not modified
     * @param spec    the laws; when they declare inputs, the graph's input must be those inputs in declared order
     * @return a new initialised graph whose single output is all outputs in declared order
     * @throws IllegalArgumentException when the graph has more than one input or output, when its output is not a
     *         dense or output layer, is not linear, does not predict exactly the law set's outputs or feeds other
     *         vertices, or when the graph's input width (where known) is not the law set's input width
     * @throws dev.lawful.algebra.LawException when the laws cannot be completed
     */
    public static ComputationGraph wrap(ComputationGraph trained, LawSpec spec) {
        Objects.requireNonNull(trained, "trained");
        Completion c = Objects.requireNonNull(spec, "spec").completion();
        ComputationGraphConfiguration old = trained.getConfiguration();
        if (trained.getVertices() == null) {
            throw new IllegalArgumentException("cannot wrap: the trained graph is not initialised; call init() on it"
                    + " (and train it) first");
        }
        if (old.getNetworkInputs().size() != 1 || old.getNetworkOutputs().size() != 1) {
            throw new IllegalArgumentException("cannot wrap: the trained graph has " + old.getNetworkInputs().size()
                    + " inputs and " + old.getNetworkOutputs().size() + " outputs; wrapping needs a graph built as"
                    + " input -> ... -> output layer (one input, the law inputs, and one output)");
        }
        String input = old.getNetworkInputs().get(0);
        String out = old.getNetworkOutputs().get(0);
        GraphVertex outVertex = old.getVertices().get(out);
        if (!(outVertex instanceof LayerVertex)) {
            throw new IllegalArgumentException("cannot wrap: the trained graph's output '" + out + "' is a "
                    + outVertex.getClass().getSimpleName() + ", not a layer; the output must be a DenseLayer or"
                    + " OutputLayer holding weights W [nIn x p] and bias b [p]");
        }
        for (Map.Entry<String, List<String>> e : old.getVertexInputs().entrySet()) {
            if (e.getValue().contains(out)) {
                throw new IllegalArgumentException("cannot wrap: the trained graph's output layer '" + out
                        + "' also feeds '" + e.getKey() + "'; only a final output layer can be replaced by the head");
            }
        }
        LayerVertex outLayer = (LayerVertex) outVertex;
        DenseLayer head = head(outLayer.getLayerConf().getLayer(), "'" + out + "'", c);
        if (c.inputWidth() != 0) {
            checkInputWidth(old, input, c);
        }

        ComputationGraphConfiguration.GraphBuilder g = new ComputationGraphConfiguration.GraphBuilder(old.clone(),
                new NeuralNetConfiguration.Builder()
                        .seed(old.getDefaultConfiguration().getSeed())
                        .dataType(old.getDataType())
                        .trainingWorkspaceMode(old.getTrainingWorkspaceMode())
                        .inferenceWorkspaceMode(old.getInferenceWorkspaceMode())
                        .cacheMode(old.getCacheMode()));
        List<String> outInputs = new ArrayList<>(old.getVertexInputs().get(out));
        g.removeVertex(out, true);
        g.getNetworkOutputs().clear();
        InputPreProcessor pre = outLayer.getPreProcessor() == null ? null : outLayer.getPreProcessor().clone();
        g.addVertex(out, new LayerVertex(withLayer(outLayer.getLayerConf(), head), pre),
                outInputs.toArray(new String[0]));
        String laws = unique(old, "laws");
        if (c.inputWidth() != 0) {
            g.addVertex(laws, new LawVertex(spec), input, out);
        } else {
            LawLayer lawLayer = new LawLayer(spec);
            lawLayer.setLayerName(laws);
            g.addVertex(laws, new LayerVertex(parameterFree(outLayer.getLayerConf(), lawLayer), null), out);
        }
        String loss = unique(old, "loss");
        LossLayer lossLayer = lossLayer();
        lossLayer.setLayerName(loss);
        g.addVertex(loss, new LayerVertex(parameterFree(outLayer.getLayerConf(), lossLayer), null), laws);
        g.setOutputs(loss);
        g.validateOutputLayerConfig(old.isValidateOutputLayerConfig());
        ComputationGraph net = new ComputationGraph(g.build());
        net.init();
        for (org.deeplearning4j.nn.api.Layer l : trained.getLayers()) {
            String name = l.conf().getLayer().getLayerName();
            INDArray p = l.params();
            if (!name.equals(out) && p != null && p.length() > 0) {
                net.getLayer(name).params().assign(p);
            }
        }
        copyHead(trained.getLayer(out), net.getLayer(out), c);
        return net;
    }

    /** Checks the new head's source layer and builds the head's configuration (dense, identity, free width). */
    private static DenseLayer head(Layer layer, String where, Completion c) {
        if (layer == null || (layer.getClass() != DenseLayer.class && layer.getClass() != OutputLayer.class)) {
            throw new IllegalArgumentException("cannot wrap: the trained network's output layer (" + where + ") is a"
                    + " " + (layer == null ? "null layer" : layer.getClass().getSimpleName()) + "; it must be a"
                    + " DenseLayer or OutputLayer holding weights W [nIn x p] and bias b [p]");
        }
        FeedForwardLayer ff = (FeedForwardLayer) layer;
        if (ff.getNOut() != c.outputWidth()) {
            throw new IllegalArgumentException("cannot wrap: the trained network's output layer (" + where + ") has "
                    + ff.getNOut() + " outputs but the law set declares " + c.outputWidth() + " ("
                    + String.join(", ", c.laws().outputNames()) + "); the output layer must predict every output of"
                    + " the law set, in declared order");
        }
        if (!(ff.getActivationFn() instanceof ActivationIdentity)) {
            throw new IllegalArgumentException("cannot wrap: the trained network's output layer (" + where + ") has"
                    + " activation " + ff.getActivationFn() + "; its columns W[:, free], b[free] predict the free"
                    + " outputs by themselves only when the layer is linear, so it must use Activation.IDENTITY (put a"
                    + " nonlinear activation in a hidden layer, or retrain the output layer with identity)");
        }
        boolean hasBias = layer instanceof DenseLayer ? ((DenseLayer) layer).hasBias()
                : ((OutputLayer) layer).hasBias();
        if (layer instanceof DenseLayer && ((DenseLayer) layer).hasLayerNorm()) {
            throw new IllegalArgumentException("cannot wrap: the trained network's output layer (" + where + ") uses"
                    + " layer normalization, which mixes its output columns, so W[:, free], b[free] would not predict"
                    + " the free outputs by themselves; retrain the output layer without layer normalization");
        }
        DenseLayer head = new DenseLayer.Builder().nIn(ff.getNIn()).nOut(c.freeWidth())
                .activation(Activation.IDENTITY).hasBias(hasBias).build();
        BaseLayer b = ff;
        head.setLayerName(b.getLayerName());
        head.setIUpdater(b.getIUpdater() == null ? null : b.getIUpdater().clone());
        head.setBiasUpdater(b.getBiasUpdater() == null ? null : b.getBiasUpdater().clone());
        head.setWeightInitFn(b.getWeightInitFn());
        head.setBiasInit(b.getBiasInit());
        head.setGainInit(b.getGainInit());
        head.setRegularization(b.getRegularization() == null ? null : new ArrayList<>(b.getRegularization()));
        head.setRegularizationBias(b.getRegularizationBias() == null ? null
                : new ArrayList<>(b.getRegularizationBias()));
        head.setWeightNoise(b.getWeightNoise() == null ? null : b.getWeightNoise().clone());
        head.setGradientNormalization(b.getGradientNormalization());
        head.setGradientNormalizationThreshold(b.getGradientNormalizationThreshold());
        head.setIDropout(b.getIDropout() == null ? null : b.getIDropout().clone());
        if (b.getConstraints() != null) {
            List<LayerConstraint> cs = new ArrayList<>();
            for (LayerConstraint k : b.getConstraints()) {
                cs.add(k.clone());
            }
            head.setConstraints(cs);
        }
        return head;
    }

    /** Copies {@code W[:, free]} and {@code b[free]} of the old output layer into the new head. */
    private static void copyHead(org.deeplearning4j.nn.api.Layer from, org.deeplearning4j.nn.api.Layer to,
                                 Completion c) {
        int[] free = c.freeOutputs();
        to.getParam(DefaultParamInitializer.WEIGHT_KEY)
                .assign(from.getParam(DefaultParamInitializer.WEIGHT_KEY).getColumns(free));
        INDArray b = to.getParam(DefaultParamInitializer.BIAS_KEY);
        if (b != null) {
            INDArray old = from.getParam(DefaultParamInitializer.BIAS_KEY);
            // the bias may be a vector [p] or a row [1, p]
            b.assign(old.reshape(1, old.length()).getColumns(free).reshape(b.shape()));
        }
    }

    /** The graph's input width where a layer fed by it tells it; it must be the law set's input width. */
    private static void checkInputWidth(ComputationGraphConfiguration old, String input, Completion c) {
        for (Map.Entry<String, List<String>> e : old.getVertexInputs().entrySet()) {
            GraphVertex v = old.getVertices().get(e.getKey());
            if (e.getValue().size() == 1 && e.getValue().get(0).equals(input) && v instanceof LayerVertex
                    && ((LayerVertex) v).getPreProcessor() == null
                    && ((LayerVertex) v).getLayerConf().getLayer() instanceof FeedForwardLayer) {
                long width = ((FeedForwardLayer) ((LayerVertex) v).getLayerConf().getLayer()).getNIn();
                if (width > 0 && width != c.inputWidth()) {
                    throw new IllegalArgumentException("cannot wrap: the trained graph's input '" + input + "' has "
                            + width + " columns (nIn of '" + e.getKey() + "') but the law set declares "
                            + c.inputWidth() + " input elements (" + String.join(", ", c.laws().inputNames())
                            + "); the law vertex receives the graph's input, so it must be the law inputs in"
                            + " declared order");
                }
            }
        }
    }

    private static NeuralNetConfiguration withLayer(NeuralNetConfiguration template, Layer layer) {
        NeuralNetConfiguration n = template.clone();
        n.setLayer(layer);
        return n;
    }

    /**
     * A parameter-free layer's configuration, built the way Deeplearning4j's own builders build it (so every
     * layer default is filled in and the saved JSON reloads), with the template's network-level settings.
     */
    private static NeuralNetConfiguration parameterFree(NeuralNetConfiguration template, Layer layer) {
        return new NeuralNetConfiguration.Builder()
                .seed(template.getSeed())
                .miniBatch(template.isMiniBatch())
                .minimize(template.isMinimize())
                .optimizationAlgo(template.getOptimizationAlgo())
                .cacheMode(template.getCacheMode())
                .dataType(template.getDataType())
                .layer(layer)
                .build();
    }

    private static LossLayer lossLayer() {
        return new LossLayer.Builder(LossFunctions.LossFunction.MSE).activation(Activation.IDENTITY).build();
    }

    private static String unique(ComputationGraphConfiguration old, String name) {
        String n = name;
        for (int i = 1; old.getVertices().containsKey(n) || old.getNetworkInputs().contains(n); i++) {
            n = name + "_" + i;
        }
        return n;
    }
}
