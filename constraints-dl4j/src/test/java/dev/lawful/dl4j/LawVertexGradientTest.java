package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Tier;
import java.util.SplittableRandom;
import org.deeplearning4j.gradientcheck.GradientCheckUtil;
import org.deeplearning4j.nn.gradient.Gradient;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.junit.jupiter.api.Test;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.NoOp;

/**
 * The law vertex's gradients, on both of its inputs, against Deeplearning4j's own finite-difference gradient
 * checker, in double precision with workspaces ENABLED, for each tier; the law inputs reach the vertex through a
 * dense layer so that the gradient on x reaches parameters the checker perturbs. A deliberately wrong backward pass
 * must fail the check.
 */
class LawVertexGradientTest extends DoublePrecisionTest {
    private static boolean check(LawVertex vertex, long seed) {
        Completion c = vertex.lawCompletion();
        ComputationGraph g = TestNets.graphWithMappedInputs(vertex, c, 5, DataType.DOUBLE, new NoOp(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 6, c.inputWidth(), 0.5, 1.5), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 6, c.outputWidth(), -1, 1), DataType.DOUBLE);
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.GraphConfig().net(g)
                .inputs(new INDArray[] {in}).labels(new INDArray[] {labels})
                .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    @Test
    void constantAffineLawsWithInputsPassTheGradientCheck() {
        LawVertex v = LawVertex.of(TestNets.X_CONSTANT_AFFINE);
        assertEquals(Tier.CONSTANT_AFFINE, v.lawCompletion().tier());
        assertTrue(check(v, 11));
    }

    @Test
    void affineLawsWithInputDependentCoefficientsPassTheGradientCheck() {
        LawVertex v = LawVertex.of(TestNets.X_AFFINE);
        assertEquals(Tier.AFFINE, v.lawCompletion().tier());
        assertTrue(check(v, 12));
    }

    @Test
    void nonlinearLawsWithInputsAndAGuessPassTheGradientCheck() {
        LawVertex v = LawVertex.of(TestNets.X_NONLINEAR);
        assertEquals(Tier.NONLINEAR, v.lawCompletion().tier());
        assertTrue(check(v, 13));
    }

    @Test
    void aBackwardPassWithoutTheImplicitFunctionCorrectionFailsTheCheck() {
        assertFalse(check(new WrongBackward(LawSpec.of(TestNets.X_AFFINE), true), 12));
        assertFalse(check(new WrongBackward(LawSpec.of(TestNets.X_NONLINEAR), true), 13));
    }

    @Test
    void aBackwardPassThatGivesTheInputsNoGradientFailsTheCheck() {
        // correct ḡ_z, but ḡ_x = 0: the check must see the missing −(∂C/∂x)ᵀλ through the dense layer before x
        assertFalse(check(new WrongBackward(LawSpec.of(TestNets.X_AFFINE), false), 12));
        assertFalse(check(new WrongBackward(LawSpec.of(TestNets.X_CONSTANT_AFFINE), false), 11));
    }

    /** Test-only vertex with a wrong backward pass: see {@link #dropZCorrection}. */
    static final class WrongBackward extends LawVertex {
        private static final long serialVersionUID = 1L;
        /** true: ḡ_z = ḡ_free and ḡ_x = 0; false: correct ḡ_z and ḡ_x = 0. */
        private final boolean dropZCorrection;

        WrongBackward(LawSpec spec, boolean dropZCorrection) {
            super(spec);
            this.dropZCorrection = dropZCorrection;
        }

        @Override
        public WrongBackward clone() {
            return new WrongBackward(getSpec(), dropZCorrection);
        }

        @Override
        public org.deeplearning4j.nn.graph.vertex.GraphVertex instantiate(ComputationGraph graph, String name,
                int idx, INDArray paramsView, boolean initializeParams, DataType type) {
            return new LawVertexImpl(graph, name, idx, this, type) {
                private static final long serialVersionUID = 1L;

                @Override
                public Pair<Gradient, INDArray[]> doBackward(boolean tbptt, LayerWorkspaceMgr mgr) {
                    Pair<Gradient, INDArray[]> right = super.doBackward(tbptt, mgr);
                    right.getSecond()[0].assign(0);
                    if (dropZCorrection) {
                        int[] free = completion().freeOutputs();
                        for (int f = 0; f < free.length; f++) {
                            right.getSecond()[1].getColumn(f).assign(epsilon.getColumn(free[f]));
                        }
                    }
                    return right;
                }
            };
        }
    }
}
