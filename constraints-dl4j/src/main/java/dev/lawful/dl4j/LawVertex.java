package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.Objects;
import org.deeplearning4j.nn.conf.graph.GraphVertex;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.conf.inputs.InvalidInputTypeException;
import org.deeplearning4j.nn.conf.memory.LayerMemoryReport;
import org.deeplearning4j.nn.conf.memory.MemoryReport;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;

/**
 * Configuration of the law vertex for a {@code ComputationGraph}, for laws whose terms or coefficients depend on
 * the network inputs. It takes two inputs, in this order: the law inputs x ({@code [batch, inputWidth]}, declared
 * order and units) and the head's free outputs z ({@code [batch, freeWidth]}, {@link Completion#freeOutputs()}
 * order), and emits the full output vector ({@code [batch, outputWidth]}, declared order) with every law holding.
 * Backward gives gradients to both inputs (implicit function theorem, {@link Completion#backward}).
 *
 * <p>{@link ConstrainedGraph} wires a whole network around it. The law text is saved, readable, in the graph's
 * JSON configuration.
 */
public class LawVertex extends GraphVertex {
    private static final long serialVersionUID = 1L;

    private LawSpec spec;

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
     * @return the completion of the spec's law set
     * @throws IllegalStateException when no spec is set
     * @throws dev.lawful.algebra.LawException when the law text does not parse, check or complete
     */
    public Completion lawCompletion() {
        if (spec == null) {
            throw new IllegalStateException("law vertex has no laws; construct it with new LawVertex(LawSpec)");
        }
        return spec.completion();
    }

    /** @return a deep copy */
    @Override
    public LawVertex clone() {
        LawVertex v = new LawVertex();
        v.spec = NdArrays.copy(spec);
        return v;
    }

    /** Equal when the specs are equal. */
    @Override
    public boolean equals(Object o) {
        return o != null && o.getClass() == getClass() && Objects.equals(spec, ((LawVertex) o).spec);
    }

    /** @return a hash of the spec */
    @Override
    public int hashCode() {
        return 17 + Objects.hashCode(spec);
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
        lawCompletion();
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
        check(vertexInputs[0], c.inputWidth(), "input 0 (the law inputs x)", String.join(", ",
                c.laws().inputNames()), "connect the network inputs the laws declare, in declared order");
        check(vertexInputs[1], c.freeWidth(), "input 1 (the head's free outputs z)", String.join(", ", c.freeNames()),
                NdArrays.headFix(c));
        return InputType.feedForward(c.outputWidth());
    }

    private static void check(InputType t, int width, String what, String names, String fix) {
        if (t == null || t.getType() != InputType.Type.FF) {
            throw new InvalidInputTypeException("law vertex: " + what + " must be feed-forward of width " + width
                    + ", found " + t);
        }
        long found = ((InputType.InputTypeFeedForward) t).getSize();
        if (found != width) {
            throw new InvalidInputTypeException("law vertex: " + what + " has " + found + " columns but the law set"
                    + " needs " + width + " (" + names + "); " + fix);
        }
    }

    /** @return a report of no parameters and one activation array of the output width per example */
    @Override
    public MemoryReport getMemoryReport(InputType... inputTypes) {
        InputType out = getOutputType(-1, inputTypes);
        return new LayerMemoryReport.Builder(null, LawVertex.class, inputTypes[1], out)
                .standardMemory(0, 0)
                .workingMemory(0, 0, 0, out.arrayElementsPerExample())
                .cacheMemory(MemoryReport.CACHE_MODE_ALL_ZEROS, MemoryReport.CACHE_MODE_ALL_ZEROS)
                .build();
    }

    /** @return the spec */
    @Override
    public String toString() {
        return "LawVertex{" + spec + "}";
    }
}
