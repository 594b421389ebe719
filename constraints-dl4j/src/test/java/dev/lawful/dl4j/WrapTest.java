package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.Completion;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.conf.layers.OutputLayer;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.MultiDataSet;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.lossfunctions.LossFunctions;

/**
 * Wrapping an already trained, unconstrained network ({@link LawWrap}): before fine-tuning the wrapped network's free
 * outputs are bit-identical to the trained network's matching outputs in double (in float, within the rounding of a
 * reordered dot product); its outputs satisfy every law within the bound
 * the core documents (constraints-core Completion class documentation, "Exactness"), judged by the law set's own
 * evaluator, while the trained network's outputs violate the laws far above rounding; fine-tuning on data that obeys
 * the laws lowers the loss and keeps the laws; the trained network is never modified. Data are generated from known
 * smooth functions, seeded.
 */
class WrapTest {
    private static final int SAMPLES = 96;
    private static final int PRETRAIN = 60;
    private static final int FINE_TUNE = 60;

    /** y0 = sin(u0 + u1), y1 = u0·u1, then y3 and y2 from {@link TestNets#CONSTANT_AFFINE}'s laws. */
    private static DataSet constantAffineData(DataType type, long seed) {
        double[][] u = TestNets.uniform(new SplittableRandom(seed), SAMPLES, 2, -1, 1);
        double[][] y = new double[SAMPLES][4];
        for (int s = 0; s < SAMPLES; s++) {
            y[s][0] = Math.sin(u[s][0] + u[s][1]);
            y[s][1] = u[s][0] * u[s][1];
            y[s][3] = y[s][0] - 2 * y[s][1];
            y[s][2] = 1 - y[s][0] - y[s][1] - y[s][3];
        }
        return new DataSet(TestNets.array(u, type), TestNets.array(y, type));
    }

    /** a in [0.5, 1.5)², y0 = sin(a0 + a1), y1 = a0·a1, y2 from {@link TestNets#X_AFFINE}'s law. */
    private static MultiDataSet inputAffineData(long seed) {
        double[][] a = TestNets.uniform(new SplittableRandom(seed), SAMPLES, 2, 0.5, 1.5);
        double[][] t = new double[SAMPLES][3];
        for (int s = 0; s < SAMPLES; s++) {
            t[s][0] = Math.sin(a[s][0] + a[s][1]);
            t[s][1] = a[s][0] * a[s][1];
            t[s][2] = (t[s][1] + 1 - a[s][1] * t[s][0]) / (1 + a[s][0] * a[s][0]);
        }
        return new MultiDataSet(TestNets.array(a, DataType.DOUBLE), TestNets.array(t, DataType.DOUBLE));
    }

    /** features(2) → dense(16, tanh) → dense(12, tanh) → output layer(outputs, activation, MSE), initialised. */
    private static MultiLayerNetwork plain(DataType type, int outputs, Activation outActivation, long seed) {
        MultiLayerConfiguration conf = TestNets.base(type, new Adam(2e-2), seed).list()
                .layer(new DenseLayer.Builder().nIn(2).nOut(16).activation(Activation.TANH).build())
                .layer(new DenseLayer.Builder().nIn(16).nOut(12).activation(Activation.TANH).build())
                .layer(new OutputLayer.Builder(LossFunctions.LossFunction.MSE).nIn(12).nOut(outputs)
                        .activation(outActivation).build())
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        return net;
    }

    /** in(2) → "hidden" dense(16, tanh) → "out" output layer(3, identity, MSE), trained on {@code data}. */
    private static ComputationGraph trainedGraph(MultiDataSet data, int inputs, long seed) {
        ComputationGraph g = new ComputationGraph(TestNets.base(DataType.DOUBLE, new Adam(2e-2), seed).graphBuilder()
                .addInputs("in")
                .addLayer("hidden", new DenseLayer.Builder().nIn(inputs).nOut(16).activation(Activation.TANH).build(),
                        "in")
                .addLayer("out", new OutputLayer.Builder(LossFunctions.LossFunction.MSE).nIn(16).nOut(3)
                        .activation(Activation.IDENTITY).build(), "hidden")
                .setOutputs("out")
                .build());
        g.init();
        for (int i = 0; i < PRETRAIN; i++) {
            g.fit(data);
        }
        return g;
    }

    /** @return the largest |C_i| over every law and sample, from the law set's own evaluator */
    private static double largestResidual(Completion c, double[] x, double[] y, int batch) {
        LawEvaluator ev = c.laws().evaluator();
        double[] residual = new double[batch * ev.lawCount()];
        double[] scale = new double[batch * ev.lawCount()];
        double[] jy = new double[batch * ev.outputNonzeros()];
        ev.evaluate(x, y, batch, residual, scale, jy, null);
        double worst = 0;
        for (double r : residual) {
            worst = Math.max(worst, Math.abs(r));
        }
        return worst;
    }

    /**
     * Asserts that the free columns of {@code expectedFull} ({@code [batch, p]}) equal {@code actual} exactly (bit for
     * bit): its free columns when {@code actualIsFull}, else its columns ({@code [batch, f]}, free-output order).
     */
    private static void assertFreeColumnsEqual(Completion c, double[] expectedFull, double[] actual, boolean actualIsFull,
                                               String what) {
        int[] free = c.freeOutputs();
        int p = c.outputWidth();
        int w = actualIsFull ? p : free.length;
        for (int s = 0; s < SAMPLES; s++) {
            for (int k = 0; k < free.length; k++) {
                double expected = expectedFull[s * p + free[k]];
                double got = actual[s * w + (actualIsFull ? free[k] : k)];
                assertEquals(Double.doubleToRawLongBits(expected), Double.doubleToRawLongBits(got),
                        what + ", sample " + s + ", free output " + free[k] + ": " + got + " vs " + expected);
            }
        }
    }

    /** @return {@code [batch, p]} with the free columns of {@code head} ({@code [batch, f]}) in place, NaN elsewhere */
    private static double[] expandFree(Completion c, double[] head) {
        int[] free = c.freeOutputs();
        int p = c.outputWidth();
        double[] full = new double[SAMPLES * p];
        java.util.Arrays.fill(full, Double.NaN);
        for (int s = 0; s < SAMPLES; s++) {
            for (int k = 0; k < free.length; k++) {
                full[s * p + free[k]] = head[s * free.length + k];
            }
        }
        return full;
    }

    private static void checkWrappedLayerNetwork(DataType type, long seed) {
        LawSpec spec = LawSpec.of(TestNets.CONSTANT_AFFINE);
        Completion c = spec.completion();
        DataSet data = constantAffineData(type, seed);
        MultiLayerNetwork trained = plain(type, 4, Activation.IDENTITY, seed);
        for (int i = 0; i < PRETRAIN; i++) {
            trained.fit(data);
        }
        double[] trainedParams = TestNets.flat(trained.params());
        double[] trainedOut = TestNets.flat(trained.output(data.getFeatures()));
        // the unconstrained network misses the laws far above rounding (the bound is about 1e-15 here)
        double trainedResidual = largestResidual(c, null, trainedOut, SAMPLES);
        assertTrue(trainedResidual > 1e-5, "trained network's largest residual " + trainedResidual);

        MultiLayerNetwork wrapped = LawWrap.wrap(trained, spec);
        assertEquals(5, wrapped.getnLayers());
        assertTrue(wrapped.getLayerWiseConfigurations().getConf(3).getLayer() instanceof LawLayer);
        assertEquals(type, wrapped.params().dataType());
        for (int i = 0; i < 2; i++) {
            assertArrayEquals(TestNets.flat(trained.getLayer(i).params()), TestNets.flat(wrapped.getLayer(i).params()),
                    "hidden layer " + i + " keeps its trained parameters");
        }
        INDArray head = wrapped.feedForward(data.getFeatures(), false).get(3);
        assertEquals(c.freeWidth(), head.columns());
        double[] headValues = TestNets.flat(head);
        double[] wrappedOut = TestNets.flat(wrapped.output(data.getFeatures()));
        if (type == DataType.DOUBLE) {
            assertFreeColumnsEqual(c, trainedOut, headValues, false, "head activation");
            assertFreeColumnsEqual(c, trainedOut, wrappedOut, true, "wrapped output");
        } else {
            // float matrix products of width p and of width f may sum in a different order; each is within
            // γ·Σ|h_j W_jk| + |b_k|·u of the exact value, γ = (n+1)·2⁻²⁴ (Higham, "Accuracy and Stability of
            // Numerical Algorithms", 2nd ed., section 3.1, dot products), so they differ by at most twice that
            double[] h = TestNets.flat(trained.feedForward(data.getFeatures(), false).get(2));
            double[] w = TestNets.flat(trained.getLayer(2).getParam("W"));
            double[] b = TestNets.flat(trained.getLayer(2).getParam("b"));
            int n = 12;
            int p = c.outputWidth();
            int[] free = c.freeOutputs();
            for (int s = 0; s < SAMPLES; s++) {
                for (int k = 0; k < free.length; k++) {
                    double magnitude = Math.abs(b[free[k]]);
                    for (int j = 0; j < n; j++) {
                        magnitude += Math.abs(h[s * n + j] * w[j * p + free[k]]);
                    }
                    double bound = 2 * (n + 1) * 0x1p-24 * magnitude;
                    double d = Math.abs(headValues[s * free.length + k] - trainedOut[s * p + free[k]]);
                    assertTrue(d <= bound, "sample " + s + ", free output " + free[k] + ": |difference| " + d
                            + " exceeds the float dot-product bound " + bound);
                }
            }
            // the law layer passes the head's values through unchanged
            assertFreeColumnsEqual(c, expandFree(c, headValues), wrappedOut, true, "wrapped output vs head");
        }
        boolean fromFloat = type == DataType.FLOAT;
        TestNets.assertWithinDocumentedBound(c, null, wrappedOut, SAMPLES, fromFloat);

        double before = wrapped.score(data);
        for (int i = 0; i < FINE_TUNE; i++) {
            wrapped.fit(data);
        }
        double after = wrapped.score(data);
        assertTrue(after < before, "fine-tuning loss " + before + " -> " + after);
        TestNets.assertWithinDocumentedBound(c, null, TestNets.flat(wrapped.output(data.getFeatures())), SAMPLES,
                fromFloat);
        // the trained network is untouched by wrapping and by fine-tuning the wrapped one
        assertArrayEquals(trainedParams, TestNets.flat(trained.params()));
        assertArrayEquals(trainedOut, TestNets.flat(trained.output(data.getFeatures())));
    }

    @Test
    void aWrappedDoubleNetworkKeepsTheFreeOutputsBitForBitAndFineTunesWithinTheDoubleBound() {
        checkWrappedLayerNetwork(DataType.DOUBLE, 41);
    }

    @Test
    void aWrappedFloatNetworkKeepsTheFreeOutputsToTheFloatProductBoundAndFineTunesWithinTheFloatBound() {
        checkWrappedLayerNetwork(DataType.FLOAT, 42);
    }

    @Test
    void aWrappedGraphFeedsTheGraphInputToTheLawVertexAndKeepsTheFreeOutputs() {
        LawSpec spec = LawSpec.of(TestNets.X_AFFINE);
        Completion c = spec.completion();
        MultiDataSet data = inputAffineData(43);
        INDArray x = data.getFeatures(0);
        ComputationGraph trained = trainedGraph(data, 2, 43);
        double[] trainedParams = TestNets.flat(trained.params());
        double[] trainedOut = TestNets.flat(trained.outputSingle(x));
        double[] xs = TestNets.flat(x);
        double trainedResidual = largestResidual(c, xs, trainedOut, SAMPLES);
        assertTrue(trainedResidual > 1e-5, "trained graph's largest residual " + trainedResidual);

        ComputationGraph wrapped = LawWrap.wrap(trained, spec);
        assertTrue(wrapped.getConfiguration().getVertices().get("laws") instanceof LawVertex);
        assertEquals(java.util.List.of("in", "out"), wrapped.getConfiguration().getVertexInputs().get("laws"));
        assertEquals(java.util.List.of("loss"), wrapped.getConfiguration().getNetworkOutputs());
        assertArrayEquals(TestNets.flat(trained.getLayer("hidden").params()),
                TestNets.flat(wrapped.getLayer("hidden").params()));
        assertFreeColumnsEqual(c, trainedOut, TestNets.flat(wrapped.feedForward(x, false).get("out")), false,
                "head activation");
        double[] wrappedOut = TestNets.flat(wrapped.outputSingle(x));
        assertFreeColumnsEqual(c, trainedOut, wrappedOut, true, "wrapped output");
        TestNets.assertWithinDocumentedBound(c, xs, wrappedOut, SAMPLES, false);

        double before = wrapped.score(data);
        for (int i = 0; i < FINE_TUNE; i++) {
            wrapped.fit(data);
        }
        double after = wrapped.score(data);
        assertTrue(after < before, "fine-tuning loss " + before + " -> " + after);
        TestNets.assertWithinDocumentedBound(c, xs, TestNets.flat(wrapped.outputSingle(x)), SAMPLES, false);
        assertArrayEquals(trainedParams, TestNets.flat(trained.params()));
        assertArrayEquals(trainedOut, TestNets.flat(trained.outputSingle(x)));
    }

    @Test
    void aWrappedGraphWithLawsWithoutInputsUsesTheLawLayer() {
        LawSpec spec = LawSpec.of(TestNets.NONLINEAR);
        Completion c = spec.completion();
        double[][] u = TestNets.uniform(new SplittableRandom(44), SAMPLES, 2, -1, 1);
        double[][] t = new double[SAMPLES][3];
        for (int s = 0; s < SAMPLES; s++) {
            t[s][0] = u[s][0] * u[s][1];
            t[s][1] = Math.cos(u[s][0]);
            t[s][2] = Math.sqrt(t[s][0] * t[s][0] + t[s][1] * t[s][1] + 1);
        }
        INDArray x = TestNets.array(u, DataType.DOUBLE);
        MultiDataSet data = new MultiDataSet(x, TestNets.array(t, DataType.DOUBLE));
        ComputationGraph trained = trainedGraph(data, 2, 44);
        double[] trainedOut = TestNets.flat(trained.outputSingle(x));
        assertTrue(largestResidual(c, null, trainedOut, SAMPLES) > 1e-5);
        ComputationGraph wrapped = LawWrap.wrap(trained, spec);
        assertEquals(java.util.List.of("out"), wrapped.getConfiguration().getVertexInputs().get("laws"));
        double[] wrappedOut = TestNets.flat(wrapped.outputSingle(x));
        assertFreeColumnsEqual(c, trainedOut, wrappedOut, true, "wrapped output");
        TestNets.assertWithinDocumentedBound(c, null, wrappedOut, SAMPLES, false);
    }

    @Test
    void wrappedNetworksSaveAndReloadBitIdentically() throws java.io.IOException {
        DataSet data = constantAffineData(DataType.DOUBLE, 50);
        MultiLayerNetwork trained = plain(DataType.DOUBLE, 4, Activation.IDENTITY, 50);
        trained.fit(data);
        MultiLayerNetwork wrapped = LawWrap.wrap(trained, LawSpec.of(TestNets.CONSTANT_AFFINE));
        wrapped.fit(data);
        java.io.ByteArrayOutputStream bytes = new java.io.ByteArrayOutputStream();
        org.deeplearning4j.util.ModelSerializer.writeModel(wrapped, bytes, true);
        MultiLayerNetwork reloaded = org.deeplearning4j.util.ModelSerializer.restoreMultiLayerNetwork(
                new java.io.ByteArrayInputStream(bytes.toByteArray()), true);
        assertEquals(wrapped.getLayerWiseConfigurations(), reloaded.getLayerWiseConfigurations());
        assertArrayEquals(TestNets.flat(wrapped.output(data.getFeatures())),
                TestNets.flat(reloaded.output(data.getFeatures())));

        MultiDataSet graphData = inputAffineData(51);
        ComputationGraph wrappedGraph = LawWrap.wrap(trainedGraph(graphData, 2, 51), LawSpec.of(TestNets.X_AFFINE));
        bytes.reset();
        org.deeplearning4j.util.ModelSerializer.writeModel(wrappedGraph, bytes, true);
        ComputationGraph reloadedGraph = org.deeplearning4j.util.ModelSerializer.restoreComputationGraph(
                new java.io.ByteArrayInputStream(bytes.toByteArray()), true);
        INDArray x = graphData.getFeatures(0);
        assertArrayEquals(TestNets.flat(wrappedGraph.outputSingle(x)), TestNets.flat(reloadedGraph.outputSingle(x)));
    }

    @Test
    void aWrappedNetworkWhoseLawsDeclareLimitsKeepsEveryOutputInsideThemAndFineTunes() {
        // y[2] of this data reaches below 0.2 on some rows; the limit keeps every output of the wrapped network at or
        // above it, in the wrapped network as trained and after fine-tuning through the limit
        LawSpec spec = LawSpec.of(TestNets.CONSTANT_AFFINE + "limit floor: y[2] >= 0.2\n");
        DataSet data = constantAffineData(DataType.DOUBLE, 61);
        MultiLayerNetwork trained = plain(DataType.DOUBLE, 4, Activation.IDENTITY, 61);
        for (int i = 0; i < PRETRAIN; i++) {
            trained.fit(data);
        }
        MultiLayerNetwork wrapped = LawWrap.wrap(trained, spec);
        double before = wrapped.score(data);
        int on = 0;
        for (int round = 0; round < 2; round++) {
            double[] y = TestNets.flat(wrapped.output(data.getFeatures()));
            for (int s = 0; s < SAMPLES; s++) {
                assertTrue(y[s * 4 + 2] >= 0.2, "round " + round + ", row " + s + ": y[2] = " + y[s * 4 + 2]);
                on += y[s * 4 + 2] <= 0.2 + 1e-9 ? 1 : 0;
            }
            for (int i = 0; round == 0 && i < FINE_TUNE; i++) {
                wrapped.fit(data);
            }
        }
        assertTrue(on > 0, "no row touched the limit, so this test shows nothing");
        assertTrue(wrapped.score(data) < before, "fine-tuning did not lower the loss");
    }

    @Test
    void lawsWithInputsInAMultiLayerNetworkAreRefusedPointingToTheGraph() {
        MultiLayerNetwork net = plain(DataType.DOUBLE, 3, Activation.IDENTITY, 45);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawWrap.wrap(net, LawSpec.of(TestNets.X_AFFINE)));
        assertEquals("cannot wrap a MultiLayerNetwork: the law set declares 2 input elements (a[0], a[1]), but a"
                + " layer in a MultiLayerNetwork sees only the previous layer's activations; build the trained network"
                + " as a ComputationGraph (input -> ... -> output layer, the input being the law inputs) and wrap it"
                + " with LawWrap.wrap(ComputationGraph, LawSpec), whose law vertex receives the graph's input",
                e.getMessage());
    }

    @Test
    void anOutputWidthThatIsNotTheLawOutputsIsRefused() {
        MultiLayerNetwork net = plain(DataType.DOUBLE, 5, Activation.IDENTITY, 46);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawWrap.wrap(net, LawSpec.of(TestNets.CONSTANT_AFFINE)));
        assertEquals("cannot wrap: the trained network's output layer (layer 2) has 5 outputs but the law set"
                + " declares 4 (y[0], y[1], y[2], y[3]); the output layer must predict every output of the law set,"
                + " in declared order", e.getMessage());
    }

    @Test
    void aNonlinearOutputLayerIsRefused() {
        MultiLayerNetwork net = plain(DataType.DOUBLE, 4, Activation.TANH, 47);
        double[] params = TestNets.flat(net.params());
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawWrap.wrap(net, LawSpec.of(TestNets.CONSTANT_AFFINE)));
        assertEquals("cannot wrap: the trained network's output layer (layer 2) has activation tanh; its columns"
                + " W[:, free], b[free] predict the free outputs by themselves only when the layer is linear, so it"
                + " must use Activation.IDENTITY (put a nonlinear activation in a hidden layer, or retrain the output"
                + " layer with identity)", e.getMessage());
        assertArrayEquals(params, TestNets.flat(net.params()));
    }

    @Test
    void anOutputLayerWithoutWeightsIsRefused() {
        MultiLayerNetwork net = new MultiLayerNetwork(TestNets.base(DataType.DOUBLE, new Adam(1e-2), 48).list()
                .layer(new DenseLayer.Builder().nIn(2).nOut(4).activation(Activation.IDENTITY).build())
                .layer(new LossLayer.Builder(LossFunctions.LossFunction.MSE).activation(Activation.IDENTITY).build())
                .build());
        net.init();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawWrap.wrap(net, LawSpec.of(TestNets.CONSTANT_AFFINE)));
        assertEquals("cannot wrap: the trained network's output layer (layer 1) is a LossLayer; it must be a"
                + " DenseLayer or OutputLayer holding weights W [nIn x p] and bias b [p]", e.getMessage());
    }

    @Test
    void aGraphWhoseInputIsNotTheLawInputsIsRefused() {
        ComputationGraph g = new ComputationGraph(TestNets.base(DataType.DOUBLE, new Adam(1e-2), 49).graphBuilder()
                .addInputs("in")
                .addLayer("hidden", new DenseLayer.Builder().nIn(5).nOut(8).activation(Activation.TANH).build(), "in")
                .addLayer("out", new OutputLayer.Builder(LossFunctions.LossFunction.MSE).nIn(8).nOut(3)
                        .activation(Activation.IDENTITY).build(), "hidden")
                .setOutputs("out")
                .build());
        g.init();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawWrap.wrap(g, LawSpec.of(TestNets.X_AFFINE)));
        assertEquals("cannot wrap: the trained graph's input 'in' has 5 columns (nIn of 'hidden') but the law set"
                + " declares 2 input elements (a[0], a[1]); the law vertex receives the graph's input, so it must be"
                + " the law inputs in declared order", e.getMessage());
    }
}
