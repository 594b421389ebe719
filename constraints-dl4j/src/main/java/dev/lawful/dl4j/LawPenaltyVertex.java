package dev.lawful.dl4j;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Penalty;
import java.util.Arrays;
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
 * The soft baseline for laws that depend on the network inputs, for a {@code ComputationGraph}: a vertex that
 * takes the law inputs x and the network's predicted outputs ŷ (all outputs, declared order) and emits the weighted
 * law residuals
 * <pre>
 *   ρ_si = √λ · √w_i · r_i(x_s, ŷ_s) / u_i        (one column per scalar law)
 * </pre>
 * with λ the {@linkplain #getPenaltyWeight() penalty weight}, w_i the optional {@linkplain #getLawWeights() law
 * weights} and u_i the law's reporting unit ({@link Penalty#weightedResiduals}). Followed by a loss layer with
 * Deeplearning4j's sum-of-squares loss ({@code LossL2}) and labels of zeros, it adds exactly λ·P = λ Σ_i w_i
 * (r_i/u_i)² per example to the network's score, the same penalty as {@link LawPenaltyLoss}, which cannot see the
 * inputs. {@link ConstrainedGraph.Builder#buildPenalized(double)} wires it, and {@link ConstrainedGraph#penaltyData}
 * adds the zero labels.
 *
 * <p>Like every penalty it makes violations small on average, not zero; the predicted outputs leave the network
 * through their own MSE output unchanged. With {@link #normalizedWith} the vertex maps normalised x and ŷ to physical
 * units before evaluating the laws (the residuals are then in the laws' units, whatever the normalisation).
 * For a law set without inputs the vertex takes ŷ alone.
 */
public class LawPenaltyVertex extends GraphVertex {
    private static final long serialVersionUID = 1L;
    private static final String WHO = "law penalty vertex";

    private LawSpec spec;
    private double penaltyWeight = 1.0;
    private double[] lawWeights;
    private Scaling inputScaling;
    private Scaling outputScaling;
    private transient volatile Penalty penalty;

    /** For the JSON mapper; use {@link #LawPenaltyVertex(LawSpec, double)}. */
    public LawPenaltyVertex() {
    }

    /**
     * @param spec          the laws (copied)
     * @param penaltyWeight λ, finite and not negative
     * @throws IllegalArgumentException when λ is negative or not finite
     * @throws dev.lawful.algebra.LawException when the law text does not parse or check
     */
    public LawPenaltyVertex(LawSpec spec, double penaltyWeight) {
        this.spec = NdArrays.copy(Objects.requireNonNull(spec, "spec"));
        setPenaltyWeight(penaltyWeight);
        penalty();
    }

    /** @return the laws */
    public LawSpec getSpec() {
        return spec;
    }

    /** Sets the laws; for the JSON mapper. */
    public void setSpec(LawSpec spec) {
        this.spec = spec;
        this.penalty = null;
    }

    /** @return λ */
    public double getPenaltyWeight() {
        return penaltyWeight;
    }

    /**
     * @param penaltyWeight λ, finite and not negative
     * @throws IllegalArgumentException otherwise
     */
    public void setPenaltyWeight(double penaltyWeight) {
        if (!(penaltyWeight >= 0) || penaltyWeight == Double.POSITIVE_INFINITY) {
            throw new IllegalArgumentException("law penalty vertex: the penalty weight must be finite and not"
                    + " negative, found " + penaltyWeight);
        }
        this.penaltyWeight = penaltyWeight;
    }

    /** @return the per-law weights w_i (null: all 1) */
    public double[] getLawWeights() {
        return lawWeights == null ? null : lawWeights.clone();
    }

    /** Sets the per-law weights w_i, one per scalar law (null: all 1). */
    public void setLawWeights(double[] lawWeights) {
        this.lawWeights = lawWeights == null ? null : lawWeights.clone();
        this.penalty = null;
    }

    /** @return the folded feature statistics (physical = scale·normalised + offset per law input), or null */
    public Scaling getInputScaling() {
        return inputScaling;
    }

    /** Sets the folded feature statistics; for the JSON mapper. */
    public void setInputScaling(Scaling inputScaling) {
        this.inputScaling = inputScaling;
    }

    /** @return the folded label statistics (physical = scale·normalised + offset per output), or null */
    public Scaling getOutputScaling() {
        return outputScaling;
    }

    /** Sets the folded label statistics; for the JSON mapper. */
    public void setOutputScaling(Scaling outputScaling) {
        this.outputScaling = outputScaling;
    }

    /**
     * A copy that evaluates the laws in physical units on a network trained on normalised features and labels, as
     * {@link LawVertex#normalizedWith} does.
     *
     * @param normalizer a fitted {@code NormalizerStandardize} or {@code NormalizerMinMaxScaler} with label statistics
     * @return a new vertex; this one is left unchanged
     * @throws IllegalArgumentException when the normalizer does not match the law set (the message says what to
     *         change)
     */
    public LawPenaltyVertex normalizedWith(DataNormalization normalizer) {
        LawSet laws = penalty().laws();
        LawPenaltyVertex v = clone();
        v.inputScaling = NormalizerFolding.features("law penalty vertex", normalizer, laws.inputNames());
        v.outputScaling = NormalizerFolding.labels("law penalty vertex", normalizer, laws.outputNames());
        return v;
    }

    /**
     * @return the penalty of the law set with the law weights (built on first use)
     * @throws IllegalStateException when no law set is configured
     * @throws IllegalArgumentException when the law weights do not fit the law set
     */
    public Penalty penalty() {
        Penalty pe = penalty;
        if (pe == null) {
            if (spec == null) {
                throw new IllegalStateException("law penalty vertex has no laws; construct it with"
                        + " new LawPenaltyVertex(LawSpec, weight)");
            }
            LawSet set = spec.lawSet();
            pe = lawWeights == null ? Penalty.of(set) : Penalty.of(set, lawWeights);
            penalty = pe;
        }
        return pe;
    }

    /** @return 1 when the law set has no inputs (ŷ only), else 2 (x, then ŷ) */
    int inputCount() {
        return penalty().laws().inputWidth() == 0 ? 1 : 2;
    }

    Scaling checkedInputScaling() {
        if ((inputScaling == null) != (outputScaling == null)) {
            throw new IllegalStateException("law penalty vertex: it has only one of the input and output scalings;"
                    + " fold the normalizer with normalizedWith, which sets both");
        }
        return NdArrays.checkScaling("law penalty vertex", inputScaling, "input", penalty().laws().inputWidth());
    }

    Scaling checkedOutputScaling() {
        return NdArrays.checkScaling("law penalty vertex", outputScaling, "output", penalty().laws().outputWidth());
    }

    /** @return a deep copy */
    @Override
    public LawPenaltyVertex clone() {
        LawPenaltyVertex v = new LawPenaltyVertex();
        v.spec = NdArrays.copy(spec);
        v.penaltyWeight = penaltyWeight;
        v.lawWeights = lawWeights == null ? null : lawWeights.clone();
        v.inputScaling = inputScaling == null ? null : inputScaling.copy();
        v.outputScaling = outputScaling == null ? null : outputScaling.copy();
        return v;
    }

    /** Equal when the specs, weights and scalings are equal. */
    @Override
    public boolean equals(Object o) {
        if (o == null || o.getClass() != getClass()) {
            return false;
        }
        LawPenaltyVertex v = (LawPenaltyVertex) o;
        return Objects.equals(spec, v.spec) && Double.compare(penaltyWeight, v.penaltyWeight) == 0
                && Arrays.equals(lawWeights, v.lawWeights) && Objects.equals(inputScaling, v.inputScaling)
                && Objects.equals(outputScaling, v.outputScaling);
    }

    /** @return a hash of the specs, weights and scalings */
    @Override
    public int hashCode() {
        return Objects.hash(spec, penaltyWeight, Arrays.hashCode(lawWeights), inputScaling, outputScaling);
    }

    /** @return 0: the vertex has no parameters */
    @Override
    public long numParams(boolean backprop) {
        return 0;
    }

    /** @return 1 (ŷ, for laws without inputs) */
    @Override
    public int minVertexInputs() {
        return 1;
    }

    /** @return 2 (x, then ŷ) */
    @Override
    public int maxVertexInputs() {
        return 2;
    }

    /** Builds the running vertex; a law text that does not parse fails here with its diagnostics. */
    @Override
    public org.deeplearning4j.nn.graph.vertex.GraphVertex instantiate(ComputationGraph graph, String name, int idx,
            INDArray paramsView, boolean initializeParams, DataType networkDatatype) {
        penalty();
        checkedInputScaling();
        checkedOutputScaling();
        return new LawPenaltyVertexImpl(graph, name, idx, this, networkDatatype);
    }

    /**
     * @return a feed-forward type with one column per scalar law
     * @throws InvalidInputTypeException unless given the law inputs (when the laws have any) and all outputs
     */
    @Override
    public InputType getOutputType(int layerIndex, InputType... vertexInputs) {
        Penalty pe = penalty();
        LawSet laws = pe.laws();
        int count = inputCount();
        if (vertexInputs == null || vertexInputs.length != count) {
            throw new InvalidInputTypeException("law penalty vertex needs " + (count == 2
                    ? "two inputs, the law inputs x (width " + laws.inputWidth() + ") and the predicted outputs (width "
                    + laws.outputWidth() + ")" : "one input, the predicted outputs (width " + laws.outputWidth() + ")")
                    + ", found " + (vertexInputs == null ? 0 : vertexInputs.length));
        }
        if (count == 2) {
            NdArrays.checkFeedForward(WHO, vertexInputs[0], laws.inputWidth(), "input 0 (the law inputs x)",
                    laws.inputNames(),
                    "connect the network inputs the laws declare, in declared order");
        }
        NdArrays.checkFeedForward(WHO, vertexInputs[count - 1], laws.outputWidth(),
                "input " + (count - 1) + " (the predicted outputs)",
                laws.outputNames(), "give the head one output per declared output, in declared order");
        return InputType.feedForward(pe.termCount());
    }

    /** @return a report of no parameters and one activation array of the law count per example */
    @Override
    public MemoryReport getMemoryReport(InputType... inputTypes) {
        InputType out = getOutputType(-1, inputTypes);
        return NdArrays.vertexMemory(LawPenaltyVertex.class, inputTypes[inputTypes.length - 1], out);
    }

    /** @return the spec and λ */
    @Override
    public String toString() {
        return "LawPenaltyVertex{" + spec + ", weight " + penaltyWeight
                + (outputScaling == null ? "" : ", normalised inputs and outputs") + "}";
    }
}
