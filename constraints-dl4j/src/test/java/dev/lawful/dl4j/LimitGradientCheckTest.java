package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Completion;
import java.util.SplittableRandom;
import org.deeplearning4j.gradientcheck.GradientCheckUtil;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.NoOp;

/**
 * Gradients through active limits in the law layer and the law vertex (plain and with a folded normalizer), against
 * Deeplearning4j's own finite-difference gradient checker in double precision. The batches are drawn so that many
 * samples lie on a limit; the checker's perturbations (1e-6) are far smaller than any sample's distance to a switch
 * between active sets, where the map is not differentiable.
 */
class LimitGradientCheckTest extends DoublePrecisionTest {
    /** Constant-coefficient laws with inputs; a limit on the completed output and one on an expression with an input. */
    static final String X_LIMITS = TestNets.X_CONSTANT_AFFINE
            + "limit low: y[2] >= 0\n"
            + "limit cap: y[0] + a[1] <= 1\n";
    /** No inputs; every output non-negative (two free, two completed). */
    static final String LIMITS = TestNets.CONSTANT_AFFINE + "limit pos: y >= 0\n";

    private static boolean check(LawVertex vertex, long seed) {
        Completion c = vertex.lawCompletion();
        ComputationGraph g = TestNets.graphWithMappedInputs(vertex, c, 5, DataType.DOUBLE, new NoOp(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 8, c.inputWidth(), -1, 1), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 8, c.outputWidth(), -1, 1), DataType.DOUBLE);
        assertTrue(onALimit(c, vertex.getOutputScaling(), g.outputSingle(in)) >= 2, "too few samples on a limit");
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.GraphConfig().net(g)
                .inputs(new INDArray[] {in}).labels(new INDArray[] {labels})
                .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    private static boolean check(LawLayer layer, long seed) {
        Completion c = layer.lawCompletion();
        MultiLayerNetwork net = TestNets.mln(layer, 3, 5, c.freeWidth(), DataType.DOUBLE, new NoOp(), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 8, 3, -2, 2), DataType.DOUBLE);
        INDArray labels = TestNets.array(TestNets.uniform(r, 8, c.outputWidth(), -1, 1), DataType.DOUBLE);
        assertTrue(onALimit(c, layer.getOutputScaling(), net.output(in)) >= 2, "too few samples on a limit");
        // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
        return GradientCheckUtil.checkGradients(new GradientCheckUtil.MLNConfig().net(net).input(in).labels(labels)
                .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false));
    }

    /** @return how many rows have an output within 1e-9 of zero in physical units (on a limit of the test's laws) */
    private static int onALimit(Completion c, Scaling scaling, INDArray out) {
        int batch = Math.toIntExact(out.size(0));
        double[] y = TestNets.flat(out);
        if (scaling != null) {
            y = scaling.toPhysical(y, batch);
        }
        int rows = 0;
        for (int s = 0; s < batch; s++) {
            boolean on = false;
            for (int o = 0; o < c.outputWidth(); o++) {
                on |= Math.abs(y[s * c.outputWidth() + o]) <= 1e-9;
            }
            rows += on ? 1 : 0;
        }
        return rows;
    }

    @Test
    void aVertexOnActiveLimitsPassesTheGradientCheckOnBothInputs() {
        assertTrue(check(LawVertex.of(X_LIMITS), 51));
    }

    @Test
    void aLayerOnActiveLimitsPassesTheGradientCheck() {
        assertTrue(check(LawLayer.of(LIMITS), 52));
    }

    @Test
    void aStandardizedVertexAndLayerOnActiveLimitsPassTheGradientCheck() {
        LawVertex plainVertex = LawVertex.of(X_LIMITS);
        Completion cv = plainVertex.lawCompletion();
        LawVertex vertex = plainVertex.normalizedWith(NormalizedGradientTest.fitted(true, cv, cv.inputWidth(), 53,
                new double[] {1, 1, 1, 1}));
        assertTrue(check(vertex, 53));
        LawLayer plainLayer = LawLayer.of(LIMITS);
        LawLayer layer = plainLayer.normalizedWith(NormalizedGradientTest.fitted(true, plainLayer.lawCompletion(), 3,
                54, new double[] {1, 1, 1, 1}));
        assertTrue(check(layer, 54));
    }

    /**
     * Input-dependent coefficients (the affine tier), the law inputs straight from the graph input, so every
     * parameter the checker perturbs is upstream of the free outputs, whose gradient through an active limit is
     * exact in this tier (the input gradient is documented as leaving out the metric's change with the inputs).
     */
    @Test
    void anAffineVertexOnActiveLimitsPassesTheGradientCheckOnItsFreeOutputs() {
        for (boolean normalised : new boolean[] {false, true}) {
            // limits where this seed's untrained outputs fall on both sides of them (physical units)
            double low = normalised ? 0.7 : 0;
            double cap = normalised ? 0.1 : -0.3;
            LawVertex vertex = LawVertex.of(TestNets.X_AFFINE + "limit low: y[1] >= " + low + "\nlimit cap: y[0] <= "
                    + cap + "\n");
            Completion c = vertex.lawCompletion();
            if (normalised) {
                // fitted on data completed without the limits, so the limits cut into the outputs' range
                vertex = vertex.normalizedWith(NormalizedGradientTest.fitted(true,
                        LawVertex.of(TestNets.X_AFFINE).lawCompletion(), c.inputWidth(), 55, new double[] {1, 1, 1, 1}));
            }
            org.deeplearning4j.nn.conf.ComputationGraphConfiguration conf = TestNets.base(DataType.DOUBLE,
                    new NoOp(), 55).graphBuilder()
                    .addInputs("in")
                    .addLayer("hidden", new org.deeplearning4j.nn.conf.layers.DenseLayer.Builder().nIn(2).nOut(5)
                            .activation(org.nd4j.linalg.activations.Activation.TANH).build(), "in")
                    .addLayer("head", new org.deeplearning4j.nn.conf.layers.DenseLayer.Builder().nIn(5)
                            .nOut(c.freeWidth()).activation(org.nd4j.linalg.activations.Activation.IDENTITY).build(),
                            "hidden")
                    .addVertex("laws", vertex, "in", "head")
                    .addLayer("loss", new org.deeplearning4j.nn.conf.layers.LossLayer.Builder(
                            org.nd4j.linalg.lossfunctions.LossFunctions.LossFunction.MSE)
                            .activation(org.nd4j.linalg.activations.Activation.IDENTITY).build(), "laws")
                    .setOutputs("loss")
                    .build();
            ComputationGraph g = new ComputationGraph(conf);
            g.init();
            SplittableRandom r = new SplittableRandom(55);
            INDArray in = TestNets.array(TestNets.uniform(r, 8, 2, -1, 1), DataType.DOUBLE);
            INDArray labels = TestNets.array(TestNets.uniform(r, 8, c.outputWidth(), -1, 1), DataType.DOUBLE);
            double[] y = TestNets.flat(g.outputSingle(in));
            if (normalised) {
                y = vertex.getOutputScaling().toPhysical(y, 8);
            }
            int on = 0;
            for (int s = 0; s < 8; s++) {
                on += Math.abs(y[s * 3 + 1] - low) <= 1e-9 || Math.abs(y[s * 3] - cap) <= 1e-9 ? 1 : 0;
            }
            assertTrue(on >= 2, "only " + on + " samples on a limit" + (normalised ? " (normalised)" : ""));
            // Source: Deeplearning4j 1.0.0-M2.1 GradientCheckUtil (central finite differences on every parameter)
            assertTrue(GradientCheckUtil.checkGradients(new GradientCheckUtil.GraphConfig().net(g)
                    .inputs(new INDArray[] {in}).labels(new INDArray[] {labels})
                    .epsilon(LawLayerGradientTest.EPS).maxRelError(LawLayerGradientTest.MAX_REL_ERROR)
                    .minAbsoluteError(LawLayerGradientTest.MIN_ABS_ERROR)
                    .print(GradientCheckUtil.PrintMode.FAILURES_ONLY).exitOnFirstError(false)),
                    normalised ? "normalised" : "plain");
        }
    }
}
