package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.OnBadSample;
import java.io.File;
import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.lossfunctions.LossFunctions;

/**
 * The deployment path without Deeplearning4j: a host takes the head's outputs (the activations just before the law
 * layer or vertex) and runs {@link Completion#forward} from the network's own laws (read from the network, from the
 * saved file's configuration, or rebuilt with the core alone from the law text read back). What is compared: the
 * core's outputs against the network's {@code output()}, bit for bit; for float networks the core's double result
 * rounded to float, as the network rounds it.
 */
class DeploymentPathTest {
    @TempDir
    Path dir;

    private static MultiLayerNetwork trainedLayerNet(String laws, DataType type, long seed) {
        LawLayer layer = LawLayer.of(laws);
        Completion c = layer.lawCompletion();
        MultiLayerNetwork net = TestNets.mln(layer, 3, 16, c.freeWidth(), type, new Adam(1e-2), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 32, 3, -1, 1), type);
        INDArray labels = TestNets.array(TestNets.uniform(r, 32, c.outputWidth(), -1, 1), type);
        for (int i = 0; i < 3; i++) {
            net.fit(in, labels);
        }
        return net;
    }

    private static ComputationGraph trainedGraph(String laws, DataType type, long seed) {
        LawSpec spec = LawSpec.of(laws);
        Completion c = spec.completion();
        ComputationGraph g = ConstrainedGraph.builder(spec).hidden(16).dataType(type).seed(seed).build();
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 32, c.inputWidth(), 0.5, 1.5), type);
        INDArray labels = TestNets.array(TestNets.uniform(r, 32, c.outputWidth(), -1, 1), type);
        for (int i = 0; i < 3; i++) {
            g.fit(new INDArray[] {in}, new INDArray[] {labels});
        }
        return g;
    }

    /** What the host does: the core's forward pass on plain double arrays, with its own workspace. */
    private static double[] hostForward(Completion c, double[] x, double[] z, int batch) {
        double[] y = new double[batch * c.outputWidth()];
        c.forward(x, z, batch, y, null, c.newWorkspace());
        return y;
    }

    /** A core-only host: the completion rebuilt from the law text, completed outputs and policy read back. */
    private static Completion coreOnly(LawSpec read) {
        Completion.Builder b = Completion.builder(LawSet.parse(read.getSourceName(), read.getLawText()))
                .onBadSample(read.isMaskBadSamples() ? OnBadSample.MASK : OnBadSample.THROW);
        if (read.getCompleted() != null) {
            b.complete(read.getCompleted());
        }
        return b.build();
    }

    /** Asserts the network's outputs equal the core's, bit for bit (after rounding to float for float networks). */
    private static void assertSameBits(double[] core, INDArray network, DataType type) {
        double[] net = TestNets.flat(network);
        assertEquals(core.length, net.length);
        long[] want = new long[core.length];
        long[] got = new long[core.length];
        for (int i = 0; i < core.length; i++) {
            double expected = type == DataType.FLOAT ? (double) (float) core[i] : core[i];
            want[i] = Double.doubleToRawLongBits(expected);
            got[i] = Double.doubleToRawLongBits(net[i]);
        }
        assertArrayEquals(want, got, "the network's outputs differ from the core's");
    }

    private void checkLayerNet(String laws, DataType type, long seed) throws IOException {
        MultiLayerNetwork net = trainedLayerNet(laws, type, seed);
        INDArray features = TestNets.array(TestNets.uniform(new SplittableRandom(seed + 1), 40, 3, -2, 2), type);
        int k = LawDeployment.lawLayerIndex(net);
        assertEquals(2, k);
        // the head's outputs: the input of layer k, two ways
        INDArray head = net.feedForward(features, false).get(k);
        INDArray selected = net.activateSelectedLayers(0, k - 1, features);
        assertArrayEquals(TestNets.flat(head), TestNets.flat(selected), 0.0);
        double[] z = TestNets.flat(head);
        int batch = (int) features.size(0);
        INDArray out = net.output(features);

        LawSpec fromNet = LawDeployment.spec(net);
        assertEquals(LawSpec.of(laws), fromNet);
        assertSameBits(hostForward(fromNet.completion(), null, z, batch), out, type);

        File file = dir.resolve("layer-" + seed + ".zip").toFile();
        ModelSerializer.writeModel(net, file, false);
        LawSpec fromFile = LawDeployment.spec(file);
        assertEquals(fromNet, fromFile);
        assertSameBits(hostForward(coreOnly(fromFile), null, z, batch), out, type);
    }

    private void checkGraph(String laws, DataType type, long seed) throws IOException {
        ComputationGraph g = trainedGraph(laws, type, seed);
        int n = LawSpec.of(laws).completion().inputWidth();
        INDArray features = TestNets.array(TestNets.uniform(new SplittableRandom(seed + 1), 40, n, 0.5, 1.5), type);
        Map<String, INDArray> acts = g.feedForward(new INDArray[] {features}, false);
        double[] z = TestNets.flat(acts.get(ConstrainedGraph.HEAD));
        double[] x = TestNets.flat(features);
        int batch = (int) features.size(0);
        INDArray out = g.outputSingle(features);

        LawSpec fromNet = LawDeployment.spec(g);
        assertEquals(LawSpec.of(laws), fromNet);
        assertEquals(Map.of(ConstrainedGraph.LAWS, fromNet), LawDeployment.specs(g.getConfiguration()));
        assertSameBits(hostForward(fromNet.completion(), x, z, batch), out, type);

        File file = dir.resolve("graph-" + seed + ".zip").toFile();
        ModelSerializer.writeModel(g, file, false);
        LawSpec fromFile = LawDeployment.spec(file);
        assertEquals(fromNet, fromFile);
        assertSameBits(hostForward(coreOnly(fromFile), x, z, batch), out, type);
    }

    @Test
    void aDoubleLayerNetworkRunsOnTheCoreBitForBit() throws IOException {
        checkLayerNet(TestNets.CONSTANT_AFFINE, DataType.DOUBLE, 51);
        checkLayerNet(TestNets.AFFINE_FREE, DataType.DOUBLE, 52);
        checkLayerNet(TestNets.NONLINEAR, DataType.DOUBLE, 53);
    }

    @Test
    void aFloatLayerNetworkRunsOnTheCoreBitForBitAfterRounding() throws IOException {
        checkLayerNet(TestNets.CONSTANT_AFFINE, DataType.FLOAT, 61);
        checkLayerNet(TestNets.AFFINE_FREE, DataType.FLOAT, 62);
        checkLayerNet(TestNets.NONLINEAR, DataType.FLOAT, 63);
    }

    @Test
    void aDoubleGraphRunsOnTheCoreBitForBit() throws IOException {
        checkGraph(TestNets.X_CONSTANT_AFFINE, DataType.DOUBLE, 71);
        checkGraph(TestNets.X_AFFINE, DataType.DOUBLE, 72);
        checkGraph(TestNets.X_NONLINEAR, DataType.DOUBLE, 73);
    }

    @Test
    void aFloatGraphRunsOnTheCoreBitForBitAfterRounding() throws IOException {
        checkGraph(TestNets.X_CONSTANT_AFFINE, DataType.FLOAT, 81);
        checkGraph(TestNets.X_AFFINE, DataType.FLOAT, 82);
        checkGraph(TestNets.X_NONLINEAR, DataType.FLOAT, 83);
    }

    @Test
    void theCompletedOutputsAndPolicyTravelWithTheSpec() throws IOException {
        LawSpec spec = LawSpec.of(TestNets.CONSTANT_AFFINE);
        spec.setCompleted(new String[] {"y[0]", "y[1]"});
        spec.setMaskBadSamples(true);
        spec.setSourceName("junction.law");
        MultiLayerNetwork net = TestNets.mln(new LawLayer(spec), 3, 8, 2, DataType.DOUBLE, new Adam(1e-2), 91);
        File file = dir.resolve("chosen.zip").toFile();
        ModelSerializer.writeModel(net, file, false);
        LawSpec read = LawDeployment.spec(file);
        assertEquals(spec, read);
        Completion c = coreOnly(read);
        assertEquals(List.of("y[0]", "y[1]"), c.completedNames());
        assertEquals(OnBadSample.MASK, c.onBadSample());
        INDArray features = TestNets.array(TestNets.uniform(new SplittableRandom(92), 10, 3, -1, 1), DataType.DOUBLE);
        double[] z = TestNets.flat(net.feedForward(features, false).get(LawDeployment.lawLayerIndex(net)));
        assertSameBits(hostForward(c, null, z, 10), net.output(features), DataType.DOUBLE);
    }

    @Test
    void aReturnedSpecIsACopy() {
        MultiLayerNetwork net = trainedLayerNet(TestNets.CONSTANT_AFFINE, DataType.DOUBLE, 93);
        LawSpec a = LawDeployment.spec(net);
        a.setSourceName("changed");
        LawSpec b = LawDeployment.spec(net);
        assertNotSame(a, b);
        assertEquals("<network>", b.getSourceName());
    }

    @Test
    void aNetworkWithoutLawsSaysWhatToDo() throws IOException {
        MultiLayerConfiguration conf = TestNets.base(DataType.DOUBLE, new Adam(1e-2), 95).list()
                .layer(new DenseLayer.Builder().nIn(3).nOut(4).activation(Activation.TANH).build())
                .layer(new LossLayer.Builder(LossFunctions.LossFunction.MSE).activation(Activation.IDENTITY).build())
                .build();
        MultiLayerNetwork plain = new MultiLayerNetwork(conf);
        plain.init();
        assertTrue(LawDeployment.specs(conf).isEmpty());
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> LawDeployment.spec(plain));
        assertEquals("the network has no law layer or law vertex, so there are no laws to deploy; build it with"
                + " LawLayer, LawVertex or ConstrainedGraph", e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> LawDeployment.lawLayerIndex(plain));
        File file = dir.resolve("plain.zip").toFile();
        ModelSerializer.writeModel(plain, file, false);
        IllegalArgumentException f = assertThrows(IllegalArgumentException.class, () -> LawDeployment.spec(file));
        assertTrue(f.getMessage().startsWith("the network saved in " + file + " has no law layer"), f.getMessage());
    }
}
