package dev.lawful.spark;

import org.apache.spark.SparkConf;

/** The distributed training checks on {@code local[2]}: two worker threads in this JVM, Spark's Java serializer. */
class LocalTrainingTest extends DistributedTrainingChecks {
    @Override
    SparkConf conf() {
        return SparkTests.conf("local[2]", "LocalTrainingTest");
    }
}
