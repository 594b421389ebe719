package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Completion;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.ComputationGraphConfiguration;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.conf.graph.LayerVertex;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.activations.impl.ActivationIdentity;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;

/** The graph helper wires input → hidden → head → law vertex → loss, and its outputs obey the laws. */
class ConstrainedGraphTest {
    @Test
    void theHelperWiresTheDocumentedGraph() {
        LawSpec spec = LawSpec.of(TestNets.X_NONLINEAR);
        Completion c = spec.completion();
        ComputationGraphConfiguration conf = ConstrainedGraph.builder(spec).hidden(6, 5).configuration();
        assertEquals(java.util.List.of(ConstrainedGraph.INPUT), conf.getNetworkInputs());
        assertEquals(java.util.List.of(ConstrainedGraph.OUTPUT), conf.getNetworkOutputs());
        assertEquals(java.util.List.of(ConstrainedGraph.INPUT), conf.getVertexInputs().get("hidden0"));
        assertEquals(java.util.List.of("hidden0"), conf.getVertexInputs().get("hidden1"));
        assertEquals(java.util.List.of("hidden1"), conf.getVertexInputs().get(ConstrainedGraph.HEAD));
        assertEquals(java.util.List.of(ConstrainedGraph.INPUT, ConstrainedGraph.HEAD),
                conf.getVertexInputs().get(ConstrainedGraph.LAWS));
        assertEquals(java.util.List.of(ConstrainedGraph.LAWS), conf.getVertexInputs().get(ConstrainedGraph.OUTPUT));
        DenseLayer head = (DenseLayer) ((LayerVertex) conf.getVertices().get(ConstrainedGraph.HEAD))
                .getLayerConf().getLayer();
        assertEquals(c.freeWidth(), head.getNOut());
        assertTrue(head.getActivationFn() instanceof ActivationIdentity);
        assertEquals(new LawVertex(spec), conf.getVertices().get(ConstrainedGraph.LAWS));
        assertTrue(((LayerVertex) conf.getVertices().get(ConstrainedGraph.OUTPUT)).getLayerConf().getLayer()
                instanceof LossLayer);
    }

    @Test
    void anUntrainedDoubleGraphAlreadyObeysTheLawsToTheDoubleBound() {
        LawSpec spec = LawSpec.of(TestNets.X_NONLINEAR);
        Completion c = spec.completion();
        ComputationGraph g = ConstrainedGraph.builder(spec).dataType(DataType.DOUBLE).seed(5).build();
        INDArray x = TestNets.array(TestNets.uniform(new SplittableRandom(5), 64, 2, -2, 2), DataType.DOUBLE);
        INDArray y = g.outputSingle(x);
        assertArrayEquals(new long[] {64, c.outputWidth()}, y.shape());
        TestNets.assertWithinDocumentedBound(c, TestNets.flat(x), TestNets.flat(y), 64, false);
    }
}
