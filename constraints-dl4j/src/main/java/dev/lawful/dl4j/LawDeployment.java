package dev.lawful.dl4j;

import java.io.File;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.zip.ZipEntry;
import java.util.zip.ZipFile;
import org.deeplearning4j.nn.conf.ComputationGraphConfiguration;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.graph.GraphVertex;
import org.deeplearning4j.nn.conf.graph.LayerVertex;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.util.ModelSerializer;
import org.nd4j.shade.jackson.databind.JsonNode;
import org.nd4j.shade.jackson.databind.ObjectMapper;

/**
 * The deployment path without Deeplearning4j at run time: reads the laws out of a trained constrained network (or out
 * of its saved file, without loading the parameters), so that a host runs the completion with {@code constraints-core}
 * alone. The host feeds {@link dev.lawful.enforce.Completion#forward(double[], double[], int, double[], byte[],
 * dev.lawful.enforce.Completion.Workspace) Completion.forward} the head's outputs (the activations just before the law
 * layer or vertex) and, for a vertex, the law inputs x; it gets the network's outputs bit for bit (for a float network,
 * after rounding the core's double result to float, as the network does).
 *
 * <p>Where the head's outputs are: in a {@code MultiLayerNetwork}, {@code net.feedForward(features, false)
 * .get(lawLayerIndex(net))} (the list starts with the input, so entry k is the input of layer k), or
 * {@code net.activateSelectedLayers(0, lawLayerIndex(net) - 1, features)}; in a graph built by
 * {@link ConstrainedGraph}, {@code graph.feedForward(features, false).get(ConstrainedGraph.HEAD)}, and x is the
 * network input itself.
 *
 * <p>A returned {@link LawSpec} is a copy: changing it does not change the network. Its text, completed outputs and
 * bad-sample policy are all a core-only host needs ({@code LawSet.parse}, {@code Completion.builder}); or use
 * {@link LawSpec#completion()} directly, which needs no Deeplearning4j class. When the laws declare limits and the
 * layer folds a normalizer, the layer moves a sample outside a limit in normalised units: build the host's completion
 * with {@link LawSpec#completion(double[])} given the layer's output scales ({@code getOutputScaling().getScale()},
 * saved in the configuration) to get the same outputs.
 */
public final class LawDeployment {
    private LawDeployment() {
    }

    /**
     * @param conf a network configuration
     * @return the specs of its law layers, in layer order (empty when it has none)
     */
    public static List<LawSpec> specs(MultiLayerConfiguration conf) {
        Objects.requireNonNull(conf, "conf");
        List<LawSpec> out = new ArrayList<>();
        for (int i = 0; i < conf.getConfs().size(); i++) {
            org.deeplearning4j.nn.conf.layers.Layer l = conf.getConf(i).getLayer();
            if (l instanceof LawLayer) {
                out.add(NdArrays.copy(((LawLayer) l).getSpec()));
            }
        }
        return Collections.unmodifiableList(out);
    }

    /**
     * @param conf a graph configuration
     * @return the specs of its law vertices and law layers, by vertex name, in the configuration's vertex order
     *         (empty when it has none)
     */
    public static Map<String, LawSpec> specs(ComputationGraphConfiguration conf) {
        Objects.requireNonNull(conf, "conf");
        Map<String, LawSpec> out = new LinkedHashMap<>();
        for (Map.Entry<String, GraphVertex> e : conf.getVertices().entrySet()) {
            LawSpec s = specOf(e.getValue());
            if (s != null) {
                out.put(e.getKey(), NdArrays.copy(s));
            }
        }
        return Collections.unmodifiableMap(out);
    }

    /**
     * @param net a network with exactly one law layer
     * @return a copy of that layer's spec
     * @throws IllegalArgumentException when the network has no law layer or more than one
     */
    public static LawSpec spec(MultiLayerNetwork net) {
        return single(specs(net.getLayerWiseConfigurations()), "the network");
    }

    /**
     * @param graph a graph with exactly one law vertex (or law layer)
     * @return a copy of its spec
     * @throws IllegalArgumentException when the graph has none or more than one
     */
    public static LawSpec spec(ComputationGraph graph) {
        return single(new ArrayList<>(specs(graph.getConfiguration()).values()), "the graph");
    }

    /**
     * Reads the laws from a file saved by {@code ModelSerializer} (a {@code MultiLayerNetwork} or a
     * {@code ComputationGraph}), from its configuration only: the parameters are not loaded.
     *
     * @param savedModel the saved network
     * @return a copy of the spec of its only law layer or vertex
     * @throws IOException when the file cannot be read or holds no configuration
     * @throws IllegalArgumentException when the saved network has no law layer or vertex, or more than one
     */
    public static LawSpec spec(File savedModel) throws IOException {
        String json;
        try (ZipFile zip = new ZipFile(savedModel)) {
            ZipEntry e = zip.getEntry(ModelSerializer.CONFIGURATION_JSON);
            if (e == null) {
                throw new IOException(savedModel + " holds no " + ModelSerializer.CONFIGURATION_JSON
                        + "; is it a file written by ModelSerializer?");
            }
            try (InputStream in = zip.getInputStream(e)) {
                json = new String(in.readAllBytes(), StandardCharsets.UTF_8);
            }
        }
        JsonNode root = new ObjectMapper().readTree(json);
        String what = "the network saved in " + savedModel;
        if (root != null && root.has("vertices")) {
            return single(new ArrayList<>(specs(ComputationGraphConfiguration.fromJson(json)).values()), what);
        }
        return single(specs(MultiLayerConfiguration.fromJson(json)), what);
    }

    /**
     * @param net a network with exactly one law layer
     * @return the index of that layer; its input (the head's outputs) is
     *         {@code net.feedForward(features, false).get(index)}
     * @throws IllegalArgumentException when the network has no law layer or more than one
     */
    public static int lawLayerIndex(MultiLayerNetwork net) {
        MultiLayerConfiguration conf = net.getLayerWiseConfigurations();
        int found = -1;
        for (int i = 0; i < conf.getConfs().size(); i++) {
            if (conf.getConf(i).getLayer() instanceof LawLayer) {
                if (found >= 0) {
                    throw new IllegalArgumentException("the network has more than one law layer (layers " + found
                            + " and " + i + "); use specs(MultiLayerConfiguration) and pick one");
                }
                found = i;
            }
        }
        if (found < 0) {
            throw new IllegalArgumentException(noLaws("the network"));
        }
        return found;
    }

    private static LawSpec specOf(GraphVertex v) {
        if (v instanceof LawVertex) {
            return ((LawVertex) v).getSpec();
        }
        if (v instanceof LayerVertex && ((LayerVertex) v).getLayerConf().getLayer() instanceof LawLayer) {
            return ((LawLayer) ((LayerVertex) v).getLayerConf().getLayer()).getSpec();
        }
        return null;
    }

    private static LawSpec single(List<LawSpec> specs, String what) {
        if (specs.isEmpty()) {
            throw new IllegalArgumentException(noLaws(what));
        }
        if (specs.size() > 1) {
            throw new IllegalArgumentException(what + " has " + specs.size() + " law layers or vertices; use specs("
                    + "MultiLayerConfiguration) or specs(ComputationGraphConfiguration) and pick one");
        }
        return specs.get(0);
    }

    private static String noLaws(String what) {
        return what + " has no law layer or law vertex, so there are no laws to deploy; build it with LawLayer,"
                + " LawVertex or ConstrainedGraph";
    }
}
