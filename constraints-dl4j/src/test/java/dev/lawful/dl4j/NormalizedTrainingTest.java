package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.util.List;
import java.util.SplittableRandom;
import org.deeplearning4j.datasets.iterator.utilty.ListDataSetIterator;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerMinMaxScaler;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.learning.config.Adam;

/**
 * Training float networks on normalised data whose physical columns have very different scales (about 1e3 and
 * 1e-2): the loss (on normalised values) falls, the outputs mapped back to physical units satisfy every law within
 * the core's documented float bound (judged by the law set's own evaluator), and the raw normalised outputs do not
 * satisfy the laws, which is why the normalizer's statistics must be folded into the layer.
 */
class NormalizedTrainingTest {
    private static final int SAMPLES = 128;
    private static final int STEPS = 150;
    /** Two balances; the free outputs differ in scale by five orders of magnitude. */
    private static final String BALANCES = "output y[4]\n"
            + "law total: sum(y) = 1000\n"
            + "law balance: y[0] - 2*y[1] = y[3]\n"
            + "complete y[2], y[3]\n";
    /** A coefficient from a large-scale input, another from a small-scale one. */
    private static final String WEIGHTED = "input a[2]\noutput y[3]\n"
            + "law weighted: a[1]*y[2] = a[0]*y[0] + y[1]\n"
            + "complete y[2]\n";

    /**
     * Asserts the core's documented float bound on every law of every sample, in physical units, for outputs the
     * network emitted normalised in float: the double bound (d_i + 3)·2⁻⁵³·s_i plus the float rounding, which here
     * happens on the normalised completed outputs v_j, so it is ½·Σ_j |∂C_i/∂y_j|·σ_j·ulp_f32(v_j) (the documented
     * term with ∂C/∂v_j = σ_j·∂C/∂y_j), plus the double rounding of the two affine maps, 2⁻⁵¹·(|y_j| + |μ_j| + |σ_j·v_j|)
     * per completed output. Residuals, scales and derivatives come from the law set's own evaluator.
     *
     * @param x   physical inputs (null when there are none)
     * @param yn  the network's normalised outputs, widened from float, declared order
     * @return the physical outputs
     */
    static double[] assertPhysicalBound(Completion c, Scaling out, double[] x, double[] yn, int batch) {
        // Source: constraints-core Completion class documentation, "Exactness" (the documented float bound)
        double[] y = out.toPhysical(yn, batch);
        LawSet laws = c.laws();
        ExpandedLaws expanded = laws.expand();
        LawEvaluator ev = laws.evaluator();
        int n = ev.lawCount();
        int p = c.outputWidth();
        double[] residual = new double[batch * n];
        double[] scale = new double[batch * n];
        double[] jy = new double[batch * ev.outputNonzeros()];
        ev.evaluate(x, y, batch, residual, scale, jy, null);
        boolean[] completed = new boolean[p];
        for (int o : c.completedOutputs()) {
            completed[o] = true;
        }
        for (int s = 0; s < batch; s++) {
            for (int i = 0; i < n; i++) {
                double bound = (expanded.roundingDepth(i) + 3) * 0x1p-53 * scale[s * n + i];
                int[] cols = ev.outputColumns(i);
                for (int k = 0; k < cols.length; k++) {
                    int j = cols[k];
                    if (completed[j]) {
                        double dc = Math.abs(jy[s * ev.outputNonzeros() + ev.outputOffset(i) + k]);
                        double v = yn[s * p + j];
                        bound += dc * (0.5 * out.scale(j) * Math.ulp((float) v)
                                + 0x1p-51 * (Math.abs(y[s * p + j]) + Math.abs(out.offset(j))
                                + Math.abs(out.scale(j) * v)));
                    }
                }
                double r = Math.abs(residual[s * n + i]);
                if (!(r <= bound)) {
                    throw new AssertionError("sample " + s + ", law " + expanded.name(i) + ": |C| = " + r
                            + " exceeds the documented bound " + bound + " (scale " + scale[s * n + i] + ")");
                }
            }
        }
        return y;
    }

    /**
     * @return how many samples satisfy every law within the documented float bound when the raw values are taken
     *         as if they were physical
     */
    static int samplesWithinBoundAsIfPhysical(Completion c, double[] x, double[] y, int batch) {
        int within = 0;
        for (int s = 0; s < batch; s++) {
            double[] xs = x == null ? null : java.util.Arrays.copyOfRange(x, s * c.inputWidth(),
                    (s + 1) * c.inputWidth());
            double[] ys = java.util.Arrays.copyOfRange(y, s * c.outputWidth(), (s + 1) * c.outputWidth());
            try {
                TestNets.assertWithinDocumentedBound(c, xs, ys, 1, true);
                within++;
            } catch (AssertionError e) {
                // this sample breaks a law
            }
        }
        return within;
    }

    /** y0 ≈ 1e3 scale, y1 ≈ 1e-2 scale, then y3 and y2 from the balances. */
    private static double[][] balanceTargets(double[][] u) {
        double[][] y = new double[u.length][4];
        for (int s = 0; s < u.length; s++) {
            y[s][0] = 1000 * (1 + 0.5 * Math.sin(u[s][0] + u[s][1]));
            y[s][1] = 0.01 * (1 + u[s][0] * u[s][1]);
            y[s][3] = y[s][0] - 2 * y[s][1];
            y[s][2] = 1000 - y[s][0] - y[s][1] - y[s][3];
        }
        return y;
    }

    /** Fits {@code normalizer} (with labels) on an iterator over {@code physical}; returns a normalised copy. */
    static DataSet fitAndNormalise(DataNormalization normalizer, DataSet physical) {
        normalizer.fitLabel(true);
        normalizer.fit(new ListDataSetIterator<>(List.of(physical), SAMPLES));
        DataSet normalised = physical.copy();
        normalizer.transform(normalised);
        return normalised;
    }

    private static void trainsAFloatLayerNetwork(DataNormalization normalizer, long seed) {
        double[][] u = TestNets.uniform(new SplittableRandom(seed), SAMPLES, 2, -1, 1);
        DataSet physical = new DataSet(TestNets.array(u, DataType.FLOAT),
                TestNets.array(balanceTargets(u), DataType.FLOAT));
        DataSet data = fitAndNormalise(normalizer, physical);
        LawLayer layer = LawLayer.of(BALANCES).normalizedWith(normalizer);
        Completion c = layer.lawCompletion();
        MultiLayerNetwork net = TestNets.mln(layer, 2, 16, c.freeWidth(), DataType.FLOAT, new Adam(2e-2), seed);
        double before = net.score(data);
        for (int i = 0; i < STEPS; i++) {
            net.fit(data);
        }
        double after = net.score(data);
        assertTrue(after < before / 10, "loss " + before + " -> " + after);
        double[] yn = TestNets.flat(net.output(data.getFeatures()));
        double[] y = assertPhysicalBound(c, layer.getOutputScaling(), null, yn, SAMPLES);
        // the folded map agrees with the normalizer's own inverse to float rounding (y[0] is about 1e3)
        INDArray reverted = net.output(data.getFeatures()).dup();
        normalizer.revertLabels(reverted);
        double[] r = TestNets.flat(reverted);
        for (int i = 0; i < r.length; i++) {
            assertEquals(y[i], r[i], 1e-4 * (1 + Math.abs(y[i])), "column " + i % 4);
        }
        // the raw normalised outputs break the laws on (practically) every sample: completing them as they are
        // would enforce the laws on the wrong numbers
        assertTrue(samplesWithinBoundAsIfPhysical(c, null, yn, SAMPLES) <= SAMPLES / 100);
    }

    @Test
    void aStandardizedFloatLayerNetworkObeysTheLawsInPhysicalUnits() {
        trainsAFloatLayerNetwork(new NormalizerStandardize(), 51);
    }

    @Test
    void aMinMaxScaledFloatLayerNetworkObeysTheLawsInPhysicalUnits() {
        trainsAFloatLayerNetwork(new NormalizerMinMaxScaler(), 52);
    }

    private static void trainsAFloatGraph(DataNormalization normalizer, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        double[][] a = new double[SAMPLES][2];
        double[][] t = new double[SAMPLES][3];
        for (int s = 0; s < SAMPLES; s++) {
            a[s][0] = 1000 * (0.5 + r.nextDouble());
            a[s][1] = 0.01 * (0.5 + r.nextDouble());
            t[s][0] = Math.sin(a[s][0] / 1000 + 100 * a[s][1]);
            t[s][1] = 1000 * a[s][0] * a[s][1] / 10;
            t[s][2] = (a[s][0] * t[s][0] + t[s][1]) / a[s][1];
        }
        DataSet physical = new DataSet(TestNets.array(a, DataType.FLOAT), TestNets.array(t, DataType.FLOAT));
        DataSet data = fitAndNormalise(normalizer, physical);
        LawSpec spec = LawSpec.of(WEIGHTED);
        Completion c = spec.completion();
        ComputationGraph g = ConstrainedGraph.builder(spec).normalizedWith(normalizer).hidden(16)
                .updater(new Adam(2e-2)).seed(seed).build();
        LawVertex vertex = (LawVertex) g.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
        org.nd4j.linalg.dataset.MultiDataSet md = new org.nd4j.linalg.dataset.MultiDataSet(data.getFeatures(),
                data.getLabels());
        double before = g.score(md);
        for (int i = 0; i < STEPS; i++) {
            g.fit(md);
        }
        double after = g.score(md);
        assertTrue(after < before / 10, "loss " + before + " -> " + after);
        double[] yn = TestNets.flat(g.outputSingle(data.getFeatures()));
        // the laws are judged at the physical inputs the vertex saw: the network's float normalised inputs, mapped
        double[] xn = TestNets.flat(data.getFeatures());
        double[] x = vertex.getInputScaling().toPhysical(xn, SAMPLES);
        assertPhysicalBound(c, vertex.getOutputScaling(), x, yn, SAMPLES);
        assertTrue(samplesWithinBoundAsIfPhysical(c, xn, yn, SAMPLES) <= SAMPLES / 100);
    }

    @Test
    void aStandardizedFloatGraphObeysTheLawsInPhysicalUnits() {
        trainsAFloatGraph(new NormalizerStandardize(), 53);
    }

    @Test
    void aMinMaxScaledFloatGraphObeysTheLawsInPhysicalUnits() {
        trainsAFloatGraph(new NormalizerMinMaxScaler(0, 1), 54);
    }
}
