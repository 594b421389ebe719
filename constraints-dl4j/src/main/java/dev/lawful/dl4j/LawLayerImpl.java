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

    private transient Completion.Workspace workspace;
    private transient Completion workspaceOwner;

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
        if (workspace == null || workspaceOwner != c) {
            workspace = c.newWorkspace();
            workspaceOwner = c;
        }
        return workspace;
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
     *         in physical units when the layer has an output scaling
     */
    protected double[] complete(Completion c, int batch, boolean training) {
        return complete(c, batch, NdArrays.toDouble(input, spareZ), training);
    }

    private double[] complete(Completion c, int batch, double[] zIn, boolean training) {
        BoundCheck check = layerConf().getSpec().check(training);
        // backward follows forward on the same input: reuse that solution rather than solving again (compared by
        // value, since a workspace may hand the same array back with new contents); an uncertified training
        // solution never answers a pass that must be certified
        if (lastY != null && lastOwner == c && (lastCheck == BoundCheck.EVERY_SAMPLE || check == BoundCheck.SKIP)
                && java.util.Arrays.equals(lastZ, zIn)) {
            if (zIn != lastZ) {
                spareZ = zIn;
            }
            return lastY;
        }
        Scaling out = layerConf().checkedOutputScaling(c);
        double[] z = out == null ? zIn : NdArrays.physicalFree(out, c.freeOutputs(), zIn, batch);
        double[] y = NdArrays.reuse(spareY, batch * c.outputWidth());
        c.forward(null, z, batch, y, null, workspace(c), check);
        // the buffers of the previous solution become the spares the next call converts and solves into
        spareZ = lastZ;
        spareY = lastY;
        lastZ = zIn;
        lastY = y;
        lastOwner = c;
        lastCheck = check;
        return y;
    }

    /** The last input solved (as converted), its solution, the completion that solved it and how it was checked. */
    private double[] lastZ;
    private double[] lastY;
    private Completion lastOwner;
    private BoundCheck lastCheck;
    /**
     * Buffers reused from call to call (a training step then allocates no conversion arrays): the next input's
     * conversion, the next solution, and the backward pass's gradients. A buffer handed out by {@link #complete}
     * stays valid until the second call after it.
     */
    private double[] spareZ;
    private double[] spareY;
    private double[] spareGy;
    private double[] spareGz;

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
        double[] zIn = NdArrays.toDouble(input, spareZ);
        double[] y = complete(c, batch, zIn, training);
        Scaling out = layerConf().checkedOutputScaling(c);
        if (out != null) {
            y = NdArrays.normalisedOutputs(out, c.freeOutputs(), y, zIn, batch);
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
        double[] gy = NdArrays.toDouble(epsilon, spareGy);
        spareGy = gy;
        double[] gz = NdArrays.reuse(spareGz, batch * c.freeWidth());
        spareGz = gz;
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
