package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.BoundCheck;
import dev.lawful.enforce.Completion;
import java.util.List;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.Adam;

/**
 * Training passes skip the final bound check ({@link BoundCheck#SKIP}) unless the spec certifies while training;
 * inference always certifies, and an uncertified training solution is never reused for an inference pass.
 */
class TrainingCheckTest extends DoublePrecisionTest {
    /**
     * Both completed outputs are small differences of large free outputs, so the constant-affine fold cancels and
     * its rounding is often above the documented bound of law {@code a}: there the certified call refines.
     */
    private static final String CANCELLING = "output y[4]\n"
            + "law a: 1.3*y[0] - 1.7*y[1] = 0\n"
            + "law b: y[0] + y[1] = y[2] - y[3]\n"
            + "complete y[0], y[1]\n";

    private static MultiLayerNetwork lawOnly(LawSpec spec) {
        MultiLayerConfiguration conf = TestNets.base(DataType.DOUBLE, new Adam(1e-3), 3).list()
                .layer(new LawLayer(spec))
                .setInputType(InputType.feedForward(2))
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        return net;
    }

    private static double[] last(List<INDArray> activations) {
        return TestNets.flat(activations.get(activations.size() - 1));
    }

    @Test
    void trainingSkipsTheCheckAndInferenceCertifies() {
        LawSpec spec = LawSpec.of(CANCELLING);
        Completion c = spec.completion();
        int batch = 200;
        SplittableRandom r = new SplittableRandom(11);
        double[][] rows = new double[batch][2];
        for (double[] row : rows) {
            row[1] = 1000 * (1 + r.nextDouble());
            row[0] = row[1] + r.nextDouble(-1e-3, 1e-3);
        }
        double[] z = new double[batch * 2];
        for (int s = 0; s < batch; s++) {
            z[s * 2] = rows[s][0];
            z[s * 2 + 1] = rows[s][1];
        }
        double[] certified = new double[batch * 4];
        double[] skipped = new double[batch * 4];
        c.forward(null, z, batch, certified, null, c.newWorkspace(), BoundCheck.EVERY_SAMPLE);
        c.forward(null, z, batch, skipped, null, c.newWorkspace(), BoundCheck.SKIP);
        assertFalse(java.util.Arrays.equals(certified, skipped), "the data must make the certified call refine");
        // Source: constraints-core Completion class documentation, "Exactness" (re-implemented in TestNets)
        TestNets.assertWithinDocumentedBound(c, null, certified, batch, false);

        INDArray in = TestNets.array(rows, DataType.DOUBLE);
        MultiLayerNetwork net = lawOnly(spec);
        assertArrayEquals(skipped, last(net.feedForward(in, true)), 0.0, "a training pass is not certified");
        // the same input right after: the cached training solution must not answer an inference pass
        assertArrayEquals(certified, last(net.feedForward(in, false)), 0.0, "inference certifies");
        assertArrayEquals(certified, TestNets.flat(net.output(in)), 0.0);
        // a certified solution may answer a training pass
        assertArrayEquals(certified, last(net.feedForward(in, true)), 0.0);

        LawSpec strict = LawSpec.of(CANCELLING);
        strict.setCertifyWhileTraining(true);
        assertEquals(BoundCheck.EVERY_SAMPLE, strict.check(true));
        assertEquals(BoundCheck.SKIP, spec.check(true));
        assertEquals(BoundCheck.EVERY_SAMPLE, spec.check(false));
        assertArrayEquals(certified, last(lawOnly(strict).feedForward(in, true)), 0.0,
                "certifyWhileTraining makes training passes certify too");
    }

    @Test
    void reusedBuffersNeverMixUpInputs() {
        // the layer converts and solves into buffers kept from earlier calls: alternating inputs, training and
        // inference passes and two batch sizes must each give what the core gives for that input alone
        LawSpec spec = LawSpec.of(CANCELLING);
        Completion c = spec.completion();
        MultiLayerNetwork net = lawOnly(spec);
        SplittableRandom r = new SplittableRandom(5);
        double[][][] inputs = {TestNets.uniform(r, 30, 2, -5, 5), TestNets.uniform(r, 30, 2, -5, 5),
            TestNets.uniform(r, 7, 2, -5, 5)};
        int[] order = {0, 1, 0, 2, 1, 1, 0, 2, 2, 0};
        for (int k = 0; k < order.length; k++) {
            double[][] rows = inputs[order[k]];
            double[] z = new double[rows.length * 2];
            for (int s = 0; s < rows.length; s++) {
                z[2 * s] = rows[s][0];
                z[2 * s + 1] = rows[s][1];
            }
            boolean training = k % 3 == 1;
            double[] expected = new double[rows.length * 4];
            c.forward(null, z, rows.length, expected, null, c.newWorkspace(), spec.check(training));
            assertArrayEquals(expected, last(net.feedForward(TestNets.array(rows, DataType.DOUBLE), training)), 0.0,
                    "call " + k + " (input " + order[k] + ", training " + training + ")");
        }
    }

    @Test
    void theVertexReusesItsBuffersWithoutMixingUpInputsOrGradients() {
        // the law vertex of a ConstrainedGraph keeps its conversion, solution and gradient buffers too: each call on
        // a network with a history must give what a fresh copy of the network (no history) gives for that input
        ComputationGraph net = ConstrainedGraph.builder(LawSpec.of(TestNets.X_AFFINE)).hidden(8).seed(3)
                .dataType(DataType.DOUBLE).build();
        SplittableRandom r = new SplittableRandom(9);
        INDArray[] inputs = {TestNets.array(TestNets.uniform(r, 20, 2, 0.5, 1.5), DataType.DOUBLE),
            TestNets.array(TestNets.uniform(r, 20, 2, 0.5, 1.5), DataType.DOUBLE),
            TestNets.array(TestNets.uniform(r, 6, 2, 0.5, 1.5), DataType.DOUBLE)};
        INDArray labels = TestNets.array(TestNets.uniform(r, 20, 3, -1, 1), DataType.DOUBLE);
        int[] order = {0, 1, 0, 2, 1, 0, 2, 2};
        for (int k = 0; k < order.length; k++) {
            INDArray in = inputs[order[k]];
            ComputationGraph fresh = net.clone();
            boolean training = k % 2 == 1;
            INDArray expected = fresh.feedForward(new INDArray[] {in}, training).get(ConstrainedGraph.LAWS);
            INDArray actual = net.feedForward(new INDArray[] {in}, training).get(ConstrainedGraph.LAWS);
            assertArrayEquals(TestNets.flat(expected), TestNets.flat(actual), 0.0, "call " + k);
            if (order[k] != 2) {
                // gradients too: one gradient computation on each, compared parameter by parameter
                fresh.setInputs(in);
                fresh.setLabels(labels);
                fresh.computeGradientAndScore();
                net.setInputs(in);
                net.setLabels(labels);
                net.computeGradientAndScore();
                assertArrayEquals(TestNets.flat(fresh.gradient().gradient()), TestNets.flat(net.gradient().gradient()),
                        0.0, "gradient at call " + k);
            }
        }
    }

    @Test
    void theChoiceTravelsWithTheConfiguration() {
        LawSpec strict = LawSpec.of(CANCELLING);
        strict.setCertifyWhileTraining(true);
        MultiLayerNetwork net = lawOnly(strict);
        MultiLayerConfiguration back = MultiLayerConfiguration.fromJson(net.getLayerWiseConfigurations().toJson());
        LawLayer layer = (LawLayer) back.getConf(0).getLayer();
        assertTrue(layer.getSpec().isCertifyWhileTraining());
        assertEquals(strict, layer.getSpec());
        LawSpec plain = LawSpec.of(CANCELLING);
        assertFalse(plain.equals(strict), "the choice is part of the spec's identity");
        assertFalse(new LawLayer(plain).getSpec().isCertifyWhileTraining());
        assertTrue(new LawLayer(strict).getSpec().isCertifyWhileTraining(), "the layer's copy keeps the choice");
    }
}
