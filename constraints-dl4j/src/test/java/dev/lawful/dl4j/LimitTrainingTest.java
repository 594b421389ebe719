package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Completion;
import java.io.File;
import java.nio.file.Path;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.learning.config.Adam;

/**
 * A float network with a normalised law vertex whose laws declare limits trains, keeps every output inside the
 * limits in physical units, and saves and reloads bit for bit.
 */
class LimitTrainingTest {
    private static final int SAMPLES = 256;

    @Test
    void aNormalisedFloatGraphTrainsInsideItsLimitsAndReloadsBitForBit(@TempDir Path dir) throws Exception {
        // half the rows sit on the limit y[2] >= 0 (y[2] = 0 exactly, like a dry column's rain), a quarter near the
        // limit y[0] + a[1] <= 1
        SplittableRandom r = new SplittableRandom(61);
        double[][] a = new double[SAMPLES][2];
        double[][] t = new double[SAMPLES][3];
        for (int s = 0; s < SAMPLES; s++) {
            a[s][0] = 2 + r.nextDouble();
            a[s][1] = 0.5 * r.nextDouble();
            t[s][0] = a[s][1];
            t[s][1] = (a[s][0] - 3 * a[s][1]) * Math.min(1, 2 * (a[s][0] - 2));
            t[s][2] = a[s][0] - 2 * a[s][1] - t[s][0] - t[s][1];
        }
        DataSet physical = new DataSet(TestNets.array(a, DataType.FLOAT), TestNets.array(t, DataType.FLOAT));
        NormalizerStandardize normalizer = new NormalizerStandardize();
        DataSet data = NormalizedTrainingTest.fitAndNormalise(normalizer, physical);
        LawSpec spec = LawSpec.of(LimitGradientCheckTest.X_LIMITS);
        ComputationGraph g = ConstrainedGraph.builder(spec).normalizedWith(normalizer).hidden(16)
                .updater(new Adam(2e-2)).seed(61).build();
        LawVertex vertex = (LawVertex) g.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
        Completion c = vertex.lawCompletion();
        org.nd4j.linalg.dataset.MultiDataSet md = new org.nd4j.linalg.dataset.MultiDataSet(data.getFeatures(),
                data.getLabels());
        double before = g.score(md);
        for (int i = 0; i < 150; i++) {
            g.fit(md);
        }
        double after = g.score(md);
        assertTrue(after < before / 10, "loss " + before + " -> " + after);

        float[] yn = g.outputSingle(data.getFeatures()).castTo(DataType.FLOAT).dup('c').data().asFloat();
        double[] x = vertex.getInputScaling().toPhysical(TestNets.flat(data.getFeatures()), SAMPLES);
        Scaling out = vertex.getOutputScaling();
        int onLimit = 0;
        for (int s = 0; s < SAMPLES; s++) {
            double y0 = out.scale(0) * yn[s * 3] + out.offset(0);
            double y2 = out.scale(2) * yn[s * 3 + 2] + out.offset(2);
            // the limits hold in double before the vertex rounds its normalised outputs to float; back in physical
            // units they hold to that rounding (half an ulp of the float, times the scale, plus the mapping's own)
            double slack0 = out.scale(0) * Math.ulp(yn[s * 3]) + 4 * Math.ulp(Math.abs(out.offset(0)) + 1);
            double slack2 = out.scale(2) * Math.ulp(yn[s * 3 + 2]) + 4 * Math.ulp(Math.abs(out.offset(2)));
            assertTrue(y2 >= -slack2, "row " + s + ": y[2] = " + y2);
            assertTrue(y0 + x[s * 2 + 1] <= 1 + slack0, "row " + s + ": y[0] + a[1] = " + (y0 + x[s * 2 + 1]));
            onLimit += Math.abs(y2) <= 1e-5 ? 1 : 0;
        }
        assertTrue(onLimit >= SAMPLES / 10, "only " + onLimit + " rows on the limit y[2] >= 0");

        // a core-only host reproduces the outputs with the layer's metric (LawSpec.completion(scales)), and only then
        float[] head = g.feedForward(data.getFeatures(), false).get(ConstrainedGraph.HEAD).castTo(DataType.FLOAT)
                .dup('c').data().asFloat();
        int k = c.freeWidth();
        double[] z = new double[SAMPLES * k];
        for (int s = 0; s < SAMPLES; s++) {
            for (int f = 0; f < k; f++) {
                int o = c.freeOutputs()[f];
                z[s * k + f] = out.scale(o) * head[s * k + f] + out.offset(o);
            }
        }
        double[] host = new double[SAMPLES * 3];
        spec.completion(out.getScale()).forward(x, z, SAMPLES, host, null, null);
        double[] unitMetric = new double[SAMPLES * 3];
        spec.completion().forward(x, z, SAMPLES, unitMetric, null, null);
        int differ = 0;
        for (int i = 0; i < SAMPLES * 3; i++) {
            int o = i % 3;
            double net = out.scale(o) * yn[i] + out.offset(o);
            double rounding = out.scale(o) * Math.ulp(yn[i]) + 4 * Math.ulp(Math.abs(net) + Math.abs(out.offset(o)));
            assertTrue(Math.abs(host[i] - net) <= rounding, "value " + i + ": host " + host[i] + ", network " + net);
            differ += Math.abs(unitMetric[i] - net) > rounding ? 1 : 0;
        }
        assertTrue(differ > 0, "the metric made no difference, so this check shows nothing");

        File file = dir.resolve("limits.zip").toFile();
        ModelSerializer.writeModel(g, file, false);
        ComputationGraph back = ModelSerializer.restoreComputationGraph(file, false);
        float[] again = back.outputSingle(data.getFeatures()).castTo(DataType.FLOAT).dup('c').data().asFloat();
        assertArrayEquals(yn, again);
        assertTrue(c.laws().limits().size() == 2, "the reloaded network's law text keeps its limits");
        assertTrue(((LawVertex) back.getConfiguration().getVertices().get(ConstrainedGraph.LAWS)).lawCompletion()
                .laws().limits().size() == 2);
    }
}
