package dev.lawful.dl4j;

import java.util.Objects;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.conf.memory.LayerMemoryReport;
import org.deeplearning4j.nn.conf.memory.MemoryReport;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.lossfunctions.ILossFunction;
import org.nd4j.linalg.lossfunctions.impl.LossMSE;

/**
 * Configuration of a parameter-free law layer that is also the output layer of a {@code MultiLayerNetwork}: it
 * completes the head's free outputs exactly like {@link LawLayer} (same {@link LawSpec}, same optional output
 * {@link Scaling} from {@link #normalizedWith(DataNormalization)}, same refusal of law sets that declare inputs) and
 * scores the full output vector ({@code [batch, outputWidth]}, declared order) against the labels with its loss
 * function (default {@link LossMSE}, identity activation, so the scored values are the completed outputs). It takes
 * the place of a {@link LawLayer} followed by a Deeplearning4j {@code LossLayer}, and gives the same score and
 * gradients; like that loss layer it has no parameters, and {@code output()} returns the completed outputs.
 *
 * <pre>{@code
 * .layer(new DenseLayer.Builder().nIn(64).nOut(free).activation(Activation.IDENTITY).build())
 * .layer(LawOutputLayer.of(lawText))                  // or .withLoss(new LossL1())
 * }</pre>
 */
public class LawOutputLayer extends LawLayer {
    private static final long serialVersionUID = 1L;

    private ILossFunction lossFn = new LossMSE();

    /** For the JSON mapper; use {@link #LawOutputLayer(LawSpec)} or {@link #of(String)}. */
    public LawOutputLayer() {
    }

    /**
     * An output layer scoring with mean squared error.
     *
     * @param spec the laws to enforce (copied)
     * @throws IllegalArgumentException when the law set declares inputs (use {@link LawVertex})
     * @throws dev.lawful.algebra.LawException when the laws cannot be completed
     */
    public LawOutputLayer(LawSpec spec) {
        super(spec);
    }

    /**
     * @param spec   the laws to enforce (copied)
     * @param lossFn the loss on the full output vector (applied with identity activation)
     * @throws IllegalArgumentException when the law set declares inputs (use {@link LawVertex})
     * @throws NullPointerException when {@code lossFn} is null
     * @throws dev.lawful.algebra.LawException when the laws cannot be completed
     */
    public LawOutputLayer(LawSpec spec, ILossFunction lossFn) {
        super(spec);
        this.lossFn = Objects.requireNonNull(lossFn, "lossFn");
    }

    /**
     * @param lawText law-language text without inputs
     * @return a law output layer enforcing it, scoring with mean squared error
     * @throws dev.lawful.algebra.LawException when the text does not parse, check or complete
     */
    public static LawOutputLayer of(String lawText) {
        return new LawOutputLayer(LawSpec.of(lawText));
    }

    /**
     * @param lossFn the loss on the full output vector (applied with identity activation)
     * @return a copy of this layer scoring with {@code lossFn}; this one is left unchanged
     */
    public LawOutputLayer withLoss(ILossFunction lossFn) {
        LawOutputLayer l = clone();
        l.lossFn = Objects.requireNonNull(lossFn, "lossFn");
        return l;
    }

    /** @return the loss on the full output vector (default mean squared error) */
    public ILossFunction getLossFn() {
        return lossFn;
    }

    /** Sets the loss on the full output vector; for the JSON mapper. */
    public void setLossFn(ILossFunction lossFn) {
        this.lossFn = lossFn;
    }

    /**
     * A copy of this layer that trains on normalised labels while the laws hold in physical units, as
     * {@link LawLayer#normalizedWith}; the loss then compares normalised outputs with the normalised labels.
     *
     * @param normalizer a fitted {@code NormalizerStandardize} or {@code NormalizerMinMaxScaler} with label statistics
     * @return a new layer with the same loss; this one is left unchanged
     * @throws IllegalArgumentException as {@link LawLayer#normalizedWith}
     */
    @Override
    public LawOutputLayer normalizedWith(DataNormalization normalizer) {
        return (LawOutputLayer) super.normalizedWith(normalizer);
    }

    @Override
    String who() {
        return "law output layer" + (layerName == null ? "" : " '" + layerName + "'");
    }

    /**
     * @param conf     the layer's configuration
     * @param dataType the network's data type
     * @return a new running output layer ({@link LawOutputLayerImpl})
     */
    @Override
    protected LawLayerImpl newLayer(NeuralNetConfiguration conf, DataType dataType) {
        return new LawOutputLayerImpl(conf, dataType);
    }

    /** @return the loss function, checked to be set */
    ILossFunction checkedLossFn() {
        if (lossFn == null) {
            throw new IllegalStateException(who() + " has no loss function; set one with withLoss(ILossFunction)");
        }
        return lossFn;
    }

    /** @return a report of no parameters and one activation array of the output width per example */
    @Override
    public LayerMemoryReport getMemoryReport(InputType inputType) {
        InputType out = getOutputType(-1, inputType);
        return new LayerMemoryReport.Builder(layerName, LawOutputLayer.class, inputType, out)
                .standardMemory(0, 0)
                .workingMemory(0, 0, 0, out.arrayElementsPerExample())
                .cacheMemory(MemoryReport.CACHE_MODE_ALL_ZEROS, MemoryReport.CACHE_MODE_ALL_ZEROS)
                .build();
    }

    /** @return a deep copy (spec and output scaling copied; the loss function is shared, it is stateless) */
    @Override
    public LawOutputLayer clone() {
        return (LawOutputLayer) super.clone();
    }

    /** Equal when the law layer settings ({@link LawLayer#equals}) and the loss functions are equal. */
    @Override
    public boolean equals(Object o) {
        return super.equals(o) && Objects.equals(lossFn, ((LawOutputLayer) o).lossFn);
    }

    /** @return a hash of the law layer settings and the loss function */
    @Override
    public int hashCode() {
        return 31 * super.hashCode() + Objects.hashCode(lossFn);
    }

    /** @return the layer name, the spec and the loss function */
    @Override
    public String toString() {
        return "LawOutputLayer{" + (layerName == null ? "" : layerName + ", ") + getSpec()
                + (getOutputScaling() == null ? "" : ", normalised outputs") + ", loss " + lossFn + "}";
    }
}
