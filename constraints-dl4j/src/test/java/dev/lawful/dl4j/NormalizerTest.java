package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.SplittableRandom;
import java.util.zip.ZipFile;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.api.function.Executable;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.dataset.api.preprocessor.ImagePreProcessingScaler;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerMinMaxScaler;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.learning.config.Adam;

/**
 * Folding Deeplearning4j normalizers into law layers and vertices: the folded statistics match the normalizer's own
 * transform, a normalizer that does not fit the law set is refused with a message that says what to change (tested
 * word for word), configurations compare by value, and a ModelSerializer round trip keeps the folded statistics
 * bit for bit.
 */
class NormalizerTest {
    @TempDir
    Path dir;

    /** @return a DataSet of uniform values in [0.5, 1.5) times the given column scales, in double */
    private static DataSet data(long seed, double[] featureScales, double[] labelScales) {
        SplittableRandom r = new SplittableRandom(seed);
        double[][] f = new double[32][featureScales.length];
        double[][] l = new double[32][labelScales.length];
        for (int s = 0; s < 32; s++) {
            for (int j = 0; j < f[s].length; j++) {
                f[s][j] = (0.5 + r.nextDouble()) * featureScales[j];
            }
            for (int j = 0; j < l[s].length; j++) {
                l[s][j] = (0.5 + r.nextDouble()) * labelScales[j];
            }
        }
        return new DataSet(TestNets.array(f, DataType.DOUBLE), TestNets.array(l, DataType.DOUBLE));
    }

    private static <N extends DataNormalization> N fitted(N normalizer, DataSet data) {
        normalizer.fitLabel(true);
        normalizer.fit(data);
        return normalizer;
    }

    private static void refused(String expected, Executable call) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, call);
        assertEquals(expected, e.getMessage());
    }

    @Test
    void theFoldedStatisticsReproduceTheNormalizersOwnTransform() {
        DataSet d = data(1, new double[] {1e3, 1e-2}, new double[] {1e3, 1e-2, 5});
        DataNormalization[] normalizers = {fitted(new NormalizerStandardize(), d),
            fitted(new NormalizerMinMaxScaler(), d), fitted(new NormalizerMinMaxScaler(-1, 1), d)};
        for (DataNormalization n : normalizers) {
            LawVertex v = LawVertex.of(TestNets.X_AFFINE).normalizedWith(n);
            INDArray features = d.getFeatures().dup();
            INDArray labels = d.getLabels().dup();
            // Source: Deeplearning4j 1.0.0-M2.1 NormalizerStandardize / NormalizerMinMaxScaler transform
            n.transform(features);
            n.transformLabel(labels);
            double[] xn = v.getInputScaling().toNormalised(TestNets.flat(d.getFeatures()), 32);
            double[] yn = v.getOutputScaling().toNormalised(TestNets.flat(d.getLabels()), 32);
            assertArrayEquals(TestNets.flat(features), xn, 1e-12, n.getClass().getSimpleName());
            assertArrayEquals(TestNets.flat(labels), yn, 1e-12, n.getClass().getSimpleName());
            double[] back = v.getOutputScaling().toPhysical(yn, 32);
            double[] physical = TestNets.flat(d.getLabels());
            for (int i = 0; i < back.length; i++) {
                assertEquals(physical[i], back[i], 1e-12 * Math.abs(physical[i]));
            }
        }
        NormalizerStandardize s = (NormalizerStandardize) normalizers[0];
        Scaling out = LawLayer.of(TestNets.AFFINE_FREE).normalizedWith(s).getOutputScaling();
        assertArrayEquals(TestNets.flat(s.getLabelStd()), out.getScale(), 0.0);
        assertArrayEquals(TestNets.flat(s.getLabelMean()), out.getOffset(), 0.0);
    }

    @Test
    void withoutANormalizerNothingChangesAndFoldingLeavesTheOriginalAlone() {
        DataSet d = data(2, new double[] {1, 1, 1}, new double[] {1e3, 1e-2, 5, 7});
        LawLayer plain = LawLayer.of(TestNets.CONSTANT_AFFINE);
        LawLayer folded = plain.normalizedWith(fitted(new NormalizerStandardize(), d));
        LawLayer again = plain.normalizedWith(fitted(new NormalizerStandardize(), d));
        assertNull(plain.getOutputScaling());
        assertEquals(LawLayer.of(TestNets.CONSTANT_AFFINE), plain);
        assertNotEquals(plain, folded);
        assertEquals(folded, again);
        assertEquals(folded.hashCode(), again.hashCode());
        assertEquals(folded, folded.clone());
        assertNotEquals(folded, plain.normalizedWith(fitted(new NormalizerMinMaxScaler(), d)));
        LawVertex v = LawVertex.of(TestNets.X_AFFINE);
        DataSet dx = data(3, new double[] {1, 2}, new double[] {1, 2, 3});
        assertNull(v.getInputScaling());
        assertEquals(v.normalizedWith(fitted(new NormalizerStandardize(), dx)),
                v.normalizedWith(fitted(new NormalizerStandardize(), dx)).clone());
        assertNotEquals(v, v.normalizedWith(fitted(new NormalizerStandardize(), dx)));
    }

    @Test
    void aNormalizerThatDoesNotNormaliseLabelsIsRefused() {
        NormalizerStandardize n = new NormalizerStandardize();
        n.fit(data(4, new double[] {1, 1}, new double[] {1, 1, 1, 1}));
        refused("law layer: the normalizer does not normalise labels (fitLabel is false), but the laws relate the"
                + " outputs, and their physical values are needed to complete them; call normalizer.fitLabel(true)"
                + " before normalizer.fit(...), so that the labels are normalised too",
                () -> LawLayer.of(TestNets.CONSTANT_AFFINE).normalizedWith(n));
        n.fitLabel(true);
        refused("law layer: the normalizer has no label statistics; call normalizer.fitLabel(true), then"
                + " normalizer.fit(...) on the training data",
                () -> LawLayer.of(TestNets.CONSTANT_AFFINE).normalizedWith(n));
    }

    @Test
    void aLabelCountOtherThanTheNumberOfOutputsIsRefused() {
        NormalizerMinMaxScaler n = fitted(new NormalizerMinMaxScaler(),
                data(5, new double[] {1, 1}, new double[] {1, 1, 1, 1, 1}));
        refused("law layer: the normalizer's labels have 5 columns but the law set declares 4 outputs (y[0], y[1],"
                + " y[2], y[3]); fit the normalizer on labels that hold every output in declared order",
                () -> LawLayer.of(TestNets.CONSTANT_AFFINE).normalizedWith(n));
    }

    @Test
    void aFeatureCountOtherThanTheNumberOfLawInputsIsRefused() {
        NormalizerStandardize n = fitted(new NormalizerStandardize(),
                data(6, new double[] {1, 1, 1}, new double[] {1, 1, 1}));
        String expected = "law vertex: the normalizer's features have 3 columns but the law set declares 2 inputs"
                + " (a[0], a[1]); fit the normalizer on features that hold the law inputs in declared order";
        refused(expected, () -> LawVertex.of(TestNets.X_AFFINE).normalizedWith(n));
        refused(expected, () -> ConstrainedGraph.builder(LawSpec.of(TestNets.X_AFFINE)).normalizedWith(n));
    }

    @Test
    void aConstantColumnThatCannotBeMappedBackIsRefused() {
        DataSet d = data(7, new double[] {1, 1}, new double[] {1, 1, 1, 1});
        d.getLabels().getColumn(2).assign(2.5);
        NormalizerStandardize s = fitted(new NormalizerStandardize(), d);
        refused("law layer: label column 2 (y[2]) has mean 2.5 and standard deviation 1.0E-5 in the normalizer; a"
                + " standard deviation at or below 1.0E-5 (the floor Deeplearning4j puts under a zero one) means the"
                + " column is constant in the data the normalizer was fitted on, so its normalised values cannot be"
                + " mapped back to physical units; fit the normalizer on data in which y[2] varies, or declare y[2]"
                + " in a smaller unit", () -> LawLayer.of(TestNets.CONSTANT_AFFINE).normalizedWith(s));
        DataSet dx = data(8, new double[] {1, 1}, new double[] {1, 1, 1});
        dx.getFeatures().getColumn(1).assign(0.25);
        NormalizerMinMaxScaler m = fitted(new NormalizerMinMaxScaler(), dx);
        refused("law vertex: feature column 1 (a[1]) has min 0.25 and max 0.25001 in the normalizer; a range (max -"
                + " min) of about 1.0E-5 or less (what Deeplearning4j makes of a zero range) means the column is"
                + " constant in the data the normalizer was fitted on, so its normalised values cannot be mapped back"
                + " to physical units; fit the normalizer on data in which a[1] varies, or declare a[1] in a smaller"
                + " unit",
                () -> LawVertex.of(TestNets.X_AFFINE).normalizedWith(m));
    }

    @Test
    void otherNormalizerKindsAreRefused() {
        refused("law layer: a normalizer of type ImagePreProcessingScaler cannot be folded into the laws; use"
                + " NormalizerStandardize or NormalizerMinMaxScaler",
                () -> LawLayer.of(TestNets.CONSTANT_AFFINE).normalizedWith(new ImagePreProcessingScaler()));
    }

    private static String configurationJson(File zip) throws IOException {
        try (ZipFile z = new ZipFile(zip); InputStream in = z.getInputStream(z.getEntry("configuration.json"))) {
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
    }

    private static void assertBitIdentical(Scaling expected, Scaling actual) {
        for (int j = 0; j < expected.width(); j++) {
            assertEquals(Double.doubleToRawLongBits(expected.scale(j)), Double.doubleToRawLongBits(actual.scale(j)));
            assertEquals(Double.doubleToRawLongBits(expected.offset(j)),
                    Double.doubleToRawLongBits(actual.offset(j)));
        }
        assertEquals(expected.width(), actual.width());
    }

    @Test
    void aModelSerializerRoundTripKeepsTheFoldedStatisticsBitForBit() throws IOException {
        // statistics with full-length binary fractions, so that a lossy decimal would show
        DataSet d = data(10, new double[] {1, 1, 1}, new double[] {1e3 / 3, 1e-2 / 7, 5, 7});
        LawLayer layer = LawLayer.of(TestNets.CONSTANT_AFFINE).normalizedWith(fitted(new NormalizerStandardize(), d));
        MultiLayerNetwork net = TestNets.mln(layer, 3, 8, 2, DataType.FLOAT, new Adam(1e-2), 7);
        INDArray in = TestNets.array(TestNets.uniform(new SplittableRandom(11), 16, 3, -1, 1), DataType.FLOAT);
        net.fit(in, TestNets.array(TestNets.uniform(new SplittableRandom(12), 16, 4, -1, 1), DataType.FLOAT));
        File file = dir.resolve("layer.zip").toFile();
        ModelSerializer.writeModel(net, file, true);
        assertTrue(configurationJson(file).contains("\"outputScaling\""));
        MultiLayerNetwork loaded = ModelSerializer.restoreMultiLayerNetwork(file);
        assertEquals(net.getLayerWiseConfigurations(), loaded.getLayerWiseConfigurations());
        LawLayer back = (LawLayer) loaded.getLayerWiseConfigurations().getConf(2).getLayer();
        assertBitIdentical(layer.getOutputScaling(), back.getOutputScaling());
        assertArrayEquals(TestNets.flat(net.output(in)), TestNets.flat(loaded.output(in)), 0.0);

        DataSet dx = data(13, new double[] {1e3 / 3, 1e-2 / 7}, new double[] {1, 1e3 / 9, 1e-2 / 11});
        ComputationGraph g = ConstrainedGraph.builder(LawSpec.of(TestNets.X_AFFINE))
                .normalizedWith(fitted(new NormalizerMinMaxScaler(-1, 1), dx)).hidden(8).seed(9).build();
        INDArray x = TestNets.array(TestNets.uniform(new SplittableRandom(14), 16, 2, -1, 1), DataType.FLOAT);
        g.fit(new INDArray[] {x}, new INDArray[] {TestNets.array(TestNets.uniform(new SplittableRandom(15), 16, 3,
                -1, 1), DataType.FLOAT)});
        File gfile = dir.resolve("graph.zip").toFile();
        ModelSerializer.writeModel(g, gfile, true);
        assertTrue(configurationJson(gfile).contains("\"inputScaling\""));
        ComputationGraph gl = ModelSerializer.restoreComputationGraph(gfile);
        assertEquals(g.getConfiguration(), gl.getConfiguration());
        LawVertex v = (LawVertex) g.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
        LawVertex vl = (LawVertex) gl.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
        assertBitIdentical(v.getInputScaling(), vl.getInputScaling());
        assertBitIdentical(v.getOutputScaling(), vl.getOutputScaling());
        assertArrayEquals(TestNets.flat(g.outputSingle(x)), TestNets.flat(gl.outputSingle(x)), 0.0);
    }
}
