package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.List;
import org.deeplearning4j.nn.api.layers.IOutputLayer;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.gradient.DefaultGradient;
import org.deeplearning4j.nn.gradient.Gradient;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.nd4j.linalg.activations.IActivation;
import org.nd4j.linalg.activations.impl.ActivationIdentity;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.memory.MemoryWorkspace;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.api.DataSet;
import org.nd4j.linalg.dataset.api.iterator.DataSetIterator;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.common.primitives.Pair;

/**
 * The running {@link LawOutputLayer}: forward and the completion's backward are {@link LawLayerImpl}'s; on top, like
 * Deeplearning4j's parameter-free loss layer, it holds the labels, scores the completed outputs y with the loss
 * function (identity activation; the score is divided by the minibatch size and the network's regularisation term
 * added) and starts backpropagation from the loss gradient ∂L/∂y, which the completion maps to the head's free
 * outputs. Temporary arrays for the loss live in the current workspace, as the loss function's own do; the
 * epsilon returned to the head is an {@code ACTIVATION_GRAD} array.
 *
 * <p>Not thread-safe, like every Deeplearning4j layer.
 */
public class LawOutputLayerImpl extends LawLayerImpl implements IOutputLayer {
    private static final long serialVersionUID = 1L;

    private INDArray labels;
    private double fullNetworkRegularizationScore;
    private double score;

    /**
     * @param conf     the layer's configuration (its layer is a {@link LawOutputLayer})
     * @param dataType the network's data type
     */
    public LawOutputLayerImpl(NeuralNetConfiguration conf, DataType dataType) {
        super(conf, dataType);
    }

    private LawOutputLayer outputConf() {
        return (LawOutputLayer) layerConf();
    }

    private static IActivation identity() {
        return new ActivationIdentity();
    }

    /**
     * @return the completed outputs for the current input in the network's data type ({@code [batch, outputWidth]},
     *         the values {@link #activate} returns), in the current workspace
     */
    protected INDArray outputsForLoss(boolean training) {
        Completion c = completion();
        int batch = checkedBatch(c, input);
        double[] y = outputs(c, batch, training);
        INDArray out = Nd4j.createUninitialized(dataType, new long[] {batch, c.outputWidth()}, 'c');
        if (y.length > 0) {
            try (MemoryWorkspace ignored = Nd4j.getWorkspaceManager().scopeOutOfWorkspaces()) {
                out.assign(Nd4j.create(y, new long[] {batch, c.outputWidth()}, 'c'));
            }
        }
        return out;
    }

    /**
     * @return the labels as a {@code [batch, outputWidth]} array, after checking their width
     * @throws IllegalStateException when the input or the labels are missing
     * @throws IllegalArgumentException when the labels' width is not the number of outputs
     */
    protected INDArray checkedLabels() {
        if (input == null || labels == null) {
            throw new IllegalStateException(outputConf().who() + ": cannot score without "
                    + (input == null ? "an input" : "labels") + (input == null && labels == null ? " and labels" : ""));
        }
        Completion c = completion();
        INDArray l = labels.rank() > 2 ? labels.reshape(labels.size(0) * labels.size(2), labels.size(1)) : labels;
        NdArrays.batch(l, outputConf().who(), "its labels", c.outputWidth(), c.columns(),
                "give labels for all " + c.outputWidth() + " outputs in declared order");
        return l;
    }

    /**
     * @return ∂L/∂y, the loss function's gradient on the completed outputs ({@code [batch, outputWidth]}, not divided
     *         by the minibatch size, as for every Deeplearning4j output layer), in the current workspace
     */
    protected INDArray lossGradient() {
        INDArray l = checkedLabels();
        return outputConf().checkedLossFn().computeGradient(l, outputsForLoss(true), identity(), maskArray);
    }

    /**
     * @param fullNetRegTerm the network's regularisation score, added to the loss
     * @param training       whether the network is training (a training pass skips the final bound check unless
     *                       the spec certifies while training, {@link LawSpec#check(boolean)})
     * @param workspaceMgr   the network's workspace manager
     * @return the loss on the completed outputs divided by the minibatch size, plus {@code fullNetRegTerm}
     */
    @Override
    public double computeScore(double fullNetRegTerm, boolean training, LayerWorkspaceMgr workspaceMgr) {
        INDArray l = checkedLabels();
        this.fullNetworkRegularizationScore = fullNetRegTerm;
        double s = outputConf().checkedLossFn().computeScore(l, outputsForLoss(training), identity(), maskArray, false);
        s /= getInputMiniBatchSize();
        s += fullNetworkRegularizationScore;
        this.score = s;
        return s;
    }

    /**
     * @param fullNetRegTerm the network's regularisation score, added to every example's loss
     * @param workspaceMgr   the network's workspace manager
     * @return each example's loss on its completed outputs, {@code [batch, 1]}, an {@code ACTIVATIONS} array
     */
    @Override
    public INDArray computeScoreForExamples(double fullNetRegTerm, LayerWorkspaceMgr workspaceMgr) {
        INDArray l = checkedLabels();
        INDArray s = outputConf().checkedLossFn().computeScoreArray(l, outputsForLoss(false), identity(), maskArray);
        if (fullNetRegTerm != 0.0) {
            s.addi(fullNetRegTerm);
        }
        return workspaceMgr.leverageTo(ArrayType.ACTIVATIONS, s);
    }

    /**
     * Starts backpropagation: the loss gradient on the completed outputs, mapped to the head's free outputs by the
     * completion ({@link LawLayerImpl#backpropGradient}).
     *
     * @param epsilon ignored (null from the network): the gradient comes from the loss and the labels
     * @return no parameter gradients, and the gradient on the input, {@code [batch, freeWidth]}
     */
    @Override
    public Pair<Gradient, INDArray> backpropGradient(INDArray epsilon, LayerWorkspaceMgr workspaceMgr) {
        assertInputSet(true);
        return super.backpropGradient(lossGradient(), workspaceMgr);
    }

    /** Computes the (empty) parameter gradients and the score for the current input and labels. */
    @Override
    public void computeGradientAndScore(LayerWorkspaceMgr workspaceMgr) {
        backpropGradient(null, workspaceMgr);
        score = computeScore(fullNetworkRegularizationScore, true, workspaceMgr);
    }

    /** @return the last computed score */
    @Override
    public double score() {
        return score;
    }

    /** @return an empty gradient: the layer has no parameters */
    @Override
    public Gradient gradient() {
        return new DefaultGradient();
    }

    /** @return the (empty) gradient and the last computed score */
    @Override
    public Pair<Gradient, Double> gradientAndScore() {
        return new Pair<>(gradient(), score());
    }

    /** @return true: the layer scores its outputs against labels */
    @Override
    public boolean needsLabels() {
        return true;
    }

    /** Sets the labels, {@code [batch, outputWidth]} in declared order (normalised for a normalised layer). */
    @Override
    public void setLabels(INDArray labels) {
        this.labels = labels;
    }

    /** @return the labels last set, or null */
    @Override
    public INDArray getLabels() {
        return labels;
    }

    /** Clears the input, mask and labels. */
    @Override
    public void clear() {
        super.clear();
        labels = null;
    }

    /** @return the number of label columns (the number of outputs) */
    @Override
    public int numLabels() {
        return labels == null ? completion().outputWidth() : (int) labels.size(1);
    }

    private UnsupportedOperationException notAClassifier(String what) {
        return new UnsupportedOperationException(outputConf().who() + " predicts real-valued outputs, so " + what
                + " does not apply; use the network's output() and score()");
    }

    private UnsupportedOperationException trainTheNetwork() {
        return new UnsupportedOperationException(outputConf().who() + " has no parameters to fit on its own;"
                + " train the network (MultiLayerNetwork.fit)");
    }

    /** @throws UnsupportedOperationException always: the layer is not a classifier */
    @Override
    public double f1Score(DataSet data) {
        throw notAClassifier("an F1 score");
    }

    /** @throws UnsupportedOperationException always: the layer is not a classifier */
    @Override
    public double f1Score(INDArray examples, INDArray labels) {
        throw notAClassifier("an F1 score");
    }

    /** @throws UnsupportedOperationException always: the layer is not a classifier */
    @Override
    public int[] predict(INDArray examples) {
        throw notAClassifier("class prediction");
    }

    /** @throws UnsupportedOperationException always: the layer is not a classifier */
    @Override
    public List<String> predict(DataSet dataSet) {
        throw notAClassifier("class prediction");
    }

    /** @throws UnsupportedOperationException always: train the network instead */
    @Override
    public void fit(DataSetIterator iter) {
        throw trainTheNetwork();
    }

    /** @throws UnsupportedOperationException always: train the network instead */
    @Override
    public void fit(INDArray examples, INDArray labels) {
        throw trainTheNetwork();
    }

    /** @throws UnsupportedOperationException always: train the network instead */
    @Override
    public void fit(DataSet data) {
        throw trainTheNetwork();
    }

    /** @throws UnsupportedOperationException always: train the network instead */
    @Override
    public void fit(INDArray examples, int[] labels) {
        throw trainTheNetwork();
    }
}
