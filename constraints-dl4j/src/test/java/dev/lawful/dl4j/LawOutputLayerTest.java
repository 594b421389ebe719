package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Tier;
import java.io.File;
import java.io.IOException;
import java.nio.file.Path;
import java.util.SplittableRandom;
import org.deeplearning4j.gradientcheck.GradientCheckUtil;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.gradient.DefaultGradient;
import org.deeplearning4j.nn.gradient.Gradient;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.learning.config.IUpdater;
import org.nd4j.linalg.learning.config.NoOp;
import org.nd4j.linalg.lossfunctions.impl.LossL1;
import org.nd4j.linalg.lossfunctions.impl.LossMSE;

/**
 * The law output layer (completion and loss in one parameter-free output layer): Deeplearning4j's own gradient
 * checker in double with workspaces ENABLED, a deliberately wrong backward pass that the checker rejects, the same
 * score and gradients as a law layer followed by an MSE loss layer, training to the core's documented bound, and a
 * bit-identical ModelSerializer round trip.
 */
class LawOutputLayerTest extends DoublePrecisionTest {
    @TempDir
    Path dir;

    /** features → dense(hidden, tanh) → head(free outputs, identity) → law output layer. */
    private static MultiLayerNetwork net(LawOutputLayer out, int features, int hidden, DataType type,
                                         IUpdater updater, long seed) {
        MultiLayerConfiguration conf = TestNets.base(type, updater, seed).list()
                .layer(new DenseLayer.Builder().nIn(features).nOut(hidden).activation(Activation.TANH).build())
                .layer(new DenseLayer.Builder().nIn(hidden).nOut(out.lawCompletion().freeWidth())
                        .activation(Activation.IDENTITY).build())
                .layer(out)
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        return net;
    }

    private static boolean check(LawOutputLayer out, long seed) {
        Completion c = out.lawCompletion();
        MultiLayerNetwork net = net(out, 3, 5, DataType.DOUBLE, new NoOp(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 6, 3, -1, 1), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 6, c.outputWidth(), -1, 1), DataType.DOUBLE);
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.MLNConfig().net(net).input(in).labels(labels)
                .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    @Test
    void constantAffineLawsPassTheGradientCheck() {
        LawOutputLayer out = LawOutputLayer.of(TestNets.CONSTANT_AFFINE);
        assertEquals(Tier.CONSTANT_AFFINE, out.lawCompletion().tier());
        assertTrue(check(out, 31));
    }

    @Test
    void nonlinearLawsPassTheGradientCheck() {
        LawOutputLayer out = LawOutputLayer.of(TestNets.NONLINEAR);
        assertEquals(Tier.NONLINEAR, out.lawCompletion().tier());
        assertTrue(check(out, 32));
    }

    @Test
    void aNonDefaultLossAndANormalisedLayerPassTheGradientCheck() {
        assertTrue(check(LawOutputLayer.of(TestNets.AFFINE_FREE).withLoss(new LossL1()), 33));
        LawOutputLayer plain = LawOutputLayer.of(TestNets.CONSTANT_AFFINE);
        LawOutputLayer normalised = plain.normalizedWith(
                NormalizedGradientTest.fitted(true, plain.lawCompletion(), 3, 34));
        assertTrue(normalised.getOutputScaling() != null);
        assertTrue(check(normalised, 34));
    }

    @Test
    void aBackwardPassWithoutTheImplicitFunctionCorrectionFailsTheCheck() {
        assertFalse(check(new DroppedCorrection(LawSpec.of(TestNets.CONSTANT_AFFINE)), 31));
        assertFalse(check(new DroppedCorrection(LawSpec.of(TestNets.NONLINEAR)), 32));
    }

    @Test
    void scoreAndGradientsEqualALawLayerFollowedByAnMseLossLayer() {
        for (DataType type : new DataType[] {DataType.DOUBLE, DataType.FLOAT}) {
            for (String laws : new String[] {TestNets.CONSTANT_AFFINE, TestNets.NONLINEAR}) {
                Completion c = LawSpec.of(laws).completion();
                MultiLayerNetwork one = net(LawOutputLayer.of(laws), 3, 6, type, new NoOp(), 41);
                MultiLayerNetwork two = TestNets.mln(LawLayer.of(laws), 3, 6, c.freeWidth(), type, new NoOp(), 41);
                two.setParams(one.params().dup());
                assertArrayEquals(TestNets.flat(one.params()), TestNets.flat(two.params()));
                SplittableRandom r = new SplittableRandom(41);
                DataSet data = new DataSet(TestNets.array(TestNets.uniform(r, 10, 3, -1, 1), type),
                        TestNets.array(TestNets.uniform(r, 10, c.outputWidth(), -1, 1), type));
                double a = one.score(data);
                double b = two.score(data);
                assertTrue(Math.abs(a - b) <= Math.ulp(b), type + ": score " + a + " vs " + b);
                assertArrayEquals(TestNets.flat(two.output(data.getFeatures())),
                        TestNets.flat(one.output(data.getFeatures())));
                assertArrayEquals(TestNets.flat(two.scoreExamples(data, false)),
                        TestNets.flat(one.scoreExamples(data, false)));
                one.setInput(data.getFeatures());
                one.setLabels(data.getLabels());
                one.computeGradientAndScore();
                two.setInput(data.getFeatures());
                two.setLabels(data.getLabels());
                two.computeGradientAndScore();
                assertArrayEquals(TestNets.flat(two.gradient().gradient()), TestNets.flat(one.gradient().gradient()),
                        type + " gradients");
                assertTrue(Math.abs(one.score() - two.score()) <= Math.ulp(two.score()));
            }
        }
    }

    @Test
    void aFloatNetworkLearnsAndEveryOutputObeysTheLawsToTheFloatBound() {
        LawOutputLayer out = LawOutputLayer.of(TestNets.CONSTANT_AFFINE);
        Completion c = out.lawCompletion();
        MultiLayerNetwork net = net(out, 2, 16, DataType.FLOAT, new Adam(2e-2), 21);
        int samples = 128;
        double[][] u = TestNets.uniform(new SplittableRandom(21), samples, 2, -1, 1);
        double[][] t = new double[samples][4];
        for (int s = 0; s < samples; s++) {
            t[s][0] = Math.sin(u[s][0] + u[s][1]);
            t[s][1] = u[s][0] * u[s][1];
            t[s][3] = t[s][0] - 2 * t[s][1];
            t[s][2] = 1 - t[s][0] - t[s][1] - t[s][3];
        }
        DataSet data = new DataSet(TestNets.array(u, DataType.FLOAT), TestNets.array(t, DataType.FLOAT));
        double before = net.score(data);
        for (int i = 0; i < 150; i++) {
            net.fit(data);
        }
        double after = net.score(data);
        assertTrue(after < before / 20, "loss " + before + " -> " + after);
        double[] y = TestNets.flat(net.output(data.getFeatures()));
        TestNets.assertWithinDocumentedBound(c, null, y, samples, true);
    }

    @Test
    void modelSerializerRoundTripIsBitIdentical() throws IOException {
        for (LawOutputLayer out : new LawOutputLayer[] {LawOutputLayer.of(TestNets.CONSTANT_AFFINE),
                LawOutputLayer.of(TestNets.NONLINEAR).withLoss(new LossL1())}) {
            Completion c = out.lawCompletion();
            MultiLayerNetwork net = net(out, 3, 8, DataType.FLOAT, new Adam(1e-2), 7);
            SplittableRandom r = new SplittableRandom(7);
            INDArray in = TestNets.array(TestNets.uniform(r, 16, 3, -1, 1), DataType.FLOAT);
            INDArray labels = TestNets.array(TestNets.uniform(r, 16, c.outputWidth(), -1, 1), DataType.FLOAT);
            for (int i = 0; i < 3; i++) {
                net.fit(in, labels);
            }
            File f = dir.resolve("net-" + c.outputWidth() + ".zip").toFile();
            ModelSerializer.writeModel(net, f, true);
            MultiLayerNetwork back = ModelSerializer.restoreMultiLayerNetwork(f, true);
            assertEquals(net.getLayerWiseConfigurations(), back.getLayerWiseConfigurations());
            LawOutputLayer loaded = assertInstanceOf(LawOutputLayer.class, back.getLayer(2).conf().getLayer());
            assertEquals(out.getLossFn(), loaded.getLossFn());
            assertEquals(out.getSpec(), loaded.getSpec());
            assertArrayEquals(TestNets.flat(net.output(in)), TestNets.flat(back.output(in)));
            DataSet data = new DataSet(in, labels);
            assertEquals(net.score(data), back.score(data));
            assertEquals(LawDeployment.lawLayerIndex(back), 2);
        }
    }

    @Test
    void configurationBasicsAndRefusals() {
        LawOutputLayer a = LawOutputLayer.of(TestNets.CONSTANT_AFFINE);
        LawOutputLayer b = new LawOutputLayer(LawSpec.of(TestNets.CONSTANT_AFFINE), new LossMSE());
        assertEquals(a, b);
        assertEquals(a.hashCode(), b.hashCode());
        assertFalse(a.equals(a.withLoss(new LossL1())));
        assertFalse(a.equals(LawLayer.of(TestNets.CONSTANT_AFFINE)));
        assertInstanceOf(LossMSE.class, new LawOutputLayer().getLossFn());
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawOutputLayer.of(TestNets.X_AFFINE));
        assertTrue(e.getMessage().contains("LawVertex"), e.getMessage());
        MultiLayerNetwork net = net(a, 3, 4, DataType.DOUBLE, new NoOp(), 5);
        INDArray in = TestNets.array(TestNets.uniform(new SplittableRandom(5), 4, 3, -1, 1), DataType.DOUBLE);
        INDArray wrong = TestNets.array(TestNets.uniform(new SplittableRandom(6), 4, 3, -1, 1), DataType.DOUBLE);
        IllegalArgumentException w = assertThrows(IllegalArgumentException.class,
                () -> net.score(new DataSet(in, wrong)));
        assertTrue(w.getMessage().contains("labels"), w.getMessage());
    }

    /** Test-only output layer whose backward pass keeps only the free outputs' own loss gradients. */
    static final class DroppedCorrection extends LawOutputLayer {
        private static final long serialVersionUID = 1L;

        DroppedCorrection(LawSpec spec) {
            super(spec);
        }

        @Override
        protected LawLayerImpl newLayer(NeuralNetConfiguration conf, DataType type) {
            return new LawOutputLayerImpl(conf, type) {
                private static final long serialVersionUID = 1L;

                @Override
                public Pair<Gradient, INDArray> backpropGradient(INDArray epsilon, LayerWorkspaceMgr mgr) {
                    INDArray gy = lossGradient();
                    int[] free = completion().freeOutputs();
                    INDArray gz = mgr.create(ArrayType.ACTIVATION_GRAD, dataType, gy.size(0), free.length);
                    for (int f = 0; f < free.length; f++) {
                        gz.getColumn(f).assign(gy.getColumn(free[f]));
                    }
                    return new Pair<>(new DefaultGradient(), gz);
                }
            };
        }
    }
}
