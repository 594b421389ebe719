package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Penalty;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.util.SplittableRandom;
import org.deeplearning4j.gradientcheck.GradientCheckUtil;
import org.deeplearning4j.nn.conf.ComputationGraphConfiguration;
import org.deeplearning4j.nn.gradient.Gradient;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.MultiDataSet;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.learning.config.NoOp;
import org.nd4j.linalg.lossfunctions.impl.LossMSE;

/**
 * The penalised graph (the soft baseline for laws that use the network inputs): its gradients against
 * Deeplearning4j's own gradient checker with workspaces ENABLED, with and without a normalizer, a wrong backward pass
 * that must fail, its score against Deeplearning4j's MSE plus the core's penalty, and a save/load round trip.
 */
class LawPenaltyVertexTest extends DoublePrecisionTest {

    /**
     * in → dense(identity) → vertex x, so the gradient on x reaches parameters the checker perturbs; in → dense(tanh)
     * → head (all outputs) → MSE loss; (x, head) → penalty vertex → sum-of-squares loss against zeros.
     */
    private static ComputationGraph graph(LawPenaltyVertex vertex, int nIn, int p, long seed) {
        ComputationGraphConfiguration conf = TestNets.base(DataType.DOUBLE, new NoOp(), seed).graphBuilder()
                .addInputs("in")
                .addLayer("xmap", new org.deeplearning4j.nn.conf.layers.DenseLayer.Builder().nIn(nIn).nOut(nIn)
                        .activation(Activation.IDENTITY).build(), "in")
                .addLayer("hidden", new org.deeplearning4j.nn.conf.layers.DenseLayer.Builder().nIn(nIn).nOut(5)
                        .activation(Activation.TANH).build(), "in")
                .addLayer("head", new org.deeplearning4j.nn.conf.layers.DenseLayer.Builder().nIn(5).nOut(p)
                        .activation(Activation.IDENTITY).build(), "hidden")
                .addLayer("loss", new org.deeplearning4j.nn.conf.layers.LossLayer.Builder().lossFunction(new LossMSE())
                        .activation(Activation.IDENTITY).build(), "head")
                .addVertex("penalty", vertex, "xmap", "head")
                .addLayer("penalty-loss", new org.deeplearning4j.nn.conf.layers.LossLayer.Builder()
                        .lossFunction(new org.nd4j.linalg.lossfunctions.impl.LossL2())
                        .activation(Activation.IDENTITY).build(), "penalty")
                .setOutputs("loss", "penalty-loss")
                .build();
        ComputationGraph g = new ComputationGraph(conf);
        g.init();
        return g;
    }

    private static boolean check(LawPenaltyVertex vertex, long seed) {
        LawSet laws = vertex.penalty().laws();
        int m = vertex.penalty().lawCount();
        ComputationGraph g = graph(vertex, laws.inputWidth(), laws.outputWidth(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 6, laws.inputWidth(), 0.5, 1.5), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 6, laws.outputWidth(), -1, 1), DataType.DOUBLE);
        INDArray zeros = org.nd4j.linalg.factory.Nd4j.zeros(DataType.DOUBLE, 6, m);
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.GraphConfig().net(g)
                .inputs(new INDArray[] {in}).labels(new INDArray[] {labels, zeros})
                .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    @Test
    void thePenaltyOfEachKindOfLawPassesTheGradientCheck() {
        assertTrue(check(new LawPenaltyVertex(LawSpec.of(TestNets.X_CONSTANT_AFFINE), 0.7), 21));
        assertTrue(check(new LawPenaltyVertex(LawSpec.of(TestNets.X_AFFINE), 2.0), 22));
        assertTrue(check(new LawPenaltyVertex(LawSpec.of(TestNets.X_NONLINEAR), 1.5), 23));
    }

    @Test
    void thePenaltyOnNormalisedDataPassesTheGradientCheck() {
        for (boolean standardize : new boolean[] {true, false}) {
            Completion c = LawSpec.of(TestNets.X_AFFINE).completion();
            // milder column scales than the layer's normalised checks: the penalty's score grows with the squared
            // physical residuals, and finite differences of a large score lose the small gradients to rounding
            DataNormalization n = NormalizedGradientTest.fitted(standardize, c, c.inputWidth(), 24,
                    new double[] {4, 0.25, 3, 0.5});
            LawPenaltyVertex v = new LawPenaltyVertex(LawSpec.of(TestNets.X_AFFINE), 1.0).normalizedWith(n);
            assertTrue(check(v, 24), standardize ? "standardize" : "min-max");
        }
    }

    @Test
    void aBackwardPassThatForgetsTheInputsOrTheWeightFailsTheCheck() {
        assertFalse(check(new WrongBackward(LawSpec.of(TestNets.X_AFFINE), 2.0, true), 22));
        assertFalse(check(new WrongBackward(LawSpec.of(TestNets.X_AFFINE), 2.0, false), 22));
    }

    @Test
    void theScoreIsDeeplearning4jsMsePlusTheCorePenalty() {
        LawSpec spec = LawSpec.of(TestNets.X_NONLINEAR);
        double lambda = 3.0;
        ComputationGraph g = ConstrainedGraph.builder(spec).hidden(6).dataType(DataType.DOUBLE).seed(5)
                .buildPenalized(lambda);
        LawSet laws = spec.lawSet();
        SplittableRandom r = new SplittableRandom(25);
        int batch = 7;
        INDArray x = TestNets.array(TestNets.uniform(r, batch, laws.inputWidth(), 0.5, 1.5), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, batch, laws.outputWidth(), -1, 1), DataType.DOUBLE);
        MultiDataSet data = ConstrainedGraph.penaltyData(spec, new DataSet(x, labels));
        double score = g.score(data, false);
        INDArray yHat = g.output(x)[0];
        // Source: Deeplearning4j 1.0.0-M2.1 LossMSE (mean over the outputs, averaged over the examples)
        double mse = new LossMSE().computeScore(labels, yHat, Activation.IDENTITY.getActivationFunction(), null, true);
        double penalty = Penalty.of(laws).value(TestNets.flat(x), TestNets.flat(yHat), batch, null);
        assertEquals(mse + lambda * penalty / batch, score, 1e-12 * score);
        assertEquals(2, data.getLabels().length);
        assertEquals(laws.evaluator().lawCount(), data.getLabels(1).size(1));
    }

    @Test
    void aPenalisedGraphSavesAndLoadsWithItsLawsAndWeight() throws Exception {
        LawSpec spec = LawSpec.of(TestNets.X_AFFINE);
        ComputationGraph g = ConstrainedGraph.builder(spec).hidden(4).dataType(DataType.DOUBLE).buildPenalized(0.25);
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        ModelSerializer.writeModel(g, bytes, false);
        ComputationGraph back = ModelSerializer.restoreComputationGraph(new ByteArrayInputStream(bytes.toByteArray()));
        assertEquals(g.getConfiguration().getVertices().get(ConstrainedGraph.PENALTY),
                back.getConfiguration().getVertices().get(ConstrainedGraph.PENALTY));
        assertTrue(back.getConfiguration().toJson().contains("weighted: (1 + a[0]^2)*y[2]"),
                "the law text is readable in the configuration");
        SplittableRandom r = new SplittableRandom(26);
        INDArray x = TestNets.array(TestNets.uniform(r, 5, 2, 0.5, 1.5), DataType.DOUBLE);
        assertEquals(g.output(x)[1], back.output(x)[1]);
    }

    @Test
    void badWeightsAndMissingInputsAreRefusedWithAFix() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new LawPenaltyVertex(LawSpec.of(TestNets.X_AFFINE), -1));
        assertEquals("law penalty vertex: the penalty weight must be finite and not negative, found -1.0",
                e.getMessage());
        e = assertThrows(IllegalArgumentException.class,
                () -> ConstrainedGraph.builder(LawSpec.of(TestNets.CONSTANT_AFFINE)).buildPenalized(1));
        assertEquals("the law set declares no inputs, so the graph has no input to give its network; use"
                + " LawPenaltyLoss in a MultiLayerNetwork", e.getMessage());
    }

    /** Test-only vertex with a wrong backward pass: no gradient on x, or the weight λ applied once instead of √λ. */
    static final class WrongBackward extends LawPenaltyVertex {
        private static final long serialVersionUID = 1L;
        private final boolean dropX;

        WrongBackward(LawSpec spec, double weight, boolean dropX) {
            super(spec, weight);
            this.dropX = dropX;
        }

        @Override
        public WrongBackward clone() {
            return new WrongBackward(getSpec(), getPenaltyWeight(), dropX);
        }

        @Override
        public org.deeplearning4j.nn.graph.vertex.GraphVertex instantiate(ComputationGraph graph, String name,
                int idx, INDArray paramsView, boolean initializeParams, DataType type) {
            return new LawPenaltyVertexImpl(graph, name, idx, this, type) {
                private static final long serialVersionUID = 1L;

                @Override
                public Pair<Gradient, INDArray[]> doBackward(boolean tbptt, LayerWorkspaceMgr mgr) {
                    Pair<Gradient, INDArray[]> right = super.doBackward(tbptt, mgr);
                    if (dropX) {
                        right.getSecond()[0].assign(0);
                    } else {
                        right.getSecond()[1].muli(Math.sqrt(getPenaltyWeight()));
                    }
                    return right;
                }
            };
        }
    }
}
