package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.deeplearning4j.gradientcheck.GradientCheckUtil;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.WorkspaceMode;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.conf.layers.OutputLayer;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.weights.WeightInit;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.activations.IActivation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.learning.config.NoOp;
import org.nd4j.linalg.lossfunctions.ILossFunction;

/**
 * {@link LawPenaltyLoss} inside real networks, checked by Deeplearning4j's own gradient checker in double precision
 * with workspaces enabled: as the loss of an {@link OutputLayer} with a non-linear activation and of a
 * {@link LossLayer}, with and without a per-example labels mask.
 */
class LawPenaltyLossGradientCheckTest {
    private static final int N_IN = 3;
    private static final int P = 4;
    private static final int BATCH = 6;

    private static DataType savedDefault;
    private static DataType savedFloatingPoint;

    /** The checker refuses to run unless ND4J's global default type is double; restored afterwards. */
    @BeforeAll
    static void doublePrecision() {
        savedDefault = Nd4j.dataType();
        savedFloatingPoint = Nd4j.defaultFloatingPointType();
        Nd4j.setDefaultDataTypes(DataType.DOUBLE, DataType.DOUBLE);
    }

    @AfterAll
    static void restorePrecision() {
        Nd4j.setDefaultDataTypes(savedDefault, savedFloatingPoint);
    }

    private static MultiLayerNetwork network(ILossFunction loss, boolean lossLayer) {
        NeuralNetConfiguration.ListBuilder list = new NeuralNetConfiguration.Builder()
                .dataType(DataType.DOUBLE)
                .seed(42)
                .updater(new NoOp())
                .weightInit(WeightInit.XAVIER)
                .trainingWorkspaceMode(WorkspaceMode.ENABLED)
                .inferenceWorkspaceMode(WorkspaceMode.ENABLED)
                .list()
                .layer(new DenseLayer.Builder().nIn(N_IN).nOut(5).activation(Activation.TANH).build());
        if (lossLayer) {
            list.layer(new DenseLayer.Builder().nIn(5).nOut(P).activation(Activation.IDENTITY).build())
                    .layer(new LossLayer.Builder(loss).activation(Activation.IDENTITY).build());
        } else {
            list.layer(new OutputLayer.Builder(loss).nIn(5).nOut(P).activation(Activation.TANH).build());
        }
        MultiLayerConfiguration conf = list.build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        return net;
    }

    private static INDArray random(SplittableRandom r, int rows, int cols) {
        double[] d = new double[rows * cols];
        for (int i = 0; i < d.length; i++) {
            d[i] = r.nextDouble(-1, 1);
        }
        return Nd4j.create(d, new long[] {rows, cols}, DataType.DOUBLE);
    }

    private static boolean check(MultiLayerNetwork net, INDArray mask, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        INDArray x = random(r, BATCH, N_IN);
        INDArray labels = random(r, BATCH, P);
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.MLNConfig()
                .net(net)
                .input(x)
                .labels(labels)
                .labelMask(mask)
                .epsilon(1e-6)
                .maxRelError(1e-6)
                .minAbsoluteError(1e-10)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY)
                .exitOnFirstError(false));
    }

    private static LawPenaltyLoss loss(double lambda) {
        // the affine and the nonlinear law of the score test, with units: the penalty gradient has non-constant
        // Jacobian entries, so a wrong chain rule anywhere shows
        return new LawPenaltyLoss(LawSpec.of(LawPenaltyLossScoreTest.LAWS), lambda, new double[] {1.5, 0.75});
    }

    private static INDArray mask() {
        return Nd4j.create(new double[] {1, 0, 1, 1, 0, 1}, new long[] {BATCH, 1}, DataType.DOUBLE);
    }

    @Test
    void outputLayerWithActivationPassesTheGradientCheck() {
        assertTrue(check(network(loss(2.0), false), null, 1));
    }

    @Test
    void outputLayerWithPerExampleMaskPassesTheGradientCheck() {
        assertTrue(check(network(loss(2.0), false), mask(), 2));
    }

    @Test
    void lossLayerPassesTheGradientCheck() {
        assertTrue(check(network(loss(0.5), true), null, 3));
        assertTrue(check(network(loss(0.5), true), mask(), 4));
    }

    @Test
    void aWrongPenaltyGradientFailsTheCheck() {
        // negative control: score with λ, gradient with 2λ; the checker must notice the penalty part
        assertFalse(check(network(new WrongGradient(loss(2.0), loss(4.0)), false), null, 5));
    }

    /** Scores with one loss and returns the gradient of another: a deliberately wrong backward pass. */
    static final class WrongGradient implements ILossFunction {
        private static final long serialVersionUID = 1L;
        private final ILossFunction score;
        private final ILossFunction gradient;

        WrongGradient(ILossFunction score, ILossFunction gradient) {
            this.score = score;
            this.gradient = gradient;
        }

        @Override
        public double computeScore(INDArray labels, INDArray preOutput, IActivation activationFn, INDArray mask,
                boolean average) {
            return score.computeScore(labels, preOutput, activationFn, mask, average);
        }

        @Override
        public INDArray computeScoreArray(INDArray labels, INDArray preOutput, IActivation activationFn,
                INDArray mask) {
            return score.computeScoreArray(labels, preOutput, activationFn, mask);
        }

        @Override
        public INDArray computeGradient(INDArray labels, INDArray preOutput, IActivation activationFn,
                INDArray mask) {
            return gradient.computeGradient(labels, preOutput, activationFn, mask);
        }

        @Override
        public Pair<Double, INDArray> computeGradientAndScore(INDArray labels, INDArray preOutput,
                IActivation activationFn, INDArray mask, boolean average) {
            return new Pair<>(computeScore(labels, preOutput, activationFn, mask, average),
                    computeGradient(labels, preOutput, activationFn, mask));
        }

        @Override
        public String name() {
            return "WrongGradient";
        }
    }
}
