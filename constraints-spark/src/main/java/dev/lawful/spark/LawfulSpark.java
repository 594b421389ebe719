package dev.lawful.spark;

import dev.lawful.enforce.ResidualReport;
import java.io.File;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URI;
import java.net.URISyntaxException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import java.util.jar.Attributes;
import java.util.jar.JarFile;
import java.util.jar.Manifest;
import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.deeplearning4j.nn.api.Model;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.spark.api.RDDTrainingApproach;
import org.deeplearning4j.spark.api.TrainingMaster;
import org.deeplearning4j.spark.impl.graph.SparkComputationGraph;
import org.deeplearning4j.spark.impl.multilayer.SparkDl4jMultiLayer;
import org.deeplearning4j.spark.impl.paramavg.ParameterAveragingTrainingMaster;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;

/**
 * What networks with Lawful's law layers and vertices need to train on Apache Spark with Deeplearning4j's Spark
 * training ({@link SparkDl4jMultiLayer}, {@link SparkComputationGraph}): the checks and settings that otherwise fail
 * late and obscurely. The law layers themselves need nothing special: their configurations reach the executors by
 * Java serialisation (training) and JSON (scoring), and each executor rebuilds the completion and its buffers from the
 * law text on first use.
 *
 * <p>Supported: {@link ParameterAveragingTrainingMaster} (synchronous parameter averaging). Not supported:
 * Deeplearning4j's {@code SharedTrainingMaster} (asynchronous gradient sharing); measured with Deeplearning4j
 * 1.0.0-M2 it hung in about one run of three on {@code local[2]} and trained nothing across executor JVMs on one
 * machine (every node took itself for the root), so {@link #multiLayer} and {@link #graph} refuse it.
 *
 * <p>{@link #verify}, {@link #verifyDataSets} and {@link #verifyPredictions} check laws over a data set held in
 * Spark, a distributed {@code lawful verify}: the report equals the one {@link ResidualReport#of} gives on one
 * machine over the same rows, bit for bit.
 *
 * <p>Spark 3.3 adds the {@code --add-opens} flags Java 17 needs to the executors' command line itself; the driver's
 * JVM must be started with {@link #DRIVER_JAVA_OPTIONS} (a JVM cannot open its own modules once running), which
 * {@link #context} checks.
 */
public final class LawfulSpark {
    /**
     * The flags the driver JVM needs on Java 17: Spark reads direct buffers and cleaner internals
     * ({@code java.nio}, {@code sun.nio.ch}), and the Kryo serializer reaches into {@code java.util},
     * {@code java.lang.invoke} and {@code java.util.concurrent.atomic}. Give them to {@code java}, to
     * {@code spark-submit --driver-java-options}, or to Surefire's {@code argLine}.
     */
    public static final List<String> DRIVER_JAVA_OPTIONS = List.of(
            "--add-opens=java.base/java.nio=ALL-UNNAMED",
            "--add-opens=java.base/sun.nio.ch=ALL-UNNAMED",
            "--add-opens=java.base/java.util=ALL-UNNAMED",
            "--add-opens=java.base/java.lang.invoke=ALL-UNNAMED",
            "--add-opens=java.base/java.util.concurrent.atomic=ALL-UNNAMED");

    /** Spark's Kryo serializer, and the registrator ND4J's arrays need under it. */
    static final String KRYO = "org.apache.spark.serializer.KryoSerializer";
    static final String ND4J_REGISTRATOR = "org.nd4j.kryo.Nd4jRegistrator";

    private LawfulSpark() {
    }

    /**
     * Checks the driver JVM and creates the Spark context after {@link #configure}.
     *
     * @param conf the application's configuration (modified by {@link #configure})
     * @return a new context; stop it when done
     * @throws IllegalStateException when this JVM lacks one of {@link #DRIVER_JAVA_OPTIONS} (the message lists the
     *         missing flags and where to put them)
     */
    public static JavaSparkContext context(SparkConf conf) {
        checkDriverJvm();
        return new JavaSparkContext(configure(conf));
    }

    /**
     * Settings that law-layer training needs and Spark does not choose by itself, each only where the configuration
     * does not set it already:
     * <ul>
     *   <li>with the Kryo serializer ({@code spark.serializer}), ND4J's registrator
     *       ({@code spark.kryo.registrator = org.nd4j.kryo.Nd4jRegistrator}), without which Deeplearning4j refuses to
     *       train;</li>
     *   <li>one OpenMP thread per executor task ({@code spark.executorEnv.OMP_NUM_THREADS = 1}): Spark already runs
     *       one task per core, and ND4J's default OpenMP threads busy-wait when they outnumber the cores (see
     *       docs/platform-facts.md).</li>
     * </ul>
     *
     * @param conf the configuration (modified)
     * @return {@code conf}
     */
    public static SparkConf configure(SparkConf conf) {
        if (KRYO.equals(conf.get("spark.serializer", null)) && !conf.contains("spark.kryo.registrator")) {
            conf.set("spark.kryo.registrator", ND4J_REGISTRATOR);
        }
        conf.setIfMissing("spark.executorEnv.OMP_NUM_THREADS", "1");
        return conf;
    }

    /**
     * A parameter-averaging training master with the settings measured to work with law layers on separate executor
     * JVMs: {@link RDDTrainingApproach#Direct} (the default, {@code Export}, writes the data set to files first and is
     * only needed for data larger than the executors' memory). Adjust the rest on the returned builder
     * ({@code averagingFrequency}, {@code workerPrefetchNumBatches}, ...).
     *
     * @param examplesPerDataSet how many examples each {@code DataSet} of the training RDD holds (Deeplearning4j
     *                           sizes its averaging rounds by counting RDD elements, so this must be right)
     * @param batchSizePerWorker examples per minibatch on each worker
     * @return the builder
     * @throws IllegalArgumentException when a size is not positive
     */
    public static ParameterAveragingTrainingMaster.Builder parameterAveraging(int examplesPerDataSet,
                                                                              int batchSizePerWorker) {
        if (examplesPerDataSet <= 0 || batchSizePerWorker <= 0) {
            throw new IllegalArgumentException("parameterAveraging: examplesPerDataSet (" + examplesPerDataSet
                    + ") and batchSizePerWorker (" + batchSizePerWorker + ") must be positive");
        }
        return new ParameterAveragingTrainingMaster.Builder(examplesPerDataSet)
                .batchSizePerWorker(batchSizePerWorker)
                .rddTrainingApproach(RDDTrainingApproach.Direct);
    }

    /**
     * @param sc     the Spark context
     * @param net    the network, with law layers or not (initialised)
     * @param master a {@link ParameterAveragingTrainingMaster}
     * @return Deeplearning4j's Spark trainer for it, except that scoring, evaluation and inference on the executors
     *         ({@code calculateScore}, {@code scoreExamples}, {@code feedForwardWithKey}, {@code evaluate...}) run on a
     *         copy of the network: Deeplearning4j 1.0.0-M2 broadcasts the network's own parameters for them, and
     *         Spark 3 frees an array it broadcast when it drops the broadcast, which would free the driver's
     *         parameters under a later training round
     * @throws UnsupportedOperationException for any other training master (see the class documentation)
     */
    public static SparkDl4jMultiLayer multiLayer(JavaSparkContext sc, MultiLayerNetwork net, TrainingMaster<?, ?> master) {
        return new CopyScoringMultiLayer(sc, net, supported(master), false);
    }

    /**
     * @param sc     the Spark context
     * @param net    the graph, for example from {@code ConstrainedGraph} (initialised)
     * @param master a {@link ParameterAveragingTrainingMaster}
     * @return Deeplearning4j's Spark trainer for it, with scoring, evaluation and inference on a copy of the graph
     *         as {@link #multiLayer} says
     * @throws UnsupportedOperationException for any other training master (see the class documentation)
     */
    public static SparkComputationGraph graph(JavaSparkContext sc, ComputationGraph net, TrainingMaster<?, ?> master) {
        return new CopyScoringGraph(sc, net, supported(master), false);
    }

    /**
     * Checks every law on every row of a data set held in Spark and returns the residual report that
     * {@code lawful verify} prints (table: {@link ResidualReport#toTable()}, JSON: {@link ResidualReport#toJson()}).
     * The report is merged from one partial report per partition ({@link dev.lawful.enforce.ResidualAccumulator}),
     * exactly: it has the same bits as {@link ResidualReport#of} over the same rows in the RDD's order on one
     * machine, however the rows are partitioned, including the worst sample of each law (its index counts rows
     * from 0 in the RDD's order) and the 99th percentile (exact nearest-rank up to
     * {@value dev.lawful.enforce.PercentileSketch#EXACT_LIMIT} finite residuals per law, beyond that from
     * log-spaced buckets, less than 2<sup>-10</sup> above; {@link ResidualReport#exactPercentile()} says which).
     *
     * <p>Cost: two passes over the RDD, one that counts each partition's rows (for the global row indices) and one
     * that evaluates the laws; persist an RDD that is expensive to compute. Each executor parses the law text once
     * per JVM; the partial reports sent to the driver hold counts, sums and the buckets used, not the rows.
     *
     * @param lawText   the law text (as in a law file)
     * @param rows      one array per sample: the inputs, then the outputs, each in the law set's declared order
     *                  ({@code LawSet.inputNames()}, {@code outputNames()}) and units; not modified
     * @param tolerance the largest relative residual accepted, a finite number at least 0 ({@code lawful verify}
     *                  uses 1e-9 by default; about 1e-6 suits outputs computed in float32)
     * @return the report over every row
     * @throws dev.lawful.algebra.LawException      when the law text has errors (on the driver, before any job)
     * @throws IllegalArgumentException             when the tolerance is negative, infinite or NaN, or the RDD holds
     *                                              more than {@link Integer#MAX_VALUE} rows
     * @throws org.apache.spark.SparkException      (thrown by Spark unchecked) when a row is null or of the wrong
     *                                              length: its message names the row and the layout expected
     * @throws IllegalStateException                when the two passes over the RDD counted different rows
     */
    public static ResidualReport verify(String lawText, JavaRDD<double[]> rows, double tolerance) {
        return DistributedCheck.verify("LawfulSpark.verify", lawText, rows, tolerance,
                new DistributedCheck.ArrayRows());
    }

    /**
     * Like {@link #verify} for Deeplearning4j data sets in physical units: each example's features are the law
     * inputs and its labels the law outputs, in declared order (a data set may hold any number of examples). To
     * check a trained network's predictions made on the executors, use {@link #verifyPredictions}. Float32 arrays
     * are widened to double exactly. Row indices count examples from 0 in the RDD's order.
     *
     * @param lawText   the law text
     * @param data      data sets of {@code n × inputWidth} features (ignored when the laws have no inputs) and
     *                  {@code n × outputWidth} labels; not modified
     * @param tolerance the largest relative residual accepted, a finite number at least 0
     * @return the report over every example
     * @throws dev.lawful.algebra.LawException      when the law text has errors
     * @throws IllegalArgumentException             as {@link #verify} says
     * @throws org.apache.spark.SparkException      (thrown by Spark unchecked) when a data set's arrays have another
     *                                              shape: its message names the rows and the shape expected
     * @throws IllegalStateException                when the two passes over the RDD counted different rows
     */
    public static ResidualReport verifyDataSets(String lawText, JavaRDD<DataSet> data, double tolerance) {
        String where = "LawfulSpark.verifyDataSets";
        return DistributedCheck.verify(where, lawText, data, tolerance, new DataSetRows(where, null));
    }

    /**
     * Like {@link #verifyDataSets} with the law outputs predicted by a trained network on the executors: for each
     * data set, the network's outputs for its features (normalised with {@code normalizer} first, and the outputs
     * reverted to physical units, when one is given) are the law outputs, and the features themselves the law
     * inputs. The network and normalizer reach the executors as serialized bytes ({@code ModelSerializer},
     * {@code NormalizerSerializer}), broadcast for the check and removed after it; each partition restores its own
     * copy. Its outputs must be the law set's outputs in declared order. The report equals the one
     * {@link ResidualReport#of} gives over the same features and the network's outputs for the same data sets on
     * one machine.
     *
     * @param lawText    the law text
     * @param data       data sets of physical features, {@code n × inputWidth} when the laws have inputs (labels
     *                   are ignored); not modified
     * @param net        the trained network, a {@code ComputationGraph} with one output or a
     *                   {@code MultiLayerNetwork} (not modified)
     * @param normalizer the normalizer the network was trained with (features and labels), or null when it takes
     *                   and gives physical values
     * @param tolerance  the largest relative residual accepted, a finite number at least 0 (about 1e-6 for a
     *                   float32 network)
     * @return the report over every example
     * @throws dev.lawful.algebra.LawException      when the law text has errors
     * @throws IllegalArgumentException             as {@link #verify} says, or for another kind of network
     * @throws org.apache.spark.SparkException      (thrown by Spark unchecked) when the features or predictions
     *                                              have another shape: its message names the rows and the shape
     * @throws IllegalStateException                when the two passes over the RDD counted different rows
     */
    public static ResidualReport verifyPredictions(String lawText, JavaRDD<DataSet> data, Model net,
                                                   DataNormalization normalizer, double tolerance) {
        String where = "LawfulSpark.verifyPredictions";
        Predictor predictor = Predictor.broadcast(JavaSparkContext.fromSparkContext(data.context()), net,
                normalizer, where);
        try {
            return DistributedCheck.verify(where, lawText, data, tolerance, new DataSetRows(where, predictor));
        } finally {
            predictor.destroy();
        }
    }

    private static TrainingMaster<?, ?> supported(TrainingMaster<?, ?> master) {
        if (!(master instanceof ParameterAveragingTrainingMaster)) {
            throw new UnsupportedOperationException("training master " + (master == null ? "null"
                    : master.getClass().getName()) + " is not supported with law layers: use"
                    + " ParameterAveragingTrainingMaster (LawfulSpark.parameterAveraging(examplesPerDataSet, batchSizePerWorker));"
                    + " SharedTrainingMaster hung or trained nothing across executor JVMs in Deeplearning4j 1.0.0-M2");
        }
        return master;
    }

    /**
     * Checks that this JVM was started with {@link #DRIVER_JAVA_OPTIONS}.
     *
     * @throws IllegalStateException listing the missing flags and where to put them
     */
    public static void checkDriverJvm() {
        Module base = Object.class.getModule();
        Module unnamed = LawfulSpark.class.getClassLoader().getUnnamedModule();
        List<String> missing = new ArrayList<>();
        for (String option : DRIVER_JAVA_OPTIONS) {
            String pkg = option.substring(option.indexOf('/') + 1, option.lastIndexOf('='));
            if (!base.isOpen(pkg, unnamed)) {
                missing.add(option);
            }
        }
        if (!missing.isEmpty()) {
            throw new IllegalStateException(missingFlags(missing));
        }
    }

    /** @return the message for a driver JVM started without {@code missing} */
    static String missingFlags(List<String> missing) {
        return "this JVM cannot run a Spark driver on Java " + Runtime.version().feature() + ": it was started without "
                + String.join(" ", missing) + "; add " + (missing.size() == 1 ? "it" : "them") + " to the java command"
                + " line, to spark-submit's --driver-java-options, or to Maven Surefire's argLine"
                + " (LawfulSpark.DRIVER_JAVA_OPTIONS lists them all)";
    }

    /**
     * Sets {@code spark.executor.extraClassPath} to this JVM's class path ({@link #driverClassPath()}), placed before
     * any entries already set, so executors started on this machine ({@code local-cluster} masters) or on machines
     * that mount the same paths find Lawful, Deeplearning4j and the application's classes. On a cluster without
     * shared paths, ship one jar with everything instead ({@code spark-submit} with an assembled jar, or
     * {@code --jars}).
     *
     * @param conf the configuration (modified)
     * @return {@code conf}
     */
    public static SparkConf shareDriverClassPath(SparkConf conf) {
        List<String> entries = new ArrayList<>(driverClassPath());
        String existing = conf.get("spark.executor.extraClassPath", "");
        if (!existing.isEmpty()) {
            entries.add(existing);
        }
        return conf.set("spark.executor.extraClassPath", String.join(File.pathSeparator, entries));
    }

    /**
     * This JVM's class path ({@code java.class.path}), with every jar whose manifest names a {@code Class-Path}
     * followed by those entries, recursively: test runners such as Maven Surefire start the JVM with one such jar
     * that stands for the whole class path, and a JVM on another machine (or one that starts after the runner has
     * deleted it) could not read it.
     *
     * @return absolute paths, each once, in class-path order
     * @throws UncheckedIOException when a jar on the class path cannot be read
     */
    public static List<String> driverClassPath() {
        return expand(System.getProperty("java.class.path", ""));
    }

    /**
     * @param classPath entries separated by {@link File#pathSeparator}
     * @return the entries, absolute, each followed by its manifest's {@code Class-Path} entries (recursively), each
     *         once
     */
    static List<String> expand(String classPath) {
        Set<String> out = new LinkedHashSet<>();
        for (String entry : classPath.split(File.pathSeparator)) {
            if (!entry.isEmpty()) {
                add(Path.of(entry).toAbsolutePath().normalize(), out);
            }
        }
        return List.copyOf(out);
    }

    private static void add(Path entry, Set<String> out) {
        if (!out.add(entry.toString()) || !entry.toString().endsWith(".jar") || !entry.toFile().isFile()) {
            return;
        }
        String classPath;
        try (JarFile jar = new JarFile(entry.toFile())) {
            Manifest manifest = jar.getManifest();
            classPath = manifest == null ? null : manifest.getMainAttributes().getValue(Attributes.Name.CLASS_PATH);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read the manifest of " + entry + " on the class path", e);
        }
        if (classPath == null) {
            return;
        }
        for (String item : classPath.trim().split("\\s+")) {
            if (!item.isEmpty()) {
                add(resolve(entry, item), out);
            }
        }
    }

    /** A manifest's Class-Path entry is a URL (encoded, so a space is %20), relative to the jar that names it. */
    private static Path resolve(Path jar, String item) {
        try {
            return Path.of(jar.toUri().resolve(new URI(item))).toAbsolutePath().normalize();
        } catch (URISyntaxException | IllegalArgumentException e) {
            return jar.resolveSibling(item).toAbsolutePath().normalize();
        }
    }
}
