package dev.lawful.spark;

import org.apache.spark.SparkConf;

/**
 * The distributed training checks on {@code local-cluster[2,1,1536]}: a master, two workers and two executor JVMs
 * on the loopback address, so every law layer and vertex crosses a process boundary (Java serialisation for training,
 * JSON for scoring and inference), with Spark's default Java serializer.
 */
class LocalClusterTrainingTest extends DistributedTrainingChecks {
    @Override
    SparkConf conf() {
        return SparkTests.conf(SparkTests.LOCAL_CLUSTER, "LocalClusterTrainingTest");
    }
}
