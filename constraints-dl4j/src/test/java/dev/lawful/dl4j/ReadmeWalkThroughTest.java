package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.ResidualReport;
import dev.lawful.enforce.RoundingBound;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.factory.Nd4j;

/**
 * The README's walk-through "from an empty project to a trained, saved and reloaded constrained network", run as
 * written: the code between the markers below is the README's code block, character for character (checked here), and
 * its result is checked: the loss falls, the reloaded network gives bit-identical outputs, and every sample obeys
 * the law within the completion's documented float bound in physical units.
 */
class ReadmeWalkThroughTest {

    @Test
    void theWalkThroughTrainsSavesAndReloadsAConstrainedNetwork(@TempDir Path temp) throws Exception {
        // walk-through:start
        String lawText = String.join("\n",
                "# a pipe junction: the water that flows in flows out",
                "input  q_in[2]   L/s     # the two inflows",
                "output q_out[3]  L/s     # the three outflows",
                "law volume: sum(q_out) = sum(q_in)",
                "complete q_out[2]",
                "");
        LawSpec spec = LawSpec.of(lawText);
        List<Double> losses = new ArrayList<>();                       // the training loss after each epoch
        File folder = Files.createTempDirectory("junction").toFile();  // where the network is saved

        // your data: features are the law inputs, labels all outputs, both in declared order and units
        // (made up here: the split between the outflows depends on the inflows)
        int rows = 1024;
        double[][] x = new double[rows][];
        double[][] y = new double[rows][];
        Random random = new Random(1);
        for (int s = 0; s < rows; s++) {
            double a = 1 + random.nextDouble();
            double b = 2 * random.nextDouble();
            double share = 0.2 + 0.3 * a / (a + b);
            x[s] = new double[] {a, b};
            y[s] = new double[] {share * (a + b), 0.3 * (a + b), (0.7 - share) * (a + b)};
        }
        DataSet data = new DataSet(Nd4j.create(x).castTo(DataType.FLOAT), Nd4j.create(y).castTo(DataType.FLOAT));
        DataSet physical = data.copy();

        // normalise features and labels, and fold the statistics into the network
        NormalizerStandardize normalizer = new NormalizerStandardize();
        normalizer.fitLabel(true);
        normalizer.fit(data);
        normalizer.preProcess(data);
        ComputationGraph net = ConstrainedGraph.builder(spec).hidden(32, 32).seed(7)
                .normalizedWith(normalizer).build();

        // train: the law vertex completes q_out[2], so every output obeys the law at every step
        for (int epoch = 0; epoch < 150; epoch++) {
            net.fit(data);
            losses.add(net.score());
        }

        // save (the law text and the normaliser's statistics travel inside the file) and reload
        File file = new File(folder, "junction.zip");
        ModelSerializer.writeModel(net, file, false);
        ComputationGraph reloaded = ModelSerializer.restoreComputationGraph(file);

        // predict, back in physical units, and check the law on every sample
        INDArray predicted = reloaded.outputSingle(data.getFeatures());
        normalizer.revertLabels(predicted);
        float[] flowsIn = physical.getFeatures().dup('c').data().asFloat();
        float[] flowsOut = predicted.dup('c').data().asFloat();
        ResidualReport report = ResidualReport.of(spec.lawSet(), flowsIn, flowsOut, rows, 1e-6);
        String table = report.toTable();           // largest, mean and 99th-percentile residual of each law
        // walk-through:end

        file.deleteOnExit();
        folder.deleteOnExit();
        assertTrue(losses.get(losses.size() - 1) < 0.2 * losses.get(0), "the loss falls: " + losses.get(0)
                + " -> " + losses.get(losses.size() - 1));
        INDArray before = net.outputSingle(data.getFeatures());
        INDArray after = reloaded.outputSingle(data.getFeatures());
        assertArrayEquals(before.data().asFloat(), after.data().asFloat(), "bit-identical after reloading");
        assertTrue(report.withinTolerance(), report.toTable());
        // the stricter promise: the documented float bound (Source: constraints-core Completion class documentation,
        // "Exactness"), judged on the network's own normalised outputs mapped to physical units in double, against the
        // inputs as the law vertex saw them (the normalised float features mapped back in double)
        LawVertex vertex = (LawVertex) reloaded.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
        Completion c = spec.completion();
        double[] yn = TestNets.flat(after);
        double[] seen = vertex.getInputScaling().toPhysical(TestNets.flat(data.getFeatures()), rows);
        double[] residuals = new double[rows];
        double[] bounds = new double[rows];
        int outside = RoundingBound.of(c).evaluate(seen, null, vertex.getOutputScaling().toPhysical(yn, rows), rows,
                vertex.getOutputScaling().floatOutputError(yn, rows), residuals, bounds);
        assertEquals(0, outside, "samples outside the documented bound");
    }

    /**
     * The README's import block and code block, pasted alone into a method of an empty class, compile: the block uses
     * nothing it does not declare (a reader pasting it gets no undefined names). Compiled with the JDK's own compiler
     * (javax.tools) against the test class path.
     */
    @Test
    void theReadmeBlockCompilesAlone(@TempDir Path temp) throws IOException {
        String readme = Files.readString(Path.of("../README.md"), StandardCharsets.UTF_8);
        int imports = readme.indexOf("// the walk-through's imports");
        String importBlock = readme.substring(imports, readme.indexOf("```", imports));
        int code = readme.indexOf("```java", readme.indexOf("```", imports) + 3) + "```java".length();
        String block = readme.substring(code, readme.indexOf("```", code));
        String source = importBlock + "\npublic class Pasted {\n    public static void main(String[] args) throws"
                + " Exception {\n" + block + "\n    }\n}\n";
        Path file = Files.writeString(temp.resolve("Pasted.java"), source, StandardCharsets.UTF_8);
        javax.tools.JavaCompiler compiler = javax.tools.ToolProvider.getSystemJavaCompiler();
        java.io.StringWriter messages = new java.io.StringWriter();
        int status = compiler.run(null, null, new java.io.PrintStream(new java.io.ByteArrayOutputStream()) {
            @Override
            public void write(byte[] b, int off, int len) {
                messages.write(new String(b, off, len, StandardCharsets.UTF_8));
            }
        }, "-d", temp.toString(), "-classpath", classPath(), file.toString());
        assertEquals(0, status, "the README block does not compile alone:\n" + messages + "\n" + source);
    }

    @Test
    void theReadmeShowsExactlyThisCode() throws IOException {
        String test = Files.readString(Path.of("src/test/java/dev/lawful/dl4j/ReadmeWalkThroughTest.java"),
                StandardCharsets.UTF_8);
        String readme = Files.readString(Path.of("../README.md"), StandardCharsets.UTF_8);
        String region = test.substring(test.indexOf("// walk-through:start\n") + "// walk-through:start\n".length(),
                test.indexOf("        // walk-through:end"));
        StringBuilder dedented = new StringBuilder();
        for (String line : region.split("\n", -1)) {
            dedented.append(line.startsWith("        ") ? line.substring(8) : line).append('\n');
        }
        String code = dedented.toString().stripTrailing() + "\n";
        assertTrue(readme.contains(code), "README.md must contain the walk-through code exactly as this test runs it;"
                + " copy the region between the walk-through markers of this test into the README's code block");
        int imports = readme.indexOf("// the walk-through's imports");
        assertTrue(imports > 0, "README.md must list the walk-through's imports");
        String block = readme.substring(imports, readme.indexOf("```", imports));
        // the test lives in dev.lawful.dl4j, so it needs no imports from that package
        for (String line : block.split("\n")) {
            if (line.startsWith("import ") && !line.startsWith("import dev.lawful.dl4j.")) {
                assertTrue(test.contains("\n" + line + "\n"), "README import not used by the test: " + line);
            }
        }
    }

    /**
     * The test's class path as javac needs it: {@code java.class.path}, or, when Surefire runs the tests from a
     * manifest-only jar, the entries of that jar's {@code Class-Path} (file URLs, per the JAR file specification).
     */
    private static String classPath() throws IOException {
        String path = System.getProperty("java.class.path");
        if (path.contains(java.io.File.pathSeparator) || !path.endsWith(".jar")) {
            return path;
        }
        try (java.util.jar.JarFile jar = new java.util.jar.JarFile(path)) {
            String entries = jar.getManifest() == null ? null
                    : jar.getManifest().getMainAttributes().getValue("Class-Path");
            if (entries == null) {
                return path;
            }
            List<String> files = new ArrayList<>();
            for (String entry : entries.trim().split("\\s+")) {
                files.add(Path.of(java.net.URI.create(entry)).toString());
            }
            return String.join(java.io.File.pathSeparator, files);
        }
    }
}
