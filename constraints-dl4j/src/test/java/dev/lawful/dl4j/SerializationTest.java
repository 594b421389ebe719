package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawException;
import java.io.ByteArrayOutputStream;
import java.io.File;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Enumeration;
import java.util.SplittableRandom;
import java.util.zip.ZipEntry;
import java.util.zip.ZipFile;
import java.util.zip.ZipOutputStream;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.Adam;

/**
 * Save and load with ModelSerializer: the law text is readable in the saved JSON configuration, outputs after
 * loading are bit-identical, and a saved file whose law text was corrupted reports the law language's diagnostics.
 */
class SerializationTest {
    @TempDir
    Path dir;

    private static MultiLayerNetwork trainedLayerNet() {
        MultiLayerNetwork net = TestNets.mln(LawLayer.of(TestNets.CONSTANT_AFFINE), 3, 8, 2, DataType.FLOAT,
                new Adam(1e-2), 7);
        SplittableRandom r = new SplittableRandom(7);
        INDArray in = TestNets.array(TestNets.uniform(r, 16, 3, -1, 1), DataType.FLOAT);
        INDArray labels = TestNets.array(TestNets.uniform(r, 16, 4, -1, 1), DataType.FLOAT);
        for (int i = 0; i < 3; i++) {
            net.fit(in, labels);
        }
        return net;
    }

    private static ComputationGraph trainedGraph() {
        ComputationGraph g = ConstrainedGraph.builder(LawSpec.of(TestNets.X_AFFINE)).hidden(8).seed(9).build();
        SplittableRandom r = new SplittableRandom(9);
        INDArray in = TestNets.array(TestNets.uniform(r, 16, 2, 0.5, 1.5), DataType.FLOAT);
        INDArray labels = TestNets.array(TestNets.uniform(r, 16, 3, -1, 1), DataType.FLOAT);
        for (int i = 0; i < 3; i++) {
            g.fit(new INDArray[] {in}, new INDArray[] {labels});
        }
        return g;
    }

    private static String configurationJson(File zip) throws IOException {
        try (ZipFile z = new ZipFile(zip)) {
            try (InputStream in = z.getInputStream(z.getEntry("configuration.json"))) {
                return new String(in.readAllBytes(), StandardCharsets.UTF_8);
            }
        }
    }

    /** Rewrites {@code from} into {@code to} with the configuration JSON passed through {@code edit}. */
    private static void rewrite(File from, File to, java.util.function.UnaryOperator<String> edit) throws IOException {
        try (ZipFile z = new ZipFile(from); OutputStream os = Files.newOutputStream(to.toPath());
             ZipOutputStream out = new ZipOutputStream(os)) {
            Enumeration<? extends ZipEntry> entries = z.entries();
            while (entries.hasMoreElements()) {
                ZipEntry e = entries.nextElement();
                byte[] bytes;
                try (InputStream in = z.getInputStream(e)) {
                    bytes = in.readAllBytes();
                }
                if (e.getName().equals("configuration.json")) {
                    String json = new String(bytes, StandardCharsets.UTF_8);
                    String edited = edit.apply(json);
                    assertTrue(!edited.equals(json), "the edit must change the configuration");
                    bytes = edited.getBytes(StandardCharsets.UTF_8);
                }
                out.putNextEntry(new ZipEntry(e.getName()));
                out.write(bytes);
                out.closeEntry();
            }
        }
    }

    @Test
    void aMultiLayerNetworkRoundTripKeepsTheLawsAndTheOutputs() throws IOException {
        MultiLayerNetwork net = trainedLayerNet();
        File file = dir.resolve("layer.zip").toFile();
        ModelSerializer.writeModel(net, file, true);
        String json = configurationJson(file);
        assertTrue(json.contains("\"lawText\""), json);
        assertTrue(json.contains("law total: sum(y) = 1"), "the law text is readable in the saved JSON");
        MultiLayerNetwork loaded = ModelSerializer.restoreMultiLayerNetwork(file);
        assertEquals(net.getLayerWiseConfigurations(), loaded.getLayerWiseConfigurations());
        assertEquals(LawSpec.of(TestNets.CONSTANT_AFFINE), ((LawLayer) loaded.getLayerWiseConfigurations().getConf(2)
                .getLayer()).getSpec());
        INDArray in = TestNets.array(TestNets.uniform(new SplittableRandom(70), 32, 3, -2, 2), DataType.FLOAT);
        assertArrayEquals(TestNets.flat(net.output(in)), TestNets.flat(loaded.output(in)), 0.0);
    }

    @Test
    void aComputationGraphRoundTripKeepsTheLawsAndTheOutputs() throws IOException {
        ComputationGraph g = trainedGraph();
        File file = dir.resolve("graph.zip").toFile();
        ModelSerializer.writeModel(g, file, true);
        String json = configurationJson(file);
        assertTrue(json.contains("law weighted: (1 + a[0]^2)*y[2] + a[1]*y[0] = y[1] + 1"),
                "the law text is readable in the saved JSON");
        ComputationGraph loaded = ModelSerializer.restoreComputationGraph(file);
        assertEquals(g.getConfiguration(), loaded.getConfiguration());
        INDArray in = TestNets.array(TestNets.uniform(new SplittableRandom(90), 32, 2, 0.5, 1.5), DataType.FLOAT);
        assertArrayEquals(TestNets.flat(g.outputSingle(in)), TestNets.flat(loaded.outputSingle(in)), 0.0);
    }

    @Test
    void aCorruptedLawTextInASavedNetworkGivesTheLawDiagnostics() throws IOException {
        File file = dir.resolve("good.zip").toFile();
        ModelSerializer.writeModel(trainedLayerNet(), file, true);
        File bad = dir.resolve("bad.zip").toFile();
        rewrite(file, bad, json -> json.replace("sum(y) = 1", "summ(y) = 1"));
        LawException e = assertThrows(LawException.class, () -> ModelSerializer.restoreMultiLayerNetwork(bad));
        // the law language's own diagnostic, position and caret included (not a Jackson or Deeplearning4j trace)
        assertEquals("<network>:2:12: unknown function 'summ'; did you mean 'sum'?\n"
                + "law total: summ(y) = 1\n"
                + "           ^^^^^^^", e.getMessage());
    }

    @Test
    void aCorruptedLawTextInASavedGraphGivesTheLawDiagnostics() throws IOException {
        File file = dir.resolve("good-graph.zip").toFile();
        ModelSerializer.writeModel(trainedGraph(), file, true);
        File bad = dir.resolve("bad-graph.zip").toFile();
        rewrite(file, bad, json -> json.replace("law weighted:", "law weighted"));
        LawException e = assertThrows(LawException.class, () -> ModelSerializer.restoreComputationGraph(bad));
        assertEquals("<network>:3:14: expected ':' after the law's name, found '('\n"
                + "law weighted (1 + a[0]^2)*y[2] + a[1]*y[0] = y[1] + 1\n"
                + "             ^", e.getMessage());
    }
}
