package dev.lawful.dl4j;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Penalty;
import org.deeplearning4j.nn.api.Layer;
import org.deeplearning4j.nn.api.MaskState;
import org.deeplearning4j.nn.gradient.Gradient;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.graph.vertex.BaseGraphVertex;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;

/**
 * The running vertex of {@link LawPenaltyVertex}: forward ρ = √λ·{@link Penalty#weightedResiduals}(x, ŷ); backward
 * ḡ_ŷ, ḡ_x = √λ·{@link Penalty#weightedResidualsBackward}(ḡ_ρ), all in double. With scalings the inputs are mapped to
 * physical units first (x = σ_x·x_n + μ_x, ŷ = σ·ŷ_n + μ) and the gradients multiplied by the scales on the way
 * back. Outputs go to {@code ACTIVATIONS} arrays, gradients to {@code ACTIVATION_GRAD} arrays, in the network's data
 * type.
 *
 * <p>Not thread-safe, like every Deeplearning4j vertex: it keeps one {@link Penalty.Workspace}.
 */
public class LawPenaltyVertexImpl extends BaseGraphVertex {
    private static final long serialVersionUID = 1L;

    private final LawPenaltyVertex config;
    /** Only the core's workspace: the vertex caches no solution and converts into fresh arrays. */
    private final LawCallState state = new LawCallState(0, 0);

    /**
     * @param graph    the graph
     * @param name     the vertex name
     * @param index    the vertex index
     * @param config   the configuration
     * @param dataType the network's data type
     */
    public LawPenaltyVertexImpl(ComputationGraph graph, String name, int index, LawPenaltyVertex config,
            DataType dataType) {
        super(graph, name, index, null, null, dataType);
        this.config = config;
    }

    private String who() {
        return "law penalty vertex '" + vertexName + "'";
    }

    /** x and ŷ in physical units, after checking widths; {@code [0]} is null when the laws have no inputs. */
    private double[][] physical(Penalty pe, int[] batchOut) {
        LawSet laws = pe.laws();
        int count = config.inputCount();
        if (inputs.length != count) {
            throw new IllegalStateException(who() + " expects " + count + " inputs, found " + inputs.length);
        }
        INDArray yIn = inputs[count - 1];
        int batch = NdArrays.batch(yIn, who(), "input " + (count - 1) + " (the predicted outputs)",
                laws.outputWidth(), laws.outputNames(), "give the head one output per declared output, in declared"
                        + " order");
        double[] x = null;
        if (count == 2) {
            int bx = NdArrays.batch(inputs[0], who(), "input 0 (the law inputs x)", laws.inputWidth(),
                    laws.inputNames(), "connect the network inputs the laws declare, in declared order");
            if (bx != batch) {
                throw new IllegalArgumentException(who() + ": input 0 has " + bx + " rows but input 1 has " + batch
                        + "; both inputs must hold the same samples");
            }
            x = NdArrays.toDouble(inputs[0]);
        }
        double[] y = NdArrays.toDouble(yIn);
        Scaling in = config.checkedInputScaling();
        Scaling out = config.checkedOutputScaling();
        if (out != null) {
            y = out.toPhysical(y, batch);
            if (x != null) {
                x = in.toPhysical(x, batch);
            }
        }
        batchOut[0] = batch;
        return new double[][] {x, y};
    }

    /** @return false: the vertex is not a layer */
    @Override
    public boolean hasLayer() {
        return false;
    }

    /** @return null: the vertex is not a layer */
    @Override
    public Layer getLayer() {
        return null;
    }

    /** @return the weighted terms, {@code [batch, termCount]} (laws, then limits) */
    @Override
    public INDArray doForward(boolean training, LayerWorkspaceMgr workspaceMgr) {
        if (!canDoForward()) {
            throw new IllegalStateException(who() + ": cannot do forward pass, inputs not set");
        }
        Penalty pe = config.penalty();
        int[] batch = new int[1];
        double[][] xy = physical(pe, batch);
        int m = pe.termCount();
        double[] rho = new double[batch[0] * m];
        pe.weightedResiduals(xy[0], xy[1], batch[0], rho, state.workspace(pe));
        double root = Math.sqrt(config.getPenaltyWeight());
        for (int i = 0; i < rho.length; i++) {
            rho[i] *= root;
        }
        return NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATIONS, dataType, rho, batch[0], m);
    }

    /** @return no parameter gradients, and the gradients on the inputs, in input order */
    @Override
    public Pair<Gradient, INDArray[]> doBackward(boolean tbptt, LayerWorkspaceMgr workspaceMgr) {
        if (!canDoBackward()) {
            throw new IllegalStateException(who() + ": cannot do backward pass, epsilon or inputs not set");
        }
        Penalty pe = config.penalty();
        LawSet laws = pe.laws();
        int[] b = new int[1];
        double[][] xy = physical(pe, b);
        int batch = b[0];
        int m = pe.termCount();
        NdArrays.batch(epsilon, who(), "the gradient on its output", m, java.util.Collections.nCopies(m, "residual"),
                "the layer after it must take all " + m + " weighted residuals");
        double[] g = NdArrays.toDouble(epsilon);
        double root = Math.sqrt(config.getPenaltyWeight());
        for (int i = 0; i < g.length; i++) {
            g[i] *= root;
        }
        boolean withX = xy[0] != null;
        double[] gy = new double[batch * laws.outputWidth()];
        double[] gx = withX ? new double[batch * laws.inputWidth()] : null;
        pe.weightedResidualsBackward(xy[0], xy[1], g, batch, gy, gx, state.workspace(pe));
        Scaling out = config.checkedOutputScaling();
        if (out != null) {
            NdArrays.multiplyByScale(out, gy);
            if (withX) {
                NdArrays.multiplyByScale(config.checkedInputScaling(), gx);
            }
        }
        INDArray gyArray = NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATION_GRAD, dataType, gy, batch,
                laws.outputWidth());
        INDArray[] result = withX
                ? new INDArray[] {NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATION_GRAD, dataType, gx, batch,
                        laws.inputWidth()), gyArray}
                : new INDArray[] {gyArray};
        return new Pair<>(null, result);
    }

    /** Refuses a gradient view: the vertex has no parameters. */
    @Override
    public void setBackpropGradientsViewArray(INDArray backpropGradientsViewArray) {
        if (backpropGradientsViewArray != null) {
            throw new IllegalStateException(who() + " has no parameters, so it takes no gradient view array");
        }
    }

    /** @return the predicted outputs' mask, or the inputs' mask when they have none */
    @Override
    public Pair<INDArray, MaskState> feedForwardMaskArrays(INDArray[] maskArrays, MaskState currentMaskState,
                                                           int minibatchSize) {
        if (maskArrays == null) {
            return new Pair<>(null, currentMaskState);
        }
        INDArray mask = maskArrays[maskArrays.length - 1] != null ? maskArrays[maskArrays.length - 1] : maskArrays[0];
        return new Pair<>(mask, currentMaskState);
    }

    /** @return the vertex name and its configuration */
    @Override
    public String toString() {
        return "LawPenaltyVertexImpl(" + vertexName + ", " + config + ")";
    }
}
