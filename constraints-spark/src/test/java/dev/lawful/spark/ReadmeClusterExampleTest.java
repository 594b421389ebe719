package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.File;
import java.io.IOException;
import java.nio.file.Path;
import java.util.Random;

import dev.lawful.dl4j.ConstrainedGraph;
import dev.lawful.dl4j.LawSpec;
import dev.lawful.dl4j.LawVertex;
import dev.lawful.enforce.ResidualReport;
import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.spark.impl.graph.SparkComputationGraph;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.factory.Nd4j;

/**
 * The README's "Training on a cluster" example, run as written: the code between the markers below is the README's
 * code block, character for character (checked here). Run directly it trains on two local threads; its result is
 * checked: the loss falls, the reloaded network gives bit-identical outputs, and every sample obeys the law within
 * the completion's documented float bound in physical units.
 */
class ReadmeClusterExampleTest {
    @Test
    void theClusterExampleTrainsSavesAndReloadsAConstrainedNetwork(@TempDir Path temp) throws Exception {
        File folder = temp.toFile();
        try {
            // cluster-example:start
            String lawText = String.join("\n",
                    "# a reservoir over one time step: what flows in and is neither released nor evaporated is stored",
                    "input  inflow   m3/s",
                    "input  dt       s",
                    "output release  m3/s",
                    "output evap     m3/s",
                    "output stored   m3",
                    "law water: stored = (inflow - release - evap) * dt",
                    "complete stored",
                    "");
            LawSpec spec = LawSpec.of(lawText);

            // run directly: two local threads; under spark-submit the master comes from --master
            SparkConf conf = new SparkConf().setAppName("reservoir").setIfMissing("spark.master", "local[2]");
            JavaSparkContext sc = LawfulSpark.context(conf);     // checks the JVM flags, sets what the laws need

            // your data (made up here); on a cluster, read it from storage on the executors instead
            int rows = 1024;
            double[][] x = new double[rows][];
            double[][] y = new double[rows][];
            Random random = new Random(1);
            for (int s = 0; s < rows; s++) {
                double inflow = 1 + 2 * random.nextDouble();
                double dt = 60 + 540 * random.nextDouble();
                double release = 0.6 * inflow + 0.1 * Math.sin(3 * inflow);
                double evap = 0.01 + 0.002 * inflow;
                x[s] = new double[] {inflow, dt};
                y[s] = new double[] {release, evap, (inflow - release - evap) * dt};
            }
            DataSet data = new DataSet(Nd4j.create(x).castTo(DataType.FLOAT), Nd4j.create(y).castTo(DataType.FLOAT));
            DataSet physical = data.copy();
            NormalizerStandardize normalizer = new NormalizerStandardize();
            normalizer.fitLabel(true);
            normalizer.fit(data);
            normalizer.preProcess(data);

            // the training set as an RDD of data sets of 32 examples; each worker fits minibatches of 32, and the
            // driver averages the workers' parameters after every fourth
            JavaRDD<DataSet> rdd = sc.parallelize(data.batchBy(32));
            ComputationGraph net = ConstrainedGraph.builder(spec).hidden(32, 32).seed(7)
                    .normalizedWith(normalizer).build();
            SparkComputationGraph spark = LawfulSpark.graph(sc, net,
                    LawfulSpark.parameterAveraging(32, 32).averagingFrequency(4).build());
            double before = spark.calculateScore(rdd, true);    // the mean loss over the data, on the executors
            for (int epoch = 0; epoch < 10; epoch++) {
                spark.fit(rdd);
            }
            double after = spark.calculateScore(rdd, true);
            sc.stop();

            // the trained network is on the driver: save it as on one machine (laws and statistics inside)
            ComputationGraph trained = spark.getNetwork();
            File file = new File(folder, "reservoir.zip");
            ModelSerializer.writeModel(trained, file, false);
            ComputationGraph reloaded = ModelSerializer.restoreComputationGraph(file);

            // predict in physical units and check the law on every sample
            INDArray predicted = reloaded.outputSingle(data.getFeatures());
            normalizer.revertLabels(predicted);
            float[] in = physical.getFeatures().dup('c').data().asFloat();
            float[] out = predicted.dup('c').data().asFloat();
            ResidualReport report = ResidualReport.of(spec.lawSet(), in, out, rows, 1e-6);
            // cluster-example:end

            assertTrue(after < 0.1 * before, "the loss falls: " + before + " -> " + after);
            INDArray original = trained.outputSingle(data.getFeatures());
            INDArray again = reloaded.outputSingle(data.getFeatures());
            assertArrayEquals(original.data().asFloat(), again.data().asFloat(), "bit-identical after reloading");
            assertTrue(report.withinTolerance(), report.toTable());
            assertEquals(rows, report.samples());
            // the stricter promise, the documented float bound, on the network's own normalised outputs mapped to
            // physical units in double, at the inputs the law vertex saw (the normalised float features mapped back)
            LawVertex vertex = (LawVertex) reloaded.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
            double[] seen = vertex.getInputScaling().toPhysical(SparkTests.flat(data.getFeatures()), rows);
            SparkTests.assertWithinDocumentedBound(vertex.lawCompletion(), seen, vertex.getOutputScaling(), again);
        } finally {
            SparkTests.stopActiveContext();
        }
    }

    @Test
    void theReadmeShowsExactlyThisCode() throws IOException {
        ReadmeCode.assertShown("ReadmeClusterExampleTest", "cluster-example", "// the cluster example's imports");
    }
}
