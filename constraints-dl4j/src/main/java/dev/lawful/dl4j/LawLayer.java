package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.Collection;
import java.util.Map;
import java.util.Objects;
import org.deeplearning4j.nn.conf.InputPreProcessor;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.conf.inputs.InvalidInputTypeException;
import org.deeplearning4j.nn.conf.layers.NoParamLayer;
import org.deeplearning4j.nn.conf.memory.LayerMemoryReport;
import org.deeplearning4j.nn.conf.memory.MemoryReport;
import org.deeplearning4j.optimize.api.TrainingListener;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;

/**
 * Configuration of the law layer for a {@code MultiLayerNetwork}: it receives the head's free outputs z
 * ({@code [batch, freeWidth]}, in {@link Completion#freeOutputs()} order) and emits the full output vector
 * ({@code [batch, outputWidth]}, in the law set's declared order) with the completed outputs computed so that every
 * law holds; follow it with the usual loss layer. The enforcement runs in double whatever the network's data type
 * ({@link Completion}); gradients are exact (implicit function theorem), so the layer trains end to end.
 *
 * <p>Only for law sets without inputs: a layer in a {@code MultiLayerNetwork} sees nothing but the previous layer's
 * activations. Laws whose terms or coefficients depend on the network inputs need {@link LawVertex} in a
 * {@code ComputationGraph} (see {@link ConstrainedGraph}).
 *
 * <p>The law text is kept in a {@link LawSpec} and saved, readable, in the network's JSON configuration.
 *
 * <p><b>Normalised training.</b> When the labels are normalised by a Deeplearning4j normalizer, build the layer with
 * {@link #normalizedWith(DataNormalization)}: the head then predicts normalised free outputs z_n, the layer maps them
 * to physical units (z = σ_z·z_n + μ_z, per column, from the normalizer's label statistics), completes in physical
 * units, where the laws hold, and emits normalised outputs y_n = (y − μ)/σ for every column in declared order, so the
 * loss compares them with the normalised labels. The free columns pass z_n through unchanged. Backward applies the
 * chain rule through both affine maps exactly. {@link #getOutputScaling()} maps the network's outputs back to physical
 * units in double. Without a normalizer ({@link #getOutputScaling()} null) the layer works in the units of its input.
 */
public class LawLayer extends NoParamLayer {
    private static final long serialVersionUID = 1L;

    private LawSpec spec;
    private Scaling outputScaling;

    /** For the JSON mapper; use {@link #LawLayer(LawSpec)} or {@link #of(String)}. */
    public LawLayer() {
    }

    /**
     * @param spec the laws to enforce (copied, so later changes to {@code spec} do not reach the layer)
     * @throws IllegalArgumentException when the law set declares inputs (use {@link LawVertex})
     * @throws dev.lawful.algebra.LawException when the laws cannot be completed
     */
    public LawLayer(LawSpec spec) {
        this.spec = NdArrays.copy(Objects.requireNonNull(spec, "spec"));
        lawCompletion();
    }

    /**
     * @param lawText law-language text without inputs
     * @return a law layer enforcing it
     * @throws dev.lawful.algebra.LawException when the text does not parse, check or complete
     */
    public static LawLayer of(String lawText) {
        return new LawLayer(LawSpec.of(lawText));
    }

    /** @return the laws this layer enforces (the JSON configuration holds its text) */
    public LawSpec getSpec() {
        return spec;
    }

    /** Sets the laws this layer enforces; for the JSON mapper. */
    public void setSpec(LawSpec spec) {
        this.spec = spec;
    }

    /**
     * A copy of this layer that trains on normalised labels while the laws hold in physical units: it folds the
     * normalizer's per-column label statistics (mean and standard deviation, or min, max and the target range) into
     * the configuration as plain numbers ({@link Scaling}), saved with the network. Fit the normalizer first, with
     * labels: {@code normalizer.fitLabel(true); normalizer.fit(trainingIterator);} and normalise the training data
     * with it ({@code iterator.setPreProcessor(normalizer)}). The layer then takes normalised free outputs and emits
     * normalised outputs, so the loss sees normalised values; completing in normalised space instead would break
     * every law whose terms do not share one scale and offset. The normalizer's features are not used: the laws of a
     * layer have no inputs.
     *
     * @param normalizer a fitted {@code NormalizerStandardize} or {@code NormalizerMinMaxScaler} with label statistics
     * @return a new layer; this one is left unchanged
     * @throws IllegalArgumentException when the normalizer is of another kind, does not normalise labels, has a label
     *         count other than the number of outputs, or a constant label column (the message says what to change)
     */
    public LawLayer normalizedWith(DataNormalization normalizer) {
        Completion c = lawCompletion();
        LawLayer l = clone();
        l.outputScaling = NormalizerFolding.labels("law layer", normalizer, NdArrays.declaredColumns(c));
        return l;
    }

    /** @return the folded label statistics (physical = scale·normalised + offset per output column), or null */
    public Scaling getOutputScaling() {
        return outputScaling;
    }

    /** Sets the folded label statistics, one column per declared output (null: physical units); for the JSON mapper. */
    public void setOutputScaling(Scaling outputScaling) {
        this.outputScaling = outputScaling;
    }

    /**
     * @return the output scaling, checked against the law set (null when there is none)
     * @throws IllegalStateException when its width is not the number of outputs
     */
    Scaling checkedOutputScaling(Completion c) {
        return NdArrays.checkScaling(who(), outputScaling, "output", c.outputWidth());
    }

    /**
     * The completion the layer runs, after checking that it suits a layer.
     *
     * @return the completion of the spec's law set
     * @throws IllegalStateException when no spec is set
     * @throws IllegalArgumentException when the law set declares inputs
     * @throws dev.lawful.algebra.LawException when the law text does not parse, check or complete
     */
    public Completion lawCompletion() {
        if (spec == null) {
            throw new IllegalStateException(who() + " has no laws; construct it with new LawLayer(LawSpec)");
        }
        Completion c = spec.completion();
        if (c.inputWidth() != 0) {
            throw new IllegalArgumentException(who() + ": the law set declares " + c.inputWidth() + " input element"
                    + (c.inputWidth() == 1 ? "" : "s") + " (" + String.join(", ", c.laws().inputNames()) + "), but a"
                    + " layer in a MultiLayerNetwork sees only the previous layer's activations; use LawVertex in a"
                    + " ComputationGraph (ConstrainedGraph wires it), which receives the network inputs as well");
        }
        // limits move a sample the least in the normalised units the loss sees
        Scaling out = checkedOutputScaling(c);
        return out == null ? c : spec.completion(out.getScale());
    }

    /** @return how messages name this layer */
    String who() {
        return "law layer" + (layerName == null ? "" : " '" + layerName + "'");
    }

    /**
     * Builds the running layer ({@link LawLayerImpl}).
     *
     * @throws dev.lawful.algebra.LawException when the law text does not parse, check or complete (so a saved network
     *         whose law text was damaged fails when it is loaded, with the law language's diagnostics)
     * @throws IllegalArgumentException when the law set declares inputs
     */
    @Override
    public org.deeplearning4j.nn.api.Layer instantiate(NeuralNetConfiguration conf,
            Collection<TrainingListener> trainingListeners, int layerIndex, INDArray layerParamsView,
            boolean initializeParams, DataType networkDataType) {
        // builds (and so checks) the completion now: a law text that no longer parses fails when the network is
        // initialised, with the law language's diagnostics
        checkedOutputScaling(lawCompletion());
        LawLayerImpl layer = newLayer(conf, networkDataType);
        layer.setListeners(trainingListeners);
        layer.setIndex(layerIndex);
        layer.setParamsViewArray(layerParamsView);
        Map<String, INDArray> params = initializer().init(conf, layerParamsView, initializeParams);
        layer.setParamTable(params);
        layer.setConf(conf);
        return layer;
    }

    /**
     * @param conf     the layer's configuration
     * @param dataType the network's data type
     * @return a new running layer; {@link #instantiate} wires its listeners, index and (empty) parameters
     */
    protected LawLayerImpl newLayer(NeuralNetConfiguration conf, DataType dataType) {
        return new LawLayerImpl(conf, dataType);
    }

    /**
     * @return a feed-forward type of width {@code outputWidth()}
     * @throws InvalidInputTypeException when the input is not feed-forward of width {@code freeWidth()}
     */
    @Override
    public InputType getOutputType(int layerIndex, InputType inputType) {
        Completion c = lawCompletion();
        if (inputType == null || inputType.getType() != InputType.Type.FF) {
            throw new InvalidInputTypeException(who() + " (layer " + layerIndex + ") needs feed-forward input of width "
                    + c.freeWidth() + ", found " + inputType);
        }
        long width = ((InputType.InputTypeFeedForward) inputType).getSize();
        if (width != c.freeWidth()) {
            throw new InvalidInputTypeException(who() + " (layer " + layerIndex + "): its input (the head's free"
                    + " outputs) has " + width + " columns but the law set needs " + c.freeWidth() + " ("
                    + String.join(", ", c.freeNames()) + "); " + NdArrays.headFix(c));
        }
        return InputType.feedForward(c.outputWidth());
    }

    /** @return null: the layer takes the previous layer's activations as they are */
    @Override
    public InputPreProcessor getPreProcessorForInputType(InputType inputType) {
        return null;
    }

    /** @return a report of no parameters and one activation array of the output width per example */
    @Override
    public LayerMemoryReport getMemoryReport(InputType inputType) {
        InputType out = getOutputType(-1, inputType);
        return new LayerMemoryReport.Builder(layerName, LawLayer.class, inputType, out)
                .standardMemory(0, 0)
                .workingMemory(0, 0, 0, out.arrayElementsPerExample())
                .cacheMemory(MemoryReport.CACHE_MODE_ALL_ZEROS, MemoryReport.CACHE_MODE_ALL_ZEROS)
                .build();
    }

    /** @return a deep copy (the spec and the output scaling are copied too) */
    @Override
    public LawLayer clone() {
        LawLayer c = (LawLayer) super.clone();
        c.spec = NdArrays.copy(spec);
        c.outputScaling = outputScaling == null ? null : outputScaling.copy();
        return c;
    }

    /** Equal when the base layer settings, the specs and the output scalings are equal. */
    @Override
    public boolean equals(Object o) {
        if (this == o) {
            return true;
        }
        if (!(o instanceof LawLayer) || o.getClass() != getClass()) {
            return false;
        }
        return super.equals(o) && Objects.equals(spec, ((LawLayer) o).spec)
                && Objects.equals(outputScaling, ((LawLayer) o).outputScaling);
    }

    /** @return a hash of the base layer settings, the spec and the output scaling */
    @Override
    public int hashCode() {
        return 31 * super.hashCode() + Objects.hashCode(spec) + 961 * Objects.hashCode(outputScaling);
    }

    /** @return the layer name and the spec */
    @Override
    public String toString() {
        return "LawLayer{" + (layerName == null ? "" : layerName + ", ") + spec
                + (outputScaling == null ? "" : ", normalised outputs") + "}";
    }
}
