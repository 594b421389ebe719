package dev.lawful.dl4j;

import dev.lawful.enforce.BoundCheck;
import dev.lawful.enforce.Completion;
import org.deeplearning4j.nn.api.Layer;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.gradient.DefaultGradient;
import org.deeplearning4j.nn.gradient.Gradient;
import org.deeplearning4j.nn.layers.AbstractLayer;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;

/**
 * The running law layer of {@link LawLayer}: forward y = complete(z), backward ḡ_z = ḡ_f − (∂C/∂z)ᵀλ with
 * Aᵀλ = ḡ_c, both by {@link Completion} in double. With an output scaling ({@link LawLayer#normalizedWith}) the
 * input is z_n and the output y_n: forward z = σ_z·z_n + μ_z, y = complete(z), y_n = (y − μ)/σ (free columns pass
 * z_n through); backward ḡ_y = ḡ_n/σ, ḡ_z from {@link Completion#backward}, ḡ_z_n = σ_z·ḡ_z. Activations are returned in the workspace manager's
 * {@code ACTIVATIONS} arrays and epsilons in {@code ACTIVATION_GRAD} arrays, in the network's data type.
 *
 * <p>Not thread-safe, like every Deeplearning4j layer: it keeps one {@link Completion.Workspace}.
 */
public class LawLayerImpl extends AbstractLayer<LawLayer> {
    private static final long serialVersionUID = 1L;

    /** Input slot of the free outputs z; gradient slots of ḡ_y and ḡ_z. */
    private static final int Z = 0;
    private static final int GY = 0;
    private static final int GZ = 1;

    /** The core's workspace, the last solution and the reused buffers (see {@link LawCallState}). */
    private final LawCallState state = new LawCallState(1, 2);

    /**
     * @param conf     the layer's configuration (its layer is a {@link LawLayer})
     * @param dataType the network's data type
     */
    public LawLayerImpl(NeuralNetConfiguration conf, DataType dataType) {
        super(conf, dataType);
    }

    /** @return the completion this layer runs */
    protected Completion completion() {
        return layerConf().lawCompletion();
    }

    /** @return this layer's completion workspace, created on first use */
    protected Completion.Workspace workspace(Completion c) {
        return state.workspace(c);
    }

    /**
     * @return the batch size of the input, after checking its width is {@code freeWidth()}
     * @throws IllegalArgumentException naming both widths and what to change
     */
    protected int checkedBatch(Completion c, INDArray z) {
        return NdArrays.batch(z, layerConf().who(), "its input (the head's free outputs)", c.freeWidth(),
                c.freeNames(), NdArrays.headFix(c));
    }

    /**
     * @return the completed outputs for the current input, in double, declared order ({@code batch × outputWidth});
     *         in physical units when the layer has an output scaling; a reused buffer, valid until the second
     *         solve after this one ({@link LawCallState})
     */
    protected double[] complete(Completion c, int batch, boolean training) {
        return complete(c, batch, state.convert(Z, input), training);
    }

    private double[] complete(Completion c, int batch, double[] zIn, boolean training) {
        BoundCheck check = layerConf().getSpec().check(training);
        // backward follows forward on the same input: reuse that solution rather than solving again
        double[] y = state.solution(c, check, zIn);
        if (y != null) {
            return y;
        }
        Scaling out = layerConf().checkedOutputScaling(c);
        double[] z = out == null ? zIn
                : NdArrays.physicalFree(out, c.freeOutputs(), zIn, batch, state.scratch(0, zIn.length));
        y = state.solutionBuffer(batch * c.outputWidth());
        c.forward(null, z, batch, y, null, workspace(c), check);
        state.remember(c, check, y, null, zIn);
        return y;
    }

    /**
     * Completes the input: {@code [batch, freeWidth]} free outputs to {@code [batch, outputWidth]} outputs in
     * declared order, in the network's data type (both normalised when the layer has an output scaling).
     *
     * @throws IllegalArgumentException when the input's width is not {@code freeWidth()}
     * @throws dev.lawful.enforce.EnforcementException when a sample cannot be enforced (unless the spec masks)
     */
    @Override
    public INDArray activate(boolean training, LayerWorkspaceMgr workspaceMgr) {
        assertInputSet(false);
        Completion c = completion();
        int batch = checkedBatch(c, input);
        double[] y = outputs(c, batch, training);
        return NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATIONS, dataType, y, batch, c.outputWidth());
    }

    /**
     * @return the layer's outputs for the current input in double, declared order ({@code batch × outputWidth}):
     *         the values {@link #activate} emits before rounding to the network's data type (normalised when the
     *         layer has an output scaling)
     */
    double[] outputs(Completion c, int batch, boolean training) {
        double[] zIn = state.convert(Z, input);
        double[] y = complete(c, batch, zIn, training);
        Scaling out = layerConf().checkedOutputScaling(c);
        if (out != null) {
            y = NdArrays.normalisedOutputs(out, c.freeOutputs(), y, zIn, batch,
                    state.scratch(1, batch * c.outputWidth()));
        }
        return y;
    }

    /**
     * Maps the gradient on the outputs to the gradient on the free outputs by {@link Completion#backward}, at the
     * double solution for the current input.
     *
     * @param epsilon gradient of the score on this layer's output, {@code [batch, outputWidth]}
     * @return no parameter gradients, and the gradient on the input, {@code [batch, freeWidth]}
     */
    @Override
    public Pair<Gradient, INDArray> backpropGradient(INDArray epsilon, LayerWorkspaceMgr workspaceMgr) {
        assertInputSet(true);
        Completion c = completion();
        int batch = checkedBatch(c, input);
        NdArrays.batch(epsilon, layerConf().who(), "the gradient on its output", c.outputWidth(), c.columns(),
                "the layer after it must take all " + c.outputWidth() + " outputs");
        double[] y = complete(c, batch, true);
        double[] gy = state.gradient(GY, epsilon);
        double[] gz = state.gradient(GZ, batch * c.freeWidth());
        Scaling scaling = layerConf().checkedOutputScaling(c);
        if (scaling != null) {
            NdArrays.divideByScale(scaling, gy);
        }
        c.backward(null, y, gy, batch, gz, null, workspace(c));
        if (scaling != null) {
            NdArrays.multiplyByScale(scaling, c.freeOutputs(), gz);
        }
        INDArray out = NdArrays.fromDouble(workspaceMgr, ArrayType.ACTIVATION_GRAD, dataType, gz, batch, c.freeWidth());
        return new Pair<>(new DefaultGradient(), out);
    }

    /** @return false: nothing to pretrain */
    @Override
    public boolean isPretrainLayer() {
        return false;
    }

    /** Nothing to clear: the layer has no parameters. */
    @Override
    public void clearNoiseWeightParams() {
    }

    /** @return 0: the layer has no parameters */
    @Override
    public double calcRegularizationScore(boolean backpropOnlyParams) {
        return 0;
    }

    /** @return {@link Layer.Type#FEED_FORWARD} */
    @Override
    public Layer.Type type() {
        return Layer.Type.FEED_FORWARD;
    }

    /** @return null: the layer has no parameters */
    @Override
    public INDArray params() {
        return null;
    }
}
