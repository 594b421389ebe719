package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.dl4j.LawLayer;
import dev.lawful.enforce.ResidualReport;
import java.util.List;
import org.apache.spark.SparkConf;
import org.apache.spark.SparkEnv;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.storage.BlockManager;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.spark.impl.multilayer.SparkDl4jMultiLayer;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.factory.Nd4j;

/**
 * The distributed training checks on {@code local-cluster[2,1,1536]}: a master, two workers and two executor JVMs
 * on the loopback address, so every law layer and vertex crosses a process boundary (in the broadcast for training,
 * as JSON for scoring and inference), with the Kryo serializer that clusters usually run (and under which a broadcast
 * parameter array is freed when Spark drops the broadcast). The distributed law check runs here too, so its partial
 * reports cross JVMs in Kryo's format.
 */
class LocalClusterTrainingTest extends DistributedTrainingChecks {
    @Override
    SparkConf conf() {
        return SparkTests.conf(SparkTests.LOCAL_CLUSTER, "LocalClusterTrainingTest")
                .set("spark.serializer", LawfulSpark.KRYO);
    }

    /**
     * Scoring on the executors, then what Spark's context cleaner does once that broadcast is unreachable (it removes
     * the broadcast's blocks, closing values that are AutoCloseable): the driver's network keeps its parameters and
     * trains on. Deeplearning4j's own trainer, the control, loses them.
     */
    @Test
    void scoringOnTheExecutorsLeavesTheDriversParametersAlone() {
        DataSet data = floats(uniform(new java.util.SplittableRandom(101), BATCH * 2, 2, -1, 1),
                uniform(new java.util.SplittableRandom(102), BATCH * 2, 4, 0, 1));
        LawLayer layer = LawLayer.of(BALANCES);
        MultiLayerNetwork net = mln(layer, layer.lawCompletion().freeWidth(), DataType.FLOAT, 103);
        MultiLayerNetwork control = net.clone();
        JavaRDD<DataSet> rdd = SparkTests.rdd(sc, data, BATCH);

        SparkDl4jMultiLayer spark = LawfulSpark.multiLayer(sc, net, adamMaster());
        spark.calculateScore(rdd, true);
        dropBroadcasts();
        assertFalse(net.params().wasClosed(), "the driver's parameters were freed");
        spark.fit(rdd);

        new SparkDl4jMultiLayer(sc, control, adamMaster()).calculateScore(rdd, true);
        dropBroadcasts();
        assertTrue(control.params().wasClosed(), "the control shows the hazard");
    }

    /**
     * The law check across executor JVMs: the reference is the single-machine report ({@code ResidualReport.of} over
     * the same rows in order), which the distributed one must equal in every statistic (its JSON), for rows, for
     * data sets and for a network's predictions made on the executors (from the network's serialized bytes).
     */
    @Test
    void theLawCheckAcrossExecutorJvmsEqualsTheSingleMachineReport() {
        List<double[]> rows = VerifyRows.rows(7, 12_000);
        ResidualReport single = DistributedVerifyTest.single(rows, 1e-9);
        JavaRDD<double[]> rdd = VerifyRows.rdd(sc, rows, 3000, 0, 5000, 4000);
        DistributedVerifyTest.assertSame(single, LawfulSpark.verify(VerifyRows.RESERVOIR, rdd, 1e-9), "rows");
        JavaRDD<DataSet> sets = rdd.glom().filter(part -> !part.isEmpty()).map(part -> new DataSet(
                Nd4j.create(VerifyRows.inputs(part), part.size(), 2),
                Nd4j.create(VerifyRows.outputs(part), part.size(), 3)));
        DistributedVerifyTest.assertSame(single, LawfulSpark.verifyDataSets(VerifyRows.RESERVOIR, sets, 1e-9),
                "data sets");
        DistributedVerifyTest.assertPredictionsChecked(sc);
    }

    /** Removes every broadcast made so far from this JVM's block manager, as the context cleaner would. */
    private void dropBroadcasts() {
        long next = sc.broadcast(0).id();
        BlockManager blocks = SparkEnv.get().blockManager();
        for (long id = 0; id <= next; id++) {
            blocks.removeBroadcast(id, false);
        }
    }
}
