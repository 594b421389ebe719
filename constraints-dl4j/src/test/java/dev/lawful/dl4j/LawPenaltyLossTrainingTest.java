package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.WorkspaceMode;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.OutputLayer;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.weights.WeightInit;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.learning.config.Adam;

/**
 * The soft baseline trades data fit against law violation: trained on labels that violate the law (invented,
 * seeded synthetic data), the residual falls as the penalty weight λ grows, the fit to the labels gets worse, and
 * the residual stays far above the rounding level that exact enforcement reaches.
 */
class LawPenaltyLossTrainingTest {
    private static final String LAW = String.join("\n",
            "output q[3] kg/s",
            "law split: q[0] = q[1] + q[2]",
            "");
    private static final int N = 128;
    private static final int EPOCHS = 400;

    /** Inputs x in [-1, 1]³; labels q1, q2 smooth in x and q0 = q1 + q2 + 0.5, so every label violates the law. */
    private static DataSet data() {
        SplittableRandom r = new SplittableRandom(2024);
        double[] x = new double[N * 3];
        double[] q = new double[N * 3];
        for (int s = 0; s < N; s++) {
            for (int k = 0; k < 3; k++) {
                x[3 * s + k] = r.nextDouble(-1, 1);
            }
            double q1 = 0.5 * x[3 * s] + 0.2;
            double q2 = 0.4 * x[3 * s + 1] - 0.3 * x[3 * s + 2];
            q[3 * s] = q1 + q2 + 0.5;
            q[3 * s + 1] = q1;
            q[3 * s + 2] = q2;
        }
        return new DataSet(Nd4j.create(x, new long[] {N, 3}, DataType.FLOAT),
                Nd4j.create(q, new long[] {N, 3}, DataType.FLOAT));
    }

    /** After training with penalty weight λ: {mean |residual|, mean squared error to the labels}. */
    private static double[] train(double lambda, DataSet data) {
        MultiLayerConfiguration conf = new NeuralNetConfiguration.Builder()
                .dataType(DataType.FLOAT)
                .seed(7)
                .updater(new Adam(0.02))
                .weightInit(WeightInit.XAVIER)
                .trainingWorkspaceMode(WorkspaceMode.ENABLED)
                .inferenceWorkspaceMode(WorkspaceMode.ENABLED)
                .list()
                .layer(new DenseLayer.Builder().nIn(3).nOut(12).activation(Activation.TANH).build())
                .layer(new OutputLayer.Builder(LawPenaltyLoss.of(LawSpec.of(LAW), lambda)).nIn(12).nOut(3)
                        .activation(Activation.IDENTITY).build())
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        for (int e = 0; e < EPOCHS; e++) {
            net.fit(data);
        }
        double[][] y = net.output(data.getFeatures()).castTo(DataType.DOUBLE).toDoubleMatrix();
        double[][] l = data.getLabels().castTo(DataType.DOUBLE).toDoubleMatrix();
        double residual = 0;
        double mse = 0;
        for (int s = 0; s < N; s++) {
            residual += Math.abs(y[s][0] - y[s][1] - y[s][2]);
            for (int j = 0; j < 3; j++) {
                mse += (y[s][j] - l[s][j]) * (y[s][j] - l[s][j]);
            }
        }
        return new double[] {residual / N, mse / (3.0 * N)};
    }

    @Test
    void residualFallsWithLambdaButDoesNotReachZero() {
        DataSet data = data();
        double[] none = train(0.0, data);
        double[] some = train(1.0, data);
        double[] strong = train(30.0, data);
        String summary = "mean |residual| " + none[0] + ", " + some[0] + ", " + strong[0] + "; MSE " + none[1] + ", "
                + some[1] + ", " + strong[1];
        assertTrue(none[0] > some[0] && some[0] > strong[0], "residual must fall as λ grows: " + summary);
        assertTrue(strong[1] > none[1], "a stronger penalty must fit the law-violating labels worse: " + summary);
        // exact enforcement reaches about one float32 rounding unit of the outputs' size (|q| ~ 1 here); the
        // penalty leaves a residual orders of magnitude above that, however large λ is
        double roundingLevel = Math.ulp(1.0f);
        assertTrue(strong[0] > 1000 * roundingLevel, "the penalty must not make the law exact: " + summary);
    }
}
