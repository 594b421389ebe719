package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.dl4j.ConstrainedGraph;
import dev.lawful.dl4j.LawLayer;
import dev.lawful.dl4j.LawOutputLayer;
import dev.lawful.dl4j.LawSpec;
import dev.lawful.dl4j.LawVertex;
import dev.lawful.enforce.Completion;
import java.io.File;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.deeplearning4j.nn.api.Model;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.WorkspaceMode;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.Layer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.weights.WeightInit;
import org.deeplearning4j.spark.api.Repartition;
import org.deeplearning4j.spark.api.RepartitionStrategy;
import org.deeplearning4j.spark.api.TrainingMaster;
import org.deeplearning4j.spark.impl.graph.SparkComputationGraph;
import org.deeplearning4j.spark.impl.multilayer.SparkDl4jMultiLayer;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.indexing.NDArrayIndex;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.learning.config.Sgd;
import org.nd4j.linalg.lossfunctions.LossFunctions;
import scala.Tuple2;

/**
 * The checks every Spark master must pass with Lawful's law layers, run by a subclass per master: networks with a
 * {@link LawLayer}, a {@link LawOutputLayer} and a {@link LawVertex} (the layer and vertex with normalizer folding)
 * train with parameter averaging; the loss falls; every output obeys the laws within the documented float bound; the
 * outputs the executors compute (each executor rebuilds the law layer's completion and buffers from the
 * configuration) equal the driver's bit for bit; the network saved on the driver reloads bit-identically; and one
 * averaging round of plain SGD equals the same step trained on one machine.
 */
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
abstract class DistributedTrainingChecks {
    /** No inputs, constant coefficients; the free outputs differ in scale by five orders of magnitude. */
    static final String BALANCES = "output y[4]\n"
            + "law total: sum(y) = 1000\n"
            + "law balance: y[0] - 2*y[1] = y[3]\n"
            + "complete y[2], y[3]\n";
    /** No inputs; the completed output's coefficient depends on a free output (affine tier). */
    static final String RATIO = "output y[3]\n"
            + "law ratio: (1 + y[0]^2)*y[2] = y[1] + 2\n"
            + "complete y[2]\n";
    /** A coefficient from a large-scale input, another from a small-scale one (affine tier). */
    static final String WEIGHTED = "input a[2]\noutput y[3]\n"
            + "law weighted: a[1]*y[2] = a[0]*y[0] + y[1]\n"
            + "complete y[2]\n";
    /** Quadratic in the completed output, with inputs (nonlinear tier); the guess picks the positive root. */
    static final String NORM = "input a[2]\noutput y[2]\n"
            + "law norm: y[1]^2 = a[0]^2 + (a[1]*y[0])^2 + 1\n"
            + "guess y[1] = a[0]^2 + (a[1]*y[0])^2 + 1\n"
            + "complete y[1]\n";

    static final int ROWS = 256;
    static final int EPOCHS = 20;
    /** Examples per data set of the training RDDs, and per minibatch on a worker. */
    static final int BATCH = 32;

    JavaSparkContext sc;

    /** @return the Spark configuration the checks run with (master, serializer) */
    abstract SparkConf conf();

    @BeforeAll
    void start() {
        sc = LawfulSpark.context(conf());
    }

    @AfterAll
    void stop() {
        if (sc != null) {
            sc.stop();
        }
    }

    /** The executors' count: Deeplearning4j's parameter averaging runs one worker per default parallelism slot. */
    int workers() {
        return sc.defaultParallelism();
    }

    @Test
    void aNormalisedLawLayerNetworkTrainsWithParameterAveraging(@TempDir Path temp) throws Exception {
        SplittableRandom r = new SplittableRandom(61);
        double[][] u = uniform(r, ROWS, 2, -1, 1);
        double[][] t = new double[ROWS][4];
        for (int s = 0; s < ROWS; s++) {
            t[s][0] = 1000 * (1 + 0.5 * Math.sin(u[s][0] + u[s][1]));
            t[s][1] = 0.01 * (1 + u[s][0] * u[s][1]);
            t[s][3] = t[s][0] - 2 * t[s][1];
            t[s][2] = 1000 - t[s][0] - t[s][1] - t[s][3];
        }
        DataSet data = floats(u, t);
        NormalizerStandardize normalizer = normaliseWithLabels(data);
        LawLayer layer = LawLayer.of(BALANCES).normalizedWith(normalizer);
        MultiLayerNetwork net = mln(layer, layer.lawCompletion().freeWidth(), DataType.FLOAT, 62);
        SparkDl4jMultiLayer spark = LawfulSpark.multiLayer(sc, net, adamMaster());

        trainAndSeeTheLossFall(spark::fit, SparkTests.rdd(sc, data, BATCH), () -> net.score(data));
        MultiLayerNetwork trained = spark.getNetwork();

        INDArray out = trained.output(data.getFeatures());
        LawLayer trainedLayer = (LawLayer) trained.getLayerWiseConfigurations().getConf(2).getLayer();
        SparkTests.assertWithinDocumentedBound(trainedLayer.lawCompletion(), null, trainedLayer.getOutputScaling(),
                out);
        assertExecutorsAgree(data.getFeatures(), trained::output, spark::feedForwardWithKey);
        MultiLayerNetwork reloaded = reload(trained, temp, ModelSerializer::restoreMultiLayerNetwork);
        assertEquals(trained.getLayerWiseConfigurations(), reloaded.getLayerWiseConfigurations());
        SparkTests.assertSameFloats(out, reloaded.output(data.getFeatures()), "outputs after reloading");
    }

    @Test
    void aLawOutputLayerNetworkTrainsWithParameterAveraging(@TempDir Path temp) throws Exception {
        SplittableRandom r = new SplittableRandom(71);
        double[][] u = uniform(r, ROWS, 2, -1, 1);
        double[][] t = new double[ROWS][3];
        for (int s = 0; s < ROWS; s++) {
            t[s][0] = Math.sin(u[s][0]);
            t[s][1] = u[s][0] * u[s][1];
            t[s][2] = (t[s][1] + 2) / (1 + t[s][0] * t[s][0]);
        }
        DataSet data = floats(u, t);
        LawOutputLayer layer = LawOutputLayer.of(RATIO);
        Completion c = layer.lawCompletion();
        MultiLayerConfiguration conf = base(DataType.FLOAT, new Adam(2e-2), 72).list()
                .layer(new DenseLayer.Builder().nIn(2).nOut(16).activation(Activation.TANH).build())
                .layer(new DenseLayer.Builder().nIn(16).nOut(c.freeWidth()).activation(Activation.IDENTITY).build())
                .layer(layer)
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        SparkDl4jMultiLayer spark = LawfulSpark.multiLayer(sc, net, adamMaster());

        JavaRDD<DataSet> rdd = SparkTests.rdd(sc, data, BATCH);
        // scored on the executors, by networks they rebuilt from the configuration
        double after = trainAndSeeTheLossFall(spark::fit, rdd, () -> spark.calculateScore(rdd, true));
        assertEquals(spark.getNetwork().score(data), after, 1e-5 * after, "the executors' score is the driver's");

        MultiLayerNetwork trained = spark.getNetwork();
        INDArray out = trained.output(data.getFeatures());
        SparkTests.assertWithinDocumentedBound(c, null, null, out);
        assertExecutorsAgree(data.getFeatures(), trained::output, spark::feedForwardWithKey);
        MultiLayerNetwork reloaded = reload(trained, temp, ModelSerializer::restoreMultiLayerNetwork);
        SparkTests.assertSameFloats(out, reloaded.output(data.getFeatures()), "outputs after reloading");
    }

    @Test
    void aNormalisedLawVertexGraphTrainsWithParameterAveraging(@TempDir Path temp) throws Exception {
        SplittableRandom r = new SplittableRandom(81);
        double[][] a = new double[ROWS][2];
        double[][] t = new double[ROWS][3];
        for (int s = 0; s < ROWS; s++) {
            a[s][0] = 1000 * (0.5 + r.nextDouble());
            a[s][1] = 0.01 * (0.5 + r.nextDouble());
            t[s][0] = Math.sin(a[s][0] / 1000 + 100 * a[s][1]);
            t[s][1] = 1000 * a[s][0] * a[s][1] / 10;
            t[s][2] = (a[s][0] * t[s][0] + t[s][1]) / a[s][1];
        }
        DataSet data = floats(a, t);
        NormalizerStandardize normalizer = normaliseWithLabels(data);
        ComputationGraph net = ConstrainedGraph.builder(LawSpec.of(WEIGHTED)).hidden(16).updater(new Adam(2e-2))
                .seed(82).normalizedWith(normalizer).build();
        SparkComputationGraph spark = LawfulSpark.graph(sc, net, adamMaster());

        trainAndSeeTheLossFall(spark::fit, SparkTests.rdd(sc, data, BATCH), () -> net.score(data));
        ComputationGraph trained = spark.getNetwork();

        INDArray out = trained.outputSingle(data.getFeatures());
        LawVertex vertex = (LawVertex) trained.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
        // the laws are judged at the physical inputs the vertex saw: the float features mapped back in double
        double[] seen = vertex.getInputScaling().toPhysical(SparkTests.flat(data.getFeatures()), ROWS);
        SparkTests.assertWithinDocumentedBound(vertex.lawCompletion(), seen, vertex.getOutputScaling(), out);
        assertExecutorsAgree(data.getFeatures(), trained::outputSingle, spark::feedForwardWithKeySingle);
        ComputationGraph reloaded = reload(trained, temp, ModelSerializer::restoreComputationGraph);
        assertEquals(trained.getConfiguration(), reloaded.getConfiguration());
        SparkTests.assertSameFloats(out, reloaded.outputSingle(data.getFeatures()), "outputs after reloading");
    }

    /**
     * With plain SGD, one minibatch per worker and averaging after every minibatch, parameter averaging is
     * full-batch gradient descent: the average of the workers' steps from the same parameters is one step along the
     * mean of their minibatch gradients, the gradient of the whole batch. So the distributed training must end where
     * Deeplearning4j on one machine ends, taking the same steps on the whole data set (a double network, so the only
     * difference is the order of summation).
     */
    @Test
    void parameterAveragingOfSgdStepsMatchesTrainingOnOneMachine() {
        int batch = 64;
        int rows = batch * workers();
        SplittableRandom r = new SplittableRandom(91);
        double[][] a = uniform(r, rows, 2, -1, 1);
        double[][] t = new double[rows][2];
        for (int s = 0; s < rows; s++) {
            t[s][0] = Math.sin(a[s][0] + a[s][1]);
            t[s][1] = Math.sqrt(a[s][0] * a[s][0] + Math.pow(a[s][1] * t[s][0], 2) + 1);
        }
        DataSet data = new DataSet(Nd4j.createFromArray(a), Nd4j.createFromArray(t));
        ComputationGraph reference = ConstrainedGraph.builder(LawSpec.of(NORM)).hidden(8).updater(new Sgd(0.1))
                .dataType(DataType.DOUBLE).seed(92).build();
        ComputationGraph distributed = reference.clone();
        TrainingMaster<?, ?> master = LawfulSpark.parameterAveraging(batch, batch).averagingFrequency(1)
                .workerPrefetchNumBatches(0).repartionData(Repartition.Always)
                .repartitionStrategy(RepartitionStrategy.Balanced).build();
        SparkComputationGraph spark = LawfulSpark.graph(sc, distributed, master);
        JavaRDD<DataSet> rdd = SparkTests.rdd(sc, data, batch);
        double before = reference.score(data);
        for (int e = 0; e < 5; e++) {
            spark.fit(rdd);
            reference.fit(data);
        }
        // Source: Deeplearning4j 1.0.0-M2.1 ComputationGraph.fit on one machine, the reference
        double[] expected = SparkTests.flat(reference.params());
        double[] actual = SparkTests.flat(spark.getNetwork().params());
        for (int i = 0; i < expected.length; i++) {
            // summation order only: measured 1.4e-16 on local[2] and local-cluster
            assertEquals(expected[i], actual[i], 1e-13 * (1 + Math.abs(expected[i])), "parameter " + i);
        }
        assertTrue(reference.score(data) < before, "the steps lower the loss");
    }

    /**
     * Runs {@link #EPOCHS} epochs of {@code fit} on {@code rdd} and asserts the loss falls at least five times (the
     * training is deterministic: 15, 29 and 70 times for the three networks, on both masters).
     *
     * @return the loss after training
     */
    static double trainAndSeeTheLossFall(java.util.function.Consumer<JavaRDD<DataSet>> fit, JavaRDD<DataSet> rdd,
                                         java.util.function.DoubleSupplier loss) {
        double before = loss.getAsDouble();
        for (int e = 0; e < EPOCHS; e++) {
            fit.accept(rdd);
        }
        double after = loss.getAsDouble();
        assertTrue(after < before / 5, "loss " + before + " -> " + after);
        return after;
    }

    /** Fits a standardizer to {@code data}, labels included, and normalises {@code data} with it. */
    static NormalizerStandardize normaliseWithLabels(DataSet data) {
        NormalizerStandardize normalizer = new NormalizerStandardize();
        normalizer.fitLabel(true);
        normalizer.fit(data);
        normalizer.preProcess(data);
        return normalizer;
    }

    /**
     * Adam, minibatches of {@link #BATCH} per worker, averaging after every fourth: with {@link #ROWS} rows on two
     * workers, one averaging round per epoch (each round is a dozen Spark jobs, which is what a test's time goes to).
     */
    static TrainingMaster<?, ?> adamMaster() {
        return LawfulSpark.parameterAveraging(BATCH, BATCH).averagingFrequency(4).build();
    }

    /**
     * The executors compute the outputs of the trained network on two blocks of rows, each block one batch; they must
     * equal the driver's on the same blocks bit for bit, so the law layers rebuilt on the executors from the
     * configuration compute what the driver's compute.
     */
    void assertExecutorsAgree(INDArray features, java.util.function.Function<INDArray, INDArray> driver,
                              Distributed forward) {
        int parts = 2;
        long block = features.size(0) / parts;
        List<Tuple2<Integer, INDArray>> keyed = new ArrayList<>();
        List<INDArray> expected = new ArrayList<>();
        for (int k = 0; k < parts; k++) {
            INDArray rows = features.get(NDArrayIndex.interval(k * block, (k + 1) * block), NDArrayIndex.all()).dup();
            keyed.add(new Tuple2<>(k, rows));
            expected.add(driver.apply(rows));
        }
        List<Tuple2<Integer, INDArray>> out = forward.apply(sc.parallelizePairs(keyed, parts), (int) block).collect();
        assertEquals(parts, out.size());
        for (Tuple2<Integer, INDArray> o : out) {
            SparkTests.assertSameFloats(expected.get(o._1()), o._2(), "executor outputs of block " + o._1());
        }
    }

    /** Deeplearning4j's Spark inference: keyed feature blocks to keyed outputs, in batches of a given size. */
    interface Distributed {
        JavaPairRDD<Integer, INDArray> apply(JavaPairRDD<Integer, INDArray> features, int batchSize);
    }

    interface Restore<M> {
        M restore(File file) throws Exception;
    }

    /** Saves {@code net} with ModelSerializer, reloads it and asserts the parameters are bit-identical. */
    static <M extends Model> M reload(M net, Path folder, Restore<M> restore) throws Exception {
        File file = folder.resolve("net.zip").toFile();
        ModelSerializer.writeModel(net, file, false);
        M reloaded = restore.restore(file);
        assertArrayEquals(SparkTests.flat(net.params()), SparkTests.flat(reloaded.params()), "parameters");
        return reloaded;
    }

    static NeuralNetConfiguration.Builder base(DataType type, org.nd4j.linalg.learning.config.IUpdater updater,
                                               long seed) {
        return new NeuralNetConfiguration.Builder().seed(seed).dataType(type).updater(updater)
                .weightInit(WeightInit.XAVIER)
                .trainingWorkspaceMode(WorkspaceMode.ENABLED).inferenceWorkspaceMode(WorkspaceMode.ENABLED);
    }

    /** features(2) → dense(16, tanh) → head(identity) → law layer → MSE loss layer, Adam. */
    static MultiLayerNetwork mln(Layer lawLayer, int headWidth, DataType type, long seed) {
        MultiLayerConfiguration conf = base(type, new Adam(2e-2), seed).list()
                .layer(new DenseLayer.Builder().nIn(2).nOut(16).activation(Activation.TANH).build())
                .layer(new DenseLayer.Builder().nIn(16).nOut(headWidth).activation(Activation.IDENTITY).build())
                .layer(lawLayer)
                .layer(new LossLayer.Builder(LossFunctions.LossFunction.MSE).activation(Activation.IDENTITY).build())
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        return net;
    }

    /** @return a {@code rows × cols} array of uniform values in [lo, hi), seeded */
    static double[][] uniform(SplittableRandom r, int rows, int cols, double lo, double hi) {
        double[] values = r.doubles((long) rows * cols, lo, hi).toArray();
        double[][] v = new double[rows][];
        for (int s = 0; s < rows; s++) {
            v[s] = java.util.Arrays.copyOfRange(values, s * cols, (s + 1) * cols);
        }
        return v;
    }

    static DataSet floats(double[][] x, double[][] y) {
        return new DataSet(Nd4j.createFromArray(x).castTo(DataType.FLOAT), Nd4j.createFromArray(y)
                .castTo(DataType.FLOAT));
    }
}
