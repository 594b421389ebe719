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
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.junit.jupiter.api.Test;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.NoOp;

/**
 * The law layer's gradients against Deeplearning4j's own finite-difference gradient checker, in double precision
 * with workspaces ENABLED, for each tier; and a deliberately wrong backward pass that the checker must reject.
 */
class LawLayerGradientTest extends DoublePrecisionTest {
    static final double EPS = 1e-6;
    static final double MAX_REL_ERROR = 1e-5;
    static final double MIN_ABS_ERROR = 1e-10;
    private static boolean check(LawLayer layer, long seed) {
        Completion c = layer.lawCompletion();
        MultiLayerNetwork net = TestNets.mln(layer, 3, 5, c.freeWidth(), DataType.DOUBLE, new NoOp(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 6, 3, -1, 1), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 6, c.outputWidth(), -1, 1), DataType.DOUBLE);
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.MLNConfig().net(net).input(in).labels(labels)
                .epsilon(EPS).maxRelError(MAX_REL_ERROR).minAbsoluteError(MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    @Test
    void constantAffineLawsPassTheGradientCheck() {
        LawLayer layer = LawLayer.of(TestNets.CONSTANT_AFFINE);
        assertEquals(Tier.CONSTANT_AFFINE, layer.lawCompletion().tier());
        assertTrue(check(layer, 1));
    }

    @Test
    void affineLawsWithFreeOutputCoefficientsPassTheGradientCheck() {
        LawLayer layer = LawLayer.of(TestNets.AFFINE_FREE);
        assertEquals(Tier.AFFINE, layer.lawCompletion().tier());
        assertTrue(check(layer, 2));
    }

    @Test
    void nonlinearLawsWithAGuessPassTheGradientCheck() {
        LawLayer layer = LawLayer.of(TestNets.NONLINEAR);
        assertEquals(Tier.NONLINEAR, layer.lawCompletion().tier());
        assertTrue(check(layer, 3));
    }

    @Test
    void aBackwardPassWithoutTheImplicitFunctionCorrectionFailsTheCheck() {
        // the same networks as above with ḡ_z = ḡ_free only (the −(∂C/∂z)ᵀλ term dropped): the checker must see it
        assertFalse(check(new DroppedCorrection(LawSpec.of(TestNets.CONSTANT_AFFINE)), 1));
        assertFalse(check(new DroppedCorrection(LawSpec.of(TestNets.NONLINEAR)), 3));
    }

    /** Test-only layer whose backward pass keeps only the free outputs' own gradients. */
    static final class DroppedCorrection extends LawLayer {
        private static final long serialVersionUID = 1L;

        DroppedCorrection(LawSpec spec) {
            super(spec);
        }

        @Override
        protected LawLayerImpl newLayer(NeuralNetConfiguration conf, DataType type) {
            return new LawLayerImpl(conf, type) {
                private static final long serialVersionUID = 1L;

                @Override
                public Pair<Gradient, INDArray> backpropGradient(INDArray epsilon, LayerWorkspaceMgr mgr) {
                    Completion c = completion();
                    int[] free = c.freeOutputs();
                    INDArray gz = mgr.create(ArrayType.ACTIVATION_GRAD, dataType, epsilon.size(0), free.length);
                    for (int f = 0; f < free.length; f++) {
                        gz.getColumn(f).assign(epsilon.getColumn(free[f]));
                    }
                    return new Pair<>(new DefaultGradient(), gz);
                }
            };
        }
    }
}
