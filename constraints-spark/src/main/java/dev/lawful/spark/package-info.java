/**
 * Training networks with Lawful's law layers and vertices on Apache Spark, with Deeplearning4j's Spark training and
 * synchronous parameter averaging: {@link dev.lawful.spark.LawfulSpark} checks the driver JVM, sets what the executors
 * need and returns Deeplearning4j's trainers (whose scoring and inference it runs on a copy of the network). The law
 * layers themselves travel with the network's configuration and are rebuilt from their law text on each executor.
 * {@link dev.lawful.spark.LawfulSpark#verify} and its siblings check laws over a data set held in Spark and return the
 * residual report {@code lawful verify} prints, merged exactly from per-partition partial reports.
 */
package dev.lawful.spark;
