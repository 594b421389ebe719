package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.conf.inputs.InvalidInputTypeException;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.Adam;
import org.nd4j.linalg.lossfunctions.LossFunctions;

/** Wrong widths and wrong uses give messages that name both numbers and say what to change (word for word). */
class ShapeErrorTest {
    private static final String HEAD_MESSAGE = "its input (the head's free outputs) has 3 columns but the law set needs"
            + " 2 (y[0], y[1]); set nOut of the head (the layer that feeds it) to 2, the number of free outputs";

    @Test
    void aHeadOfTheWrongWidthIsReportedWhenTheConfigurationIsBuilt() {
        // with nIn on the dense layers Deeplearning4j infers the input types, so the layer sees the width at build
        InvalidInputTypeException e = assertThrows(InvalidInputTypeException.class,
                () -> TestNets.mln(LawLayer.of(TestNets.CONSTANT_AFFINE), 3, 4, 3, DataType.FLOAT, new Adam(1e-3), 1));
        assertEquals("law layer 'layer2' (layer 2): " + HEAD_MESSAGE, e.getMessage());
    }

    @Test
    void anInputOfTheWrongWidthIsReportedWhenTheLayerRuns() {
        MultiLayerNetwork net = TestNets.mln(LawLayer.of(TestNets.CONSTANT_AFFINE), 3, 4, 2, DataType.FLOAT,
                new Adam(1e-3), 1);
        INDArray z = TestNets.array(TestNets.uniform(new SplittableRandom(1), 5, 3, -1, 1), DataType.FLOAT);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> net.getLayer(2).activate(z, false, LayerWorkspaceMgr.noWorkspaces()));
        assertEquals("law layer 'layer2': " + HEAD_MESSAGE, e.getMessage());
    }

    @Test
    void aHeadOfTheWrongWidthIsReportedWhenTheConfigurationIsBuiltWithInputTypes() {
        LawLayer layer = LawLayer.of(TestNets.CONSTANT_AFFINE);
        layer.setLayerName("laws");
        NeuralNetConfiguration.ListBuilder b = TestNets.base(DataType.FLOAT, new Adam(1e-3), 1).list()
                .layer(new DenseLayer.Builder().nOut(3).activation(Activation.IDENTITY).build())
                .layer(layer)
                .layer(new LossLayer.Builder(LossFunctions.LossFunction.MSE).activation(Activation.IDENTITY).build())
                .setInputType(InputType.feedForward(4));
        InvalidInputTypeException e = assertThrows(InvalidInputTypeException.class, b::build);
        assertEquals("law layer 'laws' (layer 1): " + HEAD_MESSAGE, e.getMessage());
    }

    @Test
    void aLawSetWithInputsIsRefusedInALayer() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawLayer.of(TestNets.X_AFFINE));
        assertEquals("law layer: the law set declares 2 input elements (a[0], a[1]), but a layer in a"
                + " MultiLayerNetwork sees only the previous layer's activations; use LawVertex in a ComputationGraph"
                + " (ConstrainedGraph wires it), which receives the network inputs as well", e.getMessage());
    }

    @Test
    void aVertexWhoseInputsHaveTheWrongWidthsIsReported() {
        LawVertex vertex = LawVertex.of(TestNets.X_AFFINE);
        // inputs of width 3 where the laws declare 2: caught when the graph is built with input types
        assertThrows(InvalidInputTypeException.class, () -> TestNets.base(DataType.FLOAT, new Adam(1e-3), 1)
                .graphBuilder().addInputs("in").setInputTypes(InputType.feedForward(3))
                .addLayer("head", new DenseLayer.Builder().nOut(2).build(), "in")
                .addVertex("laws", vertex, "in", "head")
                .addLayer("loss", new LossLayer.Builder(LossFunctions.LossFunction.MSE).build(), "laws")
                .setOutputs("loss").build());
        // and when it runs without input types
        ComputationGraph g = new ComputationGraph(TestNets.base(DataType.FLOAT, new Adam(1e-3), 1).graphBuilder()
                .addInputs("in")
                .addLayer("head", new DenseLayer.Builder().nIn(3).nOut(2).build(), "in")
                .addVertex("laws", vertex, "in", "head")
                .addLayer("loss", new LossLayer.Builder(LossFunctions.LossFunction.MSE).build(), "laws")
                .setOutputs("loss").build());
        g.init();
        INDArray in = TestNets.array(TestNets.uniform(new SplittableRandom(2), 5, 3, 0.5, 1.5), DataType.FLOAT);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> g.outputSingle(in));
        assertEquals("law vertex 'laws': input 0 (the law inputs x) has 3 columns but the law set needs 2 (a[0], a[1]);"
                + " connect the network inputs the laws declare, in declared order, as the vertex's first input",
                e.getMessage());
    }

    @Test
    void theGraphHelperRefusesALawSetWithoutInputs() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> ConstrainedGraph.builder(LawSpec.of(TestNets.CONSTANT_AFFINE)).configuration());
        assertEquals("the law set declares no inputs, so there is nothing to connect to the law vertex's first input;"
                + " use LawLayer after the head of a MultiLayerNetwork", e.getMessage());
    }
}
