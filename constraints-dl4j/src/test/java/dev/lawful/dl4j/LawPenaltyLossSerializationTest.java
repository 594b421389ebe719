package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawException;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.layers.BaseOutputLayer;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.OutputLayer;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.util.ModelSerializer;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.learning.config.Sgd;
import org.nd4j.linalg.lossfunctions.ILossFunction;

/** {@link LawPenaltyLoss} survives the network's JSON configuration and a {@link ModelSerializer} round trip. */
class LawPenaltyLossSerializationTest {
    private static final double LAMBDA = 2.5;
    private static final double[] WEIGHTS = {3.0, 0.125};

    private static LawPenaltyLoss loss() {
        LawSpec spec = LawSpec.of(LawPenaltyLossScoreTest.LAWS);
        spec.setSourceName("penalty.law");
        return new LawPenaltyLoss(spec, LAMBDA, WEIGHTS);
    }

    private static MultiLayerNetwork network() {
        MultiLayerConfiguration conf = new NeuralNetConfiguration.Builder()
                .dataType(DataType.DOUBLE)
                .seed(3)
                .updater(new Sgd(0.01))
                .list()
                .layer(new DenseLayer.Builder().nIn(2).nOut(6).activation(Activation.TANH).build())
                .layer(new OutputLayer.Builder(loss()).nIn(6).nOut(4).activation(Activation.IDENTITY).build())
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        return net;
    }

    private static LawPenaltyLoss lossOf(MultiLayerConfiguration conf) {
        ILossFunction f = ((BaseOutputLayer) conf.getConf(1).getLayer()).getLossFn();
        return assertInstanceOf(LawPenaltyLoss.class, f);
    }

    @Test
    void jsonKeepsLambdaWeightsAndReadableLawText() {
        MultiLayerConfiguration conf = network().getLayerWiseConfigurations();
        String json = conf.toJson();
        assertTrue(json.contains("dev.lawful.dl4j.LawPenaltyLoss"), json);
        assertTrue(json.contains("law split: q[0] = q[1] + q[2]"), "law text must be readable in the JSON: " + json);
        assertTrue(json.contains("penalty.law"), json);

        LawPenaltyLoss back = lossOf(MultiLayerConfiguration.fromJson(json));
        LawPenaltyLoss original = loss();
        assertNotSame(original, back);
        assertEquals(original, back);
        assertEquals(original.hashCode(), back.hashCode());
        assertEquals(LAMBDA, back.getPenaltyWeight());
        assertArrayEquals(WEIGHTS, back.getLawWeights());
        assertEquals(LawPenaltyLossScoreTest.LAWS, back.getLaws().getLawText());
        assertEquals(original.getLaws().lawSet(), back.getLaws().lawSet());
        assertEquals(conf, MultiLayerConfiguration.fromJson(json));
    }

    @Test
    void brokenLawTextInTheJsonGivesLawDiagnosticsAtFirstUse() {
        String json = network().getLayerWiseConfigurations().toJson();
        String broken = json.replace("law split: q[0] = q[1] + q[2]", "law split: q[0] = q[1] + qq[2]");
        assertNotEquals(json, broken);
        LawPenaltyLoss back = lossOf(MultiLayerConfiguration.fromJson(broken));
        LawException e = assertThrows(LawException.class, back::penalty);
        assertTrue(e.getMessage().contains("penalty.law") && e.getMessage().contains("qq"), e.getMessage());
    }

    @Test
    void modelSerializerRoundTripGivesTheSameScoreAndOutputs() throws IOException {
        MultiLayerNetwork net = network();
        SplittableRandom r = new SplittableRandom(9);
        double[] x = new double[5 * 2];
        double[] l = new double[5 * 4];
        for (int i = 0; i < x.length; i++) {
            x[i] = r.nextDouble(-1, 1);
        }
        for (int i = 0; i < l.length; i++) {
            l[i] = r.nextDouble(-1, 1);
        }
        INDArray features = Nd4j.create(x, new long[] {5, 2}, DataType.DOUBLE);
        INDArray labels = Nd4j.create(l, new long[] {5, 4}, DataType.DOUBLE);
        net.fit(features, labels);

        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        ModelSerializer.writeModel(net, bytes, true);
        MultiLayerNetwork back = ModelSerializer.restoreMultiLayerNetwork(new ByteArrayInputStream(bytes.toByteArray()),
                true);

        LawPenaltyLoss restored = lossOf(back.getLayerWiseConfigurations());
        assertEquals(loss(), restored);
        assertEquals(LAMBDA, restored.getPenaltyWeight());
        assertEquals(LawPenaltyLossScoreTest.LAWS, restored.getLaws().getLawText());
        assertEquals(net.params(), back.params());
        assertEquals(net.output(features), back.output(features));
        assertEquals(net.score(new org.nd4j.linalg.dataset.DataSet(features, labels)),
                back.score(new org.nd4j.linalg.dataset.DataSet(features, labels)), 0.0);
    }
}
