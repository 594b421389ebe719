package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.Objects;
import org.deeplearning4j.nn.conf.graph.GraphVertex;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.conf.inputs.InvalidInputTypeException;
import org.deeplearning4j.nn.conf.memory.MemoryReport;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;

/**
 * Configuration of the law vertex for a {@code ComputationGraph}, for laws whose terms or coefficients depend on
 * the network inputs. It takes two inputs, in this order: the law inputs x ({@code [batch, inputWidth]}, declared
 * order and units) and the head's free outputs z ({@code [batch, freeWidth]}, {@link Completion#freeOutputs()}
 * order), and emits the full output vector ({@code [batch, outputWidth]}, declared order) with every law holding.
 * Backward gives gradients to both inputs (implicit function theorem, {@link Completion#backward}).
 *
 * <p>{@link ConstrainedGraph} wires a whole network around it. The law text is saved, readable, in the graph's
 * JSON configuration.
 *
 * <p><b>Normalised training.</b> Built with {@link #normalizedWith(DataNormalization)}, the vertex takes normalised
 * inputs x_n and free outputs z_n, maps both to physical units with the normalizer's feature and label statistics
 * (x = σ_x·x_n + μ_x, z = σ_z·z_n + μ_z), completes there, where the laws hold, and emits normalised outputs
 * y_n = (y − μ)/σ in declared order (free columns pass z_n through). Backward applies the chain rule through these
 * affine maps exactly. Without a normalizer the vertex works in the units of its inputs.
 */
public class LawVertex extends GraphVertex {
    private static final long serialVersionUID = 1L;

    private LawSpec spec;
    private Scaling inputScaling;
    private Scaling outputScaling;

    /** For the JSON mapper; use {@link #LawVertex(LawSpec)} or {@link #of(String)}. */
    public LawVertex() {
    }

    /**
     * @param spec the laws to enforce (copied)
     * @throws dev.lawful.algebra.LawException when the laws cannot be completed
     */
    public LawVertex(LawSpec spec) {
        this.spec = NdArrays.copy(Objects.requireNonNull(spec, "spec"));
        lawCompletion();
    }

    /**
     * @param lawText law-language text
     * @return a law vertex enforcing it
     * @throws dev.lawful.algebra.LawException when the text does not parse, check or complete
     */
    public static LawVertex of(String lawText) {
        return new LawVertex(LawSpec.of(lawText));
    }

    /** @return the laws this vertex enforces */
    public LawSpec getSpec() {
        return spec;
    }

    /** Sets the laws this vertex enforces; for the JSON mapper. */
    public void setSpec(LawSpec spec) {
        this.spec = spec;
    }

    /**
     * A copy of this vertex for a network that trains on normalised features and labels while the laws hold in
     * physical units: it folds the normalizer's per-column feature and label statistics (mean and standard deviation,
     * or min, max and the target range) into the configuration as plain numbers ({@link Scaling}), saved with the
     * graph. Fit the normalizer first, with labels: {@code normalizer.fitLabel(true); normalizer.fit(iterator);}, and
     * normalise the training data with it. The features must be the law inputs in declared order (the vertex's first
     * input), the labels all outputs in declared order. Completing in normalised space instead would break every law
     * whose terms do not share one scale and offset.
     *
     * @param normalizer a fitted {@code NormalizerStandardize} or {@code NormalizerMinMaxScaler} with label statistics
     * @return a new vertex; this one is left unchanged
     * @throws IllegalArgumentException when the normalizer is of another kind, does not normalise labels, has a
     *         feature count other than the number of law inputs or a label count other than the number of outputs, or
     *         a constant column (the message says what to change)
     */
    public LawVertex normalizedWith(DataNormalization normalizer) {
        Completion c = lawCompletion();
        LawVertex v = clone();
        v.inputScaling = NormalizerFolding.features("law vertex", normalizer, c.laws().inputNames());
        v.outputScaling = NormalizerFolding.labels("law vertex", normalizer, NdArrays.declaredColumns(c));
        return v;
    }

    /** @return the folded feature statistics (physical = scale·normalised + offset per law input), or null */
    public Scaling getInputScaling() {
        return inputScaling;
    }

    /** Sets the folded feature statistics, one column per law input (null: physical units); for the JSON mapper. */
    public void setInputScaling(Scaling inputScaling) {
        this.inputScaling = inputScaling;
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
     * @return the input scaling, checked against the law set (null when there is none)
     * @throws IllegalStateException when its width is not the number of law inputs, or only one scaling is set
     */
    Scaling checkedInputScaling(Completion c) {
        if ((inputScaling == null) != (outputScaling == null)) {
            throw new IllegalStateException("law vertex: it has " + (inputScaling == null ? "an output" : "an input")
                    + " scaling but no " + (inputScaling == null ? "input" : "output") + " scaling; fold the"
                    + " normalizer with normalizedWith, which sets both");
        }
        return NdArrays.checkScaling("law vertex", inputScaling, "input", c.inputWidth());
    }

    /**
     * @return the output scaling, checked against the law set (null when there is none)
     * @throws IllegalStateException when its width is not the number of outputs
     */
    Scaling checkedOutputScaling(Completion c) {
        return NdArrays.checkScaling("law vertex", outputScaling, "output", c.outputWidth());
    }

    /**
     * @return the completion of the spec's law set
     * @throws IllegalStateException when no spec is set
     * @throws dev.lawful.algebra.LawException when the law text does not parse, check or complete
     */
    public Completion lawCompletion() {
        if (spec == null) {
            throw new IllegalStateException("law vertex has no laws; construct it with new LawVertex(LawSpec)");
        }
        Completion c = spec.completion();
        // limits move a sample the least in the normalised units the loss sees
        Scaling out = checkedOutputScaling(c);
        return out == null ? c : spec.completion(out.getScale());
    }

    /** @return a deep copy */
    @Override
    public LawVertex clone() {
        LawVertex v = new LawVertex();
        v.spec = NdArrays.copy(spec);
        v.inputScaling = inputScaling == null ? null : inputScaling.copy();
        v.outputScaling = outputScaling == null ? null : outputScaling.copy();
        return v;
    }

    /** Equal when the specs and the scalings are equal. */
    @Override
    public boolean equals(Object o) {
        return o != null && o.getClass() == getClass() && Objects.equals(spec, ((LawVertex) o).spec)
                && Objects.equals(inputScaling, ((LawVertex) o).inputScaling)
                && Objects.equals(outputScaling, ((LawVertex) o).outputScaling);
    }

    /** @return a hash of the spec and the scalings */
    @Override
    public int hashCode() {
        return 17 + Objects.hashCode(spec) + 31 * Objects.hashCode(inputScaling)
                + 961 * Objects.hashCode(outputScaling);
    }

    /** @return 0: the vertex has no parameters */
    @Override
    public long numParams(boolean backprop) {
        return 0;
    }

    /** @return 2: the law inputs x, then the free outputs z */
    @Override
    public int minVertexInputs() {
        return 2;
    }

    /** @return 2: the law inputs x, then the free outputs z */
    @Override
    public int maxVertexInputs() {
        return 2;
    }

    /** Builds the running vertex; a law text that does not parse fails here with its diagnostics. */
    @Override
    public org.deeplearning4j.nn.graph.vertex.GraphVertex instantiate(ComputationGraph graph, String name, int idx,
            INDArray paramsView, boolean initializeParams, DataType networkDatatype) {
        Completion c = lawCompletion();
        checkedInputScaling(c);
        checkedOutputScaling(c);
        return new LawVertexImpl(graph, name, idx, this, networkDatatype);
    }

    /**
     * @return a feed-forward type of width {@code outputWidth()}
     * @throws InvalidInputTypeException unless given two feed-forward inputs of widths {@code inputWidth()} and
     *         {@code freeWidth()}
     */
    @Override
    public InputType getOutputType(int layerIndex, InputType... vertexInputs) {
        Completion c = lawCompletion();
        if (vertexInputs == null || vertexInputs.length != 2) {
            throw new InvalidInputTypeException("law vertex needs two inputs, the law inputs x (width "
                    + c.inputWidth() + ") and the head's free outputs z (width " + c.freeWidth() + "), found "
                    + (vertexInputs == null ? 0 : vertexInputs.length));
        }
        NdArrays.checkFeedForward("law vertex", vertexInputs[0], c.inputWidth(), "input 0 (the law inputs x)",
                c.laws().inputNames(), "connect the network inputs the laws declare, in declared order");
        NdArrays.checkFeedForward("law vertex", vertexInputs[1], c.freeWidth(), "input 1 (the head's free outputs z)",
                c.freeNames(), NdArrays.headFix(c));
        return InputType.feedForward(c.outputWidth());
    }

    /** @return a report of no parameters and one activation array of the output width per example */
    @Override
    public MemoryReport getMemoryReport(InputType... inputTypes) {
        InputType out = getOutputType(-1, inputTypes);
        return NdArrays.vertexMemory(LawVertex.class, inputTypes[1], out);
    }

    /** @return the spec */
    @Override
    public String toString() {
        return "LawVertex{" + spec + (outputScaling == null ? "" : ", normalised inputs and outputs") + "}";
    }
}
