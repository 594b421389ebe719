package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.lawful.dl4j.Scaling;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.RoundingBound;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.SparkConf;
import org.apache.spark.SparkContext;
import org.apache.spark.SparkContext$;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;

/** Spark configurations for tests, data as RDDs, and the checks every distributed training test makes. */
final class SparkTests {
    /** Two worker JVMs with one core and 1536 MB each, started by the driver on this machine. */
    static final String LOCAL_CLUSTER = "local-cluster[2,1,1536]";

    private SparkTests() {
    }

    /**
     * A configuration for {@code master}, loopback only and without the web UI. For {@code local-cluster} masters the
     * executors are separate JVMs started from no Spark installation: their class path is the driver's
     * ({@link LawfulSpark#shareDriverClassPath}), and {@code SPARK_TESTING} and {@code SPARK_SCALA_VERSION} let Spark's
     * launcher build their command without a Spark home (it otherwise looks for {@code $SPARK_HOME/jars}).
     */
    static SparkConf conf(String master, String app) {
        SparkConf conf = new SparkConf().setMaster(master).setAppName(app)
                .set("spark.driver.host", "127.0.0.1")
                .set("spark.driver.bindAddress", "127.0.0.1")
                .set("spark.ui.enabled", "false")
                .set("spark.ui.showConsoleProgress", "false");
        if (master.startsWith("local-cluster")) {
            LawfulSpark.shareDriverClassPath(conf)
                    .set("spark.executorEnv.SPARK_TESTING", "1")
                    .set("spark.executorEnv.SPARK_SCALA_VERSION", "2.12");
        }
        return conf;
    }

    /**
     * Stops the context a README example started, if it is still running: a failure inside the example leaves it
     * running, and no later test could then start its own.
     */
    static void stopActiveContext() {
        scala.Option<SparkContext> active = SparkContext$.MODULE$.getActive();
        if (active.isDefined()) {
            active.get().stop();
        }
    }

    /**
     * @return {@code data} as an RDD of data sets of {@code examplesPerDataSet} examples each (the last may hold
     *         fewer), in as many partitions as the context's default parallelism
     */
    static JavaRDD<DataSet> rdd(JavaSparkContext sc, DataSet data, int examplesPerDataSet) {
        List<DataSet> batches = new ArrayList<>(data.batchBy(examplesPerDataSet));
        return sc.parallelize(batches, sc.defaultParallelism());
    }

    /** Asserts two arrays hold the same float bits. */
    static void assertSameFloats(INDArray expected, INDArray actual, String what) {
        assertArrayEquals(expected.shape(), actual.shape(), what + ": shape");
        assertArrayEquals(expected.dup('c').data().asFloat(), actual.dup('c').data().asFloat(), what);
    }

    /** @return the values of {@code a} in double, row-major */
    static double[] flat(INDArray a) {
        return a.castTo(DataType.DOUBLE).dup('c').data().asDouble();
    }

    /**
     * Asserts that every sample of a float network's outputs obeys every law within the completion's documented
     * float bound, judged in physical units.
     *
     * @param c       the completion the network runs (declared layout)
     * @param x       the physical law inputs the network saw, {@code rows × inputWidth} (null when there are none)
     * @param scaling the law layer's or vertex's output scaling, or null when the outputs are physical
     * @param outputs the network's outputs, {@code rows × outputWidth}, normalised when {@code scaling} is set
     */
    static void assertWithinDocumentedBound(Completion c, double[] x, Scaling scaling, INDArray outputs) {
        // Source: constraints-core RoundingBound and Completion class documentation ("Exactness"): the documented
        // float bound, evaluated by the law set's own evaluator
        int rows = (int) outputs.size(0);
        double[] yn = flat(outputs);
        double[] y = scaling == null ? yn : scaling.toPhysical(yn, rows);
        double[] error = scaling == null ? RoundingBound.floatRounding(y) : scaling.floatOutputError(yn, rows);
        RoundingBound bound = RoundingBound.of(c);
        double[] residuals = new double[rows * bound.lawCount()];
        double[] bounds = new double[rows * bound.lawCount()];
        int outside = bound.evaluate(x, null, y, rows, error, residuals, bounds);
        assertEquals(0, outside, "samples outside the documented float bound, of " + rows);
    }
}
