package dev.lawful.dl4j;

import dev.lawful.enforce.BoundCheck;
import dev.lawful.enforce.Completion;
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
 * The running law vertex of {@link LawVertex}: forward y = complete(x, z); backward ḡ_z = ḡ_f − (∂C/∂z)ᵀλ and
 * ḡ_x = −(∂C/∂x)ᵀλ with Aᵀλ = ḡ_c, both by {@link Completion} in double. Outputs go to the workspace manager's
 * {@code ACTIVATIONS} arrays, gradients to {@code ACTIVATION_GRAD} arrays, in the network's data type. With the
 * scalings of {@link LawVertex#normalizedWith} the inputs are x_n, z_n and the output y_n: forward x = σ_x·x_n + μ_x,
 * z = σ_z·z_n + μ_z, y = complete(x, z), y_n = (y − μ)/σ (free columns pass z_n through); backward ḡ_y = ḡ_n/σ,
 * ḡ_x, ḡ_z from {@link Completion#backward}, ḡ_x_n = σ_x·ḡ_x, ḡ_z_n = σ_z·ḡ_z.
 *
 * <p>Not thread-safe, like every Deeplearning4j vertex: it keeps one {@link Completion.Workspace}.
 */
public class LawVertexImpl extends BaseGraphVertex {
    private static final long serialVersionUID = 1L;

    /** Input slots of x and z; gradient slots of ḡ_y, ḡ_z and ḡ_x. */
    private static final int X = 0;
    private static final int Z = 1;
    private static final int GY = 0;
    private static final int GZ = 1;
    private static final int GX = 2;

    private final LawVertex config;
    /** The core's workspace, the last solution and the reused buffers (see {@link LawCallState}). */
    private final LawCallState state = new LawCallState(2, 3);

    /**
     * @param graph    the graph
     * @param name     the vertex name
     * @param index    the vertex index
     * @param config   the configuration
     * @param dataType the network's data type
     */
    public LawVertexImpl(ComputationGraph graph, String name, int index, LawVertex config, DataType dataType) {
        super(graph, name, index, null, null, dataType);
        this.config = config;
    }

    /** @return the configuration */
    public LawVertex config() {
        return config;
    }

    /** @return the completion this vertex runs */
    protected Completion completion() {
        return config.lawCompletion();
    }

    /** @return this vertex's completion workspace, created on first use */
    protected Completion.Workspace workspace(Completion c) {
        return state.workspace(c);
    }

    private String who() {
        return "law vertex '" + vertexName + "'";
    }

    /**
     * @return the batch size, after checking both inputs' widths and that their batch sizes agree
     * @throws IllegalArgumentException naming the widths and what to change
     */
    protected int checkedBatch(Completion c) {
        int bx = NdArrays.batch(inputs[0], who(), "input 0 (the law inputs x)", c.inputWidth(),
                c.laws().inputNames(), "connect the network inputs the laws declare, in declared order, as the"
                        + " vertex's first input");
        int bz = NdArrays.batch(inputs[1], who(), "input 1 (the head's free outputs z)", c.freeWidth(),
                c.freeNames(), NdArrays.headFix(c));
        if (bx != bz) {
            throw new IllegalArgumentException(who() + ": input 0 has " + bx + " rows but input 1 has " + bz
                    + "; both inputs must hold the same samples");
        }
        return bz;
    }

    /**
     * @return the outputs for the current inputs, in double, declared order, in physical units when the vertex has
     *         scalings; {@code xOut[0]} receives the (physical) x and, when {@code xOut} has two slots,
     *         {@code xOut[1]} the free outputs as given; all reused buffers, valid until the second solve after
     *         this one ({@link LawCallState})
     */
    protected double[] complete(Completion c, int batch, double[][] xOut, boolean training) {
        double[] xIn = state.convert(X, inputs[0]);
        double[] zIn = state.convert(Z, inputs[1]);
        double[] x = xIn;
        BoundCheck check = config.getSpec().check(training);
        // backward follows forward on the same inputs: reuse that solution (and its physical x) rather than
        // solving again
        double[] y = state.solution(c, check, xIn, zIn);
        if (y != null) {
            x = state.derived();
        } else {
            Scaling in = config.checkedInputScaling(c);
            Scaling out = config.checkedOutputScaling(c);
            double[] z = zIn;
            if (out != null) {
                x = in.toPhysical(xIn, batch, state.derivedBuffer(xIn.length));
                z = NdArrays.physicalFree(out, c.freeOutputs(), zIn, batch, state.scratch(0, zIn.length));
            }
            y = state.solutionBuffer(batch * c.outputWidth());
            c.forward(x, z, batch, y, null, workspace(c), check);
            state.remember(c, check, y, x, xIn, zIn);
        }
        if (xOut != null) {
            xOut[0] = x;
            if (xOut.length > 1) {
                xOut[1] = zIn;
            }
        }
        return y;
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

    /**
     * Completes the inputs to {@code [batch, outputWidth]} outputs in declared order.
     *
     * @throws IllegalArgumentException when an input has the wrong width
     */
    @Override
    public INDArray doForward(boolean training, LayerWorkspaceMgr workspaceMgr) {
        if (!canDoForward()) {
            throw new IllegalStateException(who() + ": cannot do forward pass, inputs not set");
        }
        Completion c = completion();
        int batch = checkedBatch(c);
        double[][] given = new double[2][];
        double[] y = complete(c, batch, given, training);
        Scaling out = config.checkedOutputScaling(c);
        if (out != null) {
            y = NdArrays.normalisedOutputs(out, c.freeOutputs(), y, given[1], batch,
                    state.scratch(1, batch * c.outputWidth()));
        }
        return NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATIONS, dataType, y, batch, c.outputWidth());
    }

    /** @return no parameter gradients, and the gradients on x and on z, in input order */
    @Override
    public Pair<Gradient, INDArray[]> doBackward(boolean tbptt, LayerWorkspaceMgr workspaceMgr) {
        if (!canDoBackward()) {
            throw new IllegalStateException(who() + ": cannot do backward pass, epsilon or inputs not set");
        }
        Completion c = completion();
        int batch = checkedBatch(c);
        NdArrays.batch(epsilon, who(), "the gradient on its output", c.outputWidth(), c.columns(),
                "the vertex after it must take all " + c.outputWidth() + " outputs");
        double[][] x = new double[1][];
        double[] y = complete(c, batch, x, true);
        double[] gy = state.gradient(GY, epsilon);
        double[] gz = state.gradient(GZ, batch * c.freeWidth());
        double[] gx = state.gradient(GX, batch * c.inputWidth());
        Scaling in = config.checkedInputScaling(c);
        Scaling scaling = config.checkedOutputScaling(c);
        if (scaling != null) {
            NdArrays.divideByScale(scaling, gy);
        }
        c.backward(x[0], y, gy, batch, gz, gx, workspace(c));
        if (scaling != null) {
            NdArrays.multiplyByScale(scaling, c.freeOutputs(), gz);
            NdArrays.multiplyByScale(in, gx);
        }
        INDArray[] out = {
            NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATION_GRAD, dataType, gx, batch, c.inputWidth()),
            NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATION_GRAD, dataType, gz, batch, c.freeWidth())
        };
        return new Pair<>(null, out);
    }

    /** Refuses a gradient view: the vertex has no parameters. */
    @Override
    public void setBackpropGradientsViewArray(INDArray backpropGradientsViewArray) {
        if (backpropGradientsViewArray != null) {
            throw new IllegalStateException(who() + " has no parameters, so it takes no gradient view array");
        }
    }

    /** @return the free outputs' mask (the outputs are per sample, like z), or the inputs' mask when z has none */
    @Override
    public Pair<INDArray, MaskState> feedForwardMaskArrays(INDArray[] maskArrays, MaskState currentMaskState,
                                                           int minibatchSize) {
        if (maskArrays == null) {
            return new Pair<>(null, currentMaskState);
        }
        INDArray m = maskArrays.length > 1 && maskArrays[1] != null ? maskArrays[1] : maskArrays[0];
        return new Pair<>(m, currentMaskState);
    }

    /** @return the vertex name and its spec */
    @Override
    public String toString() {
        return "LawVertexImpl(" + vertexName + ", " + config.getSpec() + ")";
    }
}
