package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawException;
import dev.lawful.dl4j.ConstrainedGraph;
import dev.lawful.dl4j.LawLayer;
import dev.lawful.dl4j.LawSpec;
import dev.lawful.enforce.ResidualReport;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.function.UnaryOperator;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.factory.Nd4j;

/**
 * The distributed law check on {@code local[2]}. The reference throughout is the single-machine report,
 * {@code ResidualReport.of} over the same rows in the RDD's order (what {@code lawful verify} prints): the
 * distributed report must have the same JSON and table, character for character, however the rows are partitioned.
 */
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
class DistributedVerifyTest {
    private JavaSparkContext sc;

    @BeforeAll
    void start() {
        sc = LawfulSpark.context(SparkTests.conf("local[2]", "DistributedVerifyTest"));
    }

    @AfterAll
    void stop() {
        if (sc != null) {
            sc.stop();
        }
    }

    @Test
    void theReportEqualsTheSingleMachineReportInOneThreeAndSevenPartitions() {
        List<double[]> rows = VerifyRows.rows(1, 2000);
        ResidualReport single = single(rows, 1e-9);
        assertTrue(single.exactPercentile());
        assertTrue(single.law("water").notANumber() > 0 && single.law("water").infinite() > 0,
                "the data have NaN and infinite residuals");
        assertTrue(single.failingSamples() > 0, "the data have rows over the tolerance");
        for (int[] sizes : new int[][] {{2000}, {700, 0, 1300}, {1, 400, 0, 999, 300, 0, 300}}) {
            JavaRDD<double[]> rdd = VerifyRows.rdd(sc, rows, sizes);
            assertEquals(sizes.length, rdd.getNumPartitions());
            assertSame(single, LawfulSpark.verify(VerifyRows.RESERVOIR, rdd, 1e-9), sizes.length + " partitions");
        }
    }

    @Test
    void beyondTheExactPercentileTheReportStillEqualsTheSingleMachineReport() {
        List<double[]> rows = VerifyRows.rows(2, 20_000);
        ResidualReport single = single(rows, 1e-7);
        assertFalse(single.exactPercentile(), "more finite residuals than the sketch keeps exactly");
        JavaRDD<double[]> rdd = VerifyRows.rdd(sc, rows, 5000, 0, 7000, 8000);
        assertSame(single, LawfulSpark.verify(VerifyRows.RESERVOIR, rdd, 1e-7), "4 partitions");
    }

    @Test
    void anEmptyRddGivesTheReportOfNoRows() {
        JavaRDD<double[]> rdd = VerifyRows.rdd(sc, List.of(), 0, 0, 0);
        assertSame(single(List.of(), 1e-9), LawfulSpark.verify(VerifyRows.RESERVOIR, rdd, 1e-9), "no rows");
    }

    @Test
    void dataSetsOfFeaturesAndLabelsGiveTheSameReport() {
        List<double[]> rows = VerifyRows.rows(3, 1500);
        List<DataSet> sets = new ArrayList<>();
        for (int at = 0; at < rows.size(); at += 128) {
            List<double[]> part = rows.subList(at, Math.min(rows.size(), at + 128));
            sets.add(new DataSet(Nd4j.create(VerifyRows.inputs(part), part.size(), 2),
                    Nd4j.create(VerifyRows.outputs(part), part.size(), 3)));
        }
        assertSame(single(rows, 1e-9), LawfulSpark.verifyDataSets(VerifyRows.RESERVOIR,
                sc.parallelize(sets, 3), 1e-9), "double data sets");

        // float32 arrays are widened exactly: the reference is the single-machine float report
        List<DataSet> floats = new ArrayList<>();
        for (DataSet d : sets) {
            floats.add(new DataSet(d.getFeatures().castTo(DataType.FLOAT), d.getLabels().castTo(DataType.FLOAT)));
        }
        DataSet all = DataSet.merge(floats);
        ResidualReport singleFloat = ResidualReport.of(VerifyRows.LAWS, all.getFeatures().dup('c').data().asFloat(),
                all.getLabels().dup('c').data().asFloat(), rows.size(), 1e-6);
        assertSame(singleFloat, LawfulSpark.verifyDataSets(VerifyRows.RESERVOIR, sc.parallelize(floats, 2), 1e-6),
                "float data sets");
    }

    @Test
    void aNetworksPredictionsGiveTheReportOfThePredictionsMadeOnOneMachine() {
        assertPredictionsChecked(sc);
    }

    /**
     * Checks {@link LawfulSpark#verifyPredictions} on {@code sc} for a normalised graph with a law vertex and a
     * layer network without normalizer, against the single-machine report of the predictions made on the driver.
     */
    static void assertPredictionsChecked(JavaSparkContext sc) {
        // untrained networks: the check needs their outputs, not good ones
        String lawText = VerifyRows.RESERVOIR + "complete stored, evap\n";
        List<double[]> rows = new ArrayList<>(VerifyRows.rows(8, 1200));
        rows.removeIf(r -> !Arrays.stream(r).allMatch(Double::isFinite));
        List<DataSet> sets = new ArrayList<>();
        for (int at = 0; at < rows.size(); at += 100) {
            List<double[]> part = rows.subList(at, Math.min(rows.size(), at + 100));
            sets.add(new DataSet(Nd4j.create(VerifyRows.inputs(part), part.size(), 2).castTo(DataType.FLOAT),
                    Nd4j.create(VerifyRows.outputs(part), part.size(), 3).castTo(DataType.FLOAT)));
        }
        NormalizerStandardize normalizer = new NormalizerStandardize();
        normalizer.fitLabel(true);
        normalizer.fit(DataSet.merge(sets));
        ComputationGraph graph = ConstrainedGraph.builder(LawSpec.of(lawText)).hidden(16).seed(9)
                .normalizedWith(normalizer).build();
        ResidualReport single = predictedOnOneMachine(lawText, sets, features -> {
            INDArray in = features.dup();
            normalizer.transform(in);
            INDArray out = graph.outputSingle(in);
            normalizer.revertLabels(out);
            return out;
        }, true);
        assertTrue(single.withinTolerance(), "a law vertex completes in float: " + single.toTable());
        assertSame(single, LawfulSpark.verifyPredictions(lawText, sc.parallelize(sets, 3), graph, normalizer, 1e-6),
                "a graph with a law vertex, normalised");

        // a layer network whose laws have no inputs: its features are only the network's
        MultiLayerNetwork mln = DistributedTrainingChecks.mln(LawLayer.of(DistributedTrainingChecks.BALANCES), 2,
                DataType.FLOAT, 10);
        List<DataSet> plain = new ArrayList<>();
        for (DataSet d : sets) {
            plain.add(new DataSet(d.getFeatures().div(300), null));
        }
        assertSame(predictedOnOneMachine(DistributedTrainingChecks.BALANCES, plain, mln::output, false),
                LawfulSpark.verifyPredictions(DistributedTrainingChecks.BALANCES, sc.parallelize(plain, 2), mln,
                        null, 1e-6), "a layer network without normalizer");
    }

    /**
     * @return the reference: the single-machine report over the features (when they are the law inputs) and the
     *         network's predictions for each data set, made on the driver
     */
    private static ResidualReport predictedOnOneMachine(String lawText, List<DataSet> sets,
                                                        UnaryOperator<INDArray> predict,
                                                        boolean featuresAreInputs) {
        List<INDArray> predictions = new ArrayList<>();
        for (DataSet d : sets) {
            predictions.add(predict.apply(d.getFeatures()));
        }
        INDArray x = Nd4j.vstack(sets.stream().map(DataSet::getFeatures).toArray(INDArray[]::new));
        INDArray y = Nd4j.vstack(predictions.toArray(INDArray[]::new));
        return ResidualReport.of(LawSpec.of(lawText).lawSet(),
                featuresAreInputs ? x.castTo(DataType.FLOAT).dup('c').data().asFloat() : null,
                y.castTo(DataType.FLOAT).dup('c').data().asFloat(), (int) y.size(0), 1e-6);
    }

    @Test
    void aRowOfTheWrongLengthIsNamedWithTheLayoutExpected() {
        List<double[]> rows = new ArrayList<>(VerifyRows.rows(4, 20));
        rows.set(13, new double[] {1, 2, 3});
        Exception e = assertThrows(Exception.class,
                () -> LawfulSpark.verify(VerifyRows.RESERVOIR, VerifyRows.rdd(sc, rows, 10, 10), 1e-9));
        assertTrue(e.getMessage().contains("LawfulSpark.verify: row 13 (counted from 0 in the RDD's order) has 3"
                + " values; the law set needs 5 values per row, its inputs then its outputs in declared order:"
                + " inflow, dt, release, evap, stored"), e.getMessage());
    }

    @Test
    void badArgumentsFailOnTheDriverWithTheirPlace() {
        JavaRDD<double[]> rdd = VerifyRows.rdd(sc, VerifyRows.rows(5, 10), 10);
        IllegalArgumentException tol = assertThrows(IllegalArgumentException.class,
                () -> LawfulSpark.verify(VerifyRows.RESERVOIR, rdd, -1));
        assertEquals("LawfulSpark.verify: the tolerance must be a finite number >= 0, found -1.0", tol.getMessage());
        LawException law = assertThrows(LawException.class,
                () -> LawfulSpark.verify("output y\nlaw a: y = z\n", rdd, 1e-9));
        assertTrue(law.getMessage().contains("unknown name 'z'"), law.getMessage());
    }

    /** Rows the RDD below has given so far, in this JVM (local[2] runs its tasks here). */
    private static final AtomicInteger GIVEN = new AtomicInteger();

    @Test
    void anRddThatGivesOtherRowsTheSecondTimeIsAnErrorNotAWrongReport() {
        GIVEN.set(0);
        // the first pass sees all 100 rows, the second only the 20 given before the 120th
        JavaRDD<double[]> shifting = VerifyRows.rdd(sc, VerifyRows.rows(11, 100), 50, 50)
                .filter(row -> GIVEN.incrementAndGet() <= 120);
        IllegalStateException e = assertThrows(IllegalStateException.class,
                () -> LawfulSpark.verify(VerifyRows.RESERVOIR, shifting, 1e-9));
        assertEquals("LawfulSpark.verify: the RDD gave 100 rows when counted and 20 when checked; its contents must"
                + " be the same each time it is computed (persist it first, or make it deterministic)", e.getMessage());
    }

    @Test
    void onlyGraphsAndLayerNetworksPredict() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> LawfulSpark.verifyPredictions(
                VerifyRows.RESERVOIR, sc.parallelize(List.<DataSet>of()), null, null, 1e-6));
        assertEquals("LawfulSpark.verifyPredictions: the network must be a ComputationGraph or a MultiLayerNetwork,"
                + " found null", e.getMessage());
    }

    /** @return the single-machine report over {@code rows} in order: the reference */
    static ResidualReport single(List<double[]> rows, double tolerance) {
        return ResidualReport.of(VerifyRows.LAWS, VerifyRows.inputs(rows), VerifyRows.outputs(rows), rows.size(),
                tolerance);
    }

    /** Asserts two reports have the same JSON (every statistic, to the bit, and the worst rows) and table. */
    static void assertSame(ResidualReport expected, ResidualReport actual, String what) {
        assertEquals(expected.toJson(), actual.toJson(), what);
        assertEquals(expected.toTable(), actual.toTable(), what);
    }
}
