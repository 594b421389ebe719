package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Completion;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.MultiDataSet;
import org.nd4j.linalg.learning.config.Adam;

/**
 * End-to-end training on small synthetic problems (targets generated from known smooth functions, seeded, that obey
 * the laws): the loss falls, and afterwards every sample's outputs satisfy every law within the bound the core
 * documents (float networks: the float bound; double networks: the double bound), judged by the law set's own
 * evaluator on the network's outputs.
 */
class TrainingTest {
    private static final int SAMPLES = 128;
    private static final int STEPS = 150;

    /** y0 = sin(u0 + u1), y1 = u0·u1, then y3 and y2 from the constant-affine laws. */
    private static double[][] constantAffineTargets(double[][] u) {
        double[][] y = new double[u.length][4];
        for (int s = 0; s < u.length; s++) {
            y[s][0] = Math.sin(u[s][0] + u[s][1]);
            y[s][1] = u[s][0] * u[s][1];
            y[s][3] = y[s][0] - 2 * y[s][1];
            y[s][2] = 1 - y[s][0] - y[s][1] - y[s][3];
        }
        return y;
    }

    @Test
    void aFloatLayerNetworkLearnsAndEveryOutputObeysTheLawsToTheFloatBound() {
        LawLayer layer = LawLayer.of(TestNets.CONSTANT_AFFINE);
        Completion c = layer.lawCompletion();
        MultiLayerNetwork net = TestNets.mln(layer, 2, 16, c.freeWidth(), DataType.FLOAT, new Adam(2e-2), 21);
        double[][] u = TestNets.uniform(new SplittableRandom(21), SAMPLES, 2, -1, 1);
        DataSet data = new DataSet(TestNets.array(u, DataType.FLOAT),
                TestNets.array(constantAffineTargets(u), DataType.FLOAT));
        double before = net.score(data);
        for (int i = 0; i < STEPS; i++) {
            net.fit(data);
        }
        double after = net.score(data);
        assertTrue(after < before / 20, "loss " + before + " -> " + after);
        double[] y = TestNets.flat(net.output(data.getFeatures()));
        TestNets.assertWithinDocumentedBound(c, null, y, SAMPLES, true);
    }

    @Test
    void aDoubleLayerNetworkWithNonlinearLawsObeysThemToTheDoubleBound() {
        LawLayer layer = LawLayer.of(TestNets.NONLINEAR);
        Completion c = layer.lawCompletion();
        MultiLayerNetwork net = TestNets.mln(layer, 2, 16, c.freeWidth(), DataType.DOUBLE, new Adam(2e-2), 22);
        double[][] u = TestNets.uniform(new SplittableRandom(22), SAMPLES, 2, -1, 1);
        double[][] t = new double[SAMPLES][3];
        for (int s = 0; s < SAMPLES; s++) {
            t[s][0] = u[s][0] * u[s][1];
            t[s][1] = Math.cos(u[s][0]);
            t[s][2] = Math.sqrt(t[s][0] * t[s][0] + t[s][1] * t[s][1] + 1);
        }
        DataSet data = new DataSet(TestNets.array(u, DataType.DOUBLE), TestNets.array(t, DataType.DOUBLE));
        double before = net.score(data);
        for (int i = 0; i < STEPS; i++) {
            net.fit(data);
        }
        double after = net.score(data);
        assertTrue(after < before / 20, "loss " + before + " -> " + after);
        double[] y = TestNets.flat(net.output(data.getFeatures()));
        TestNets.assertWithinDocumentedBound(c, null, y, SAMPLES, false);
        for (int s = 0; s < SAMPLES; s++) {
            assertTrue(y[s * 3 + 2] > 0, "the guess picks the positive root");
        }
    }

    @Test
    void aFloatConstrainedGraphWithInputDependentCoefficientsObeysTheLawsToTheFloatBound() {
        LawSpec spec = LawSpec.of(TestNets.X_AFFINE);
        Completion c = spec.completion();
        ComputationGraph g = ConstrainedGraph.builder(spec).hidden(16).updater(new Adam(2e-2)).seed(23).build();
        double[][] a = TestNets.uniform(new SplittableRandom(23), SAMPLES, 2, 0.5, 1.5);
        double[][] t = new double[SAMPLES][3];
        for (int s = 0; s < SAMPLES; s++) {
            t[s][0] = Math.sin(a[s][0] + a[s][1]);
            t[s][1] = a[s][0] * a[s][1];
            t[s][2] = (t[s][1] + 1 - a[s][1] * t[s][0]) / (1 + a[s][0] * a[s][0]);
        }
        INDArray x = TestNets.array(a, DataType.FLOAT);
        MultiDataSet data = new MultiDataSet(x, TestNets.array(t, DataType.FLOAT));
        double before = g.score(data);
        for (int i = 0; i < STEPS; i++) {
            g.fit(data);
        }
        double after = g.score(data);
        assertTrue(after < before / 20, "loss " + before + " -> " + after);
        double[] y = TestNets.flat(g.outputSingle(x));
        // the laws are judged at the inputs the network saw (float values, widened exactly)
        TestNets.assertWithinDocumentedBound(c, TestNets.flat(x), y, SAMPLES, true);
    }
}
