package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Tier;
import java.util.SplittableRandom;
import org.deeplearning4j.gradientcheck.GradientCheckUtil;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.gradient.DefaultGradient;
import org.deeplearning4j.nn.gradient.Gradient;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.junit.jupiter.api.Test;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerMinMaxScaler;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.learning.config.NoOp;

/**
 * The normalised law layer's and law vertex's gradients (through the folded affine maps of a standardize and a
 * min-max normalizer) against Deeplearning4j's own finite-difference gradient checker, in double precision with
 * workspaces ENABLED; a backward pass that forgets the chain rule through the normalizer must fail the check.
 */
class NormalizedGradientTest extends DoublePrecisionTest {
    /** Column scales of the generated physical data: very different on purpose. */
    private static final double[] SCALES = {1e3, 1e-2, 30, 0.5};

    /**
     * @return a normalizer fitted, with labels, on generated physical data that obey the laws: feature column j
     *         uniform in [0.5, 1.5)·SCALES[j], free output f uniform in [−1, 2)·SCALES[f + 1], and the completed
     *         outputs from the laws (a user fits on training labels, which obey them)
     */
    static DataNormalization fitted(boolean standardize, Completion c, int features, long seed) {
        return fitted(standardize, c, features, seed, SCALES);
    }

    /** {@link #fitted(boolean, Completion, int, long)} with the given column scales instead of {@code SCALES}. */
    static DataNormalization fitted(boolean standardize, Completion c, int features, long seed, double[] scales) {
        SplittableRandom r = new SplittableRandom(seed);
        int rows = 64;
        double[] f = new double[rows * features];
        double[] z = new double[rows * c.freeWidth()];
        for (int i = 0; i < f.length; i++) {
            f[i] = (0.5 + r.nextDouble()) * scales[(i % features) % scales.length];
        }
        for (int i = 0; i < z.length; i++) {
            z[i] = (-1 + 3 * r.nextDouble()) * scales[(i % c.freeWidth() + 1) % scales.length];
        }
        double[] y = new double[rows * c.outputWidth()];
        c.forward(c.inputWidth() == 0 ? null : f, z, rows, y, null, c.newWorkspace());
        DataNormalization n = standardize ? new NormalizerStandardize() : new NormalizerMinMaxScaler(-1, 1);
        n.fitLabel(true);
        n.fit(new DataSet(org.nd4j.linalg.factory.Nd4j.create(f, new long[] {rows, features}, 'c'),
                org.nd4j.linalg.factory.Nd4j.create(y, new long[] {rows, c.outputWidth()}, 'c')));
        return n;
    }

    private static boolean check(LawLayer layer, long seed) {
        Completion c = layer.lawCompletion();
        MultiLayerNetwork net = TestNets.mln(layer, 3, 5, c.freeWidth(), DataType.DOUBLE, new NoOp(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 6, 3, -1, 1), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 6, c.outputWidth(), -1, 1), DataType.DOUBLE);
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.MLNConfig().net(net).input(in).labels(labels)
                .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    private static boolean check(LawVertex vertex, long seed) {
        Completion c = vertex.lawCompletion();
        ComputationGraph g = TestNets.graphWithMappedInputs(vertex, c, 5, DataType.DOUBLE, new NoOp(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 6, c.inputWidth(), -1, 1), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 6, c.outputWidth(), -1, 1), DataType.DOUBLE);
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.GraphConfig().net(g)
                .inputs(new INDArray[] {in}).labels(new INDArray[] {labels})
                .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    private static LawLayer layer(String laws, boolean standardize, long seed) {
        LawLayer plain = LawLayer.of(laws);
        return plain.normalizedWith(fitted(standardize, plain.lawCompletion(), 3, seed));
    }

    private static LawVertex vertex(String laws, boolean standardize, long seed) {
        LawVertex plain = LawVertex.of(laws);
        Completion c = plain.lawCompletion();
        return plain.normalizedWith(fitted(standardize, c, c.inputWidth(), seed));
    }

    @Test
    void aStandardizedLayerPassesTheGradientCheckForEachTier() {
        assertEquals(Tier.CONSTANT_AFFINE, LawLayer.of(TestNets.CONSTANT_AFFINE).lawCompletion().tier());
        assertTrue(check(layer(TestNets.CONSTANT_AFFINE, true, 31), 31));
        assertTrue(check(layer(TestNets.AFFINE_FREE, true, 32), 32));
        assertTrue(check(layer(TestNets.NONLINEAR, true, 33), 33));
    }

    @Test
    void aMinMaxScaledLayerPassesTheGradientCheckForEachTier() {
        assertTrue(check(layer(TestNets.CONSTANT_AFFINE, false, 34), 34));
        assertTrue(check(layer(TestNets.AFFINE_FREE, false, 35), 35));
        assertTrue(check(layer(TestNets.NONLINEAR, false, 36), 36));
    }

    @Test
    void aStandardizedVertexPassesTheGradientCheckOnBothInputsForEachTier() {
        assertTrue(check(vertex(TestNets.X_CONSTANT_AFFINE, true, 41), 41));
        assertTrue(check(vertex(TestNets.X_AFFINE, true, 42), 42));
        assertTrue(check(vertex(TestNets.X_NONLINEAR, true, 43), 43));
    }

    @Test
    void aMinMaxScaledVertexPassesTheGradientCheckOnBothInputsForEachTier() {
        assertTrue(check(vertex(TestNets.X_CONSTANT_AFFINE, false, 44), 44));
        assertTrue(check(vertex(TestNets.X_AFFINE, false, 45), 45));
        assertTrue(check(vertex(TestNets.X_NONLINEAR, false, 46), 46));
    }

    @Test
    void aLayerBackwardPassWithoutTheChainRuleThroughTheNormalizerFailsTheCheck() {
        assertFalse(check(new NoChainRule(layer(TestNets.CONSTANT_AFFINE, true, 31)), 31));
        assertFalse(check(new NoChainRule(layer(TestNets.NONLINEAR, false, 36)), 36));
    }

    @Test
    void aVertexBackwardPassWithoutTheChainRuleOnTheInputsFailsTheCheck() {
        assertFalse(check(new NoInputChainRule(vertex(TestNets.X_AFFINE, true, 42)), 42));
        assertFalse(check(new NoInputChainRule(vertex(TestNets.X_CONSTANT_AFFINE, false, 44)), 44));
    }

    /** Test-only layer: forward is right, backward feeds ḡ_n to the core as if it were ḡ_y and returns ḡ_z as ḡ_z_n. */
    static final class NoChainRule extends LawLayer {
        private static final long serialVersionUID = 1L;

        NoChainRule(LawLayer normalised) {
            super(normalised.getSpec());
            setOutputScaling(normalised.getOutputScaling());
        }

        @Override
        protected LawLayerImpl newLayer(NeuralNetConfiguration conf, DataType type) {
            return new LawLayerImpl(conf, type) {
                private static final long serialVersionUID = 1L;

                @Override
                public Pair<Gradient, INDArray> backpropGradient(INDArray epsilon, LayerWorkspaceMgr mgr) {
                    Completion c = completion();
                    int batch = Math.toIntExact(input.size(0));
                    double[] y = complete(c, batch, true);
                    double[] gz = new double[batch * c.freeWidth()];
                    c.backward(null, y, NdArrays.toDouble(epsilon), batch, gz, null, c.newWorkspace());
                    return new Pair<>(new DefaultGradient(),
                            NdArrays.fromDouble(mgr, ArrayType.ACTIVATION_GRAD, dataType, gz, batch, c.freeWidth()));
                }
            };
        }
    }

    /** Test-only vertex: right except that ḡ_x is returned without the factor σ_x (ḡ_x_n = ḡ_x). */
    static final class NoInputChainRule extends LawVertex {
        private static final long serialVersionUID = 1L;

        NoInputChainRule(LawVertex normalised) {
            super(normalised.getSpec());
            setInputScaling(normalised.getInputScaling());
            setOutputScaling(normalised.getOutputScaling());
        }

        @Override
        public NoInputChainRule clone() {
            return new NoInputChainRule(this);
        }

        @Override
        public org.deeplearning4j.nn.graph.vertex.GraphVertex instantiate(ComputationGraph graph, String name,
                int idx, INDArray paramsView, boolean initializeParams, DataType type) {
            Scaling in = getInputScaling();
            return new LawVertexImpl(graph, name, idx, this, type) {
                private static final long serialVersionUID = 1L;

                @Override
                public Pair<Gradient, INDArray[]> doBackward(boolean tbptt, LayerWorkspaceMgr mgr) {
                    Pair<Gradient, INDArray[]> right = super.doBackward(tbptt, mgr);
                    INDArray gx = right.getSecond()[0];
                    for (int j = 0; j < in.width(); j++) {
                        gx.getColumn(j).divi(in.scale(j));
                    }
                    return right;
                }
            };
        }
    }
}
