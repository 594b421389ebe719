package dev.lawful.spark;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.Serializable;
import java.io.UncheckedIOException;
import java.util.function.UnaryOperator;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.broadcast.Broadcast;
import org.deeplearning4j.nn.api.Model;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.util.ModelSerializer;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.dataset.api.preprocessor.serializer.NormalizerSerializer;

/**
 * A trained network and its normalizer on the executors, for {@link LawfulSpark#verifyPredictions}: both are written
 * on the driver ({@link ModelSerializer}, {@link NormalizerSerializer}) and broadcast as bytes, never as the
 * network's own parameter array (Spark frees a broadcast array when it drops the broadcast; see
 * docs/platform-facts.md), and each partition restores its own copy (a network is not thread-safe).
 */
final class Predictor implements Serializable {
    private static final long serialVersionUID = 1L;

    private final Broadcast<byte[][]> model;
    private final boolean graph;
    private final boolean normalized;

    private Predictor(Broadcast<byte[][]> model, boolean graph, boolean normalized) {
        this.model = model;
        this.graph = graph;
        this.normalized = normalized;
    }

    /**
     * @param net        a {@link ComputationGraph} with one output or a {@link MultiLayerNetwork}
     * @param normalizer the normalizer the network was trained with, or null
     * @return the predictor, broadcast; {@link #destroy()} it when done
     * @throws IllegalArgumentException for another kind of model
     */
    static Predictor broadcast(JavaSparkContext sc, Model net, DataNormalization normalizer, String where) {
        if (!(net instanceof ComputationGraph) && !(net instanceof MultiLayerNetwork)) {
            throw new IllegalArgumentException(where + ": the network must be a ComputationGraph or a"
                    + " MultiLayerNetwork, found " + (net == null ? "null" : net.getClass().getName()));
        }
        // the normalizer apart: Deeplearning4j 1.0.0-M2.1's writeModel with a normalizer fails here, to a stream or
        // a file ("flush() failed: stream is closed" from commons-io; docs/platform-facts.md)
        ByteArrayOutputStream model = new ByteArrayOutputStream();
        ByteArrayOutputStream statistics = new ByteArrayOutputStream();
        try {
            ModelSerializer.writeModel(net, model, false);
            if (normalizer != null) {
                NormalizerSerializer.getDefault().write(normalizer, statistics);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(where + ": writing the network to memory: " + e.getMessage(), e);
        }
        byte[][] bytes = {model.toByteArray(), statistics.toByteArray()};
        return new Predictor(sc.broadcast(bytes), net instanceof ComputationGraph, normalizer != null);
    }

    /**
     * @return a function from physical features to the network's predictions in physical units (the features are
     *         normalised on a copy and the predictions reverted when a normalizer was given)
     */
    UnaryOperator<INDArray> open() {
        byte[][] files = model.value();
        try {
            Model net = graph ? ModelSerializer.restoreComputationGraph(new ByteArrayInputStream(files[0]), false)
                    : ModelSerializer.restoreMultiLayerNetwork(new ByteArrayInputStream(files[0]), false);
            DataNormalization normalizer = normalized
                    ? NormalizerSerializer.getDefault().restore(new ByteArrayInputStream(files[1])) : null;
            return features -> {
                INDArray input = features.castTo(net.params().dataType()).dup('c');
                if (normalizer != null) {
                    normalizer.transform(input);
                }
                INDArray out = net instanceof ComputationGraph g ? g.outputSingle(input)
                        : ((MultiLayerNetwork) net).output(input);
                if (normalizer != null) {
                    normalizer.revertLabels(out);
                }
                return out;
            };
        } catch (Exception e) {
            throw new IllegalStateException("LawfulSpark.verifyPredictions: restoring the broadcast network: "
                    + e.getMessage() + " (the driver and every executor must run the same versions)", e);
        }
    }

    /** Removes the broadcast from the driver and the executors. */
    void destroy() {
        model.destroy();
    }
}
