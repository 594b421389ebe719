package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.dl4j.LawLayer;
import org.apache.spark.SparkConf;
import org.apache.spark.SparkEnv;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.storage.BlockManager;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.spark.impl.multilayer.SparkDl4jMultiLayer;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.dataset.DataSet;

/**
 * The distributed training checks on {@code local-cluster[2,1,1536]}: a master, two workers and two executor JVMs
 * on the loopback address, so every law layer and vertex crosses a process boundary (in the broadcast for training,
 * as JSON for scoring and inference), with the Kryo serializer that clusters usually run (and under which a broadcast
 * parameter array is freed when Spark drops the broadcast).
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

    /** Removes every broadcast made so far from this JVM's block manager, as the context cleaner would. */
    private void dropBroadcasts() {
        long next = sc.broadcast(0).id();
        BlockManager blocks = SparkEnv.get().blockManager();
        for (long id = 0; id <= next; id++) {
            blocks.removeBroadcast(id, false);
        }
    }
}
