package dev.lawful.dl4j;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.conf.ComputationGraphConfiguration;
import org.deeplearning4j.nn.conf.MultiLayerConfiguration;
import org.deeplearning4j.nn.conf.NeuralNetConfiguration;
import org.deeplearning4j.nn.conf.WorkspaceMode;
import org.deeplearning4j.nn.conf.layers.DenseLayer;
import org.deeplearning4j.nn.conf.layers.Layer;
import org.deeplearning4j.nn.conf.layers.LossLayer;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.nn.weights.WeightInit;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.learning.config.IUpdater;
import org.nd4j.linalg.lossfunctions.LossFunctions;

/** Small networks, seeded data and the core's documented residual bound, shared by the adapter's tests. */
final class TestNets {
    /** No inputs; two constant-coefficient laws; completes y[2], y[3]. */
    static final String CONSTANT_AFFINE = "output y[4]\n"
            + "law total: sum(y) = 1\n"
            + "law balance: y[0] - 2*y[1] = y[3]\n"
            + "complete y[2], y[3]\n";
    /** No inputs; the completed output's coefficient depends on a free output. */
    static final String AFFINE_FREE = "output y[3]\n"
            + "law ratio: (1 + y[0]^2)*y[2] = y[1] + 2\n"
            + "complete y[2]\n";
    /** No inputs; quadratic in the completed output, the guess picks the positive root. */
    static final String NONLINEAR = "output y[3]\n"
            + "law norm: y[2]^2 = y[0]^2 + y[1]^2 + 1\n"
            + "guess y[2] = y[0]^2 + y[1]^2 + 1\n"
            + "complete y[2]\n";
    /** Inputs with constant coefficients. */
    static final String X_CONSTANT_AFFINE = "input a[2]\noutput y[3]\n"
            + "law sum: y[0] + y[1] + y[2] = a[0] - 2*a[1]\n"
            + "complete y[2]\n";
    /** The completed output's coefficient depends on the inputs. */
    static final String X_AFFINE = "input a[2]\noutput y[3]\n"
            + "law weighted: (1 + a[0]^2)*y[2] + a[1]*y[0] = y[1] + 1\n"
            + "complete y[2]\n";
    /** Quadratic in the completed output, with inputs; the guess picks the positive root. */
    static final String X_NONLINEAR = "input a[2]\noutput y[2]\n"
            + "law norm: y[1]^2 = a[0]^2 + (a[1]*y[0])^2 + 1\n"
            + "guess y[1] = a[0]^2 + (a[1]*y[0])^2 + 1\n"
            + "complete y[1]\n";

    private TestNets() {
    }

    static NeuralNetConfiguration.Builder base(DataType type, IUpdater updater, long seed) {
        return new NeuralNetConfiguration.Builder()
                .seed(seed)
                .dataType(type)
                .updater(updater)
                .weightInit(WeightInit.XAVIER)
                .trainingWorkspaceMode(WorkspaceMode.ENABLED)
                .inferenceWorkspaceMode(WorkspaceMode.ENABLED);
    }

    /** features → dense(hidden, tanh) → head(headWidth, identity) → law layer → MSE loss layer. */
    static MultiLayerNetwork mln(Layer lawLayer, int features, int hidden, int headWidth, DataType type,
                                 IUpdater updater, long seed) {
        MultiLayerConfiguration conf = base(type, updater, seed).list()
                .layer(new DenseLayer.Builder().nIn(features).nOut(hidden).activation(Activation.TANH).build())
                .layer(new DenseLayer.Builder().nIn(hidden).nOut(headWidth).activation(Activation.IDENTITY).build())
                .layer(lawLayer)
                .layer(new LossLayer.Builder(LossFunctions.LossFunction.MSE).activation(Activation.IDENTITY).build())
                .build();
        MultiLayerNetwork net = new MultiLayerNetwork(conf);
        net.init();
        return net;
    }

    /**
     * in → dense(identity, nIn = nOut = inputWidth) → vertex input x (so that the gradient on x reaches parameters
     * and the gradient checker sees it); in → dense(hidden, tanh) → head → vertex input z; vertex → MSE loss.
     */
    static ComputationGraph graphWithMappedInputs(org.deeplearning4j.nn.conf.graph.GraphVertex vertex,
                                                  Completion c, int hidden, DataType type, IUpdater updater,
                                                  long seed) {
        int nIn = c.inputWidth();
        ComputationGraphConfiguration conf = base(type, updater, seed).graphBuilder()
                .addInputs("in")
                .addLayer("xmap", new DenseLayer.Builder().nIn(nIn).nOut(nIn).activation(Activation.IDENTITY).build(),
                        "in")
                .addLayer("hidden", new DenseLayer.Builder().nIn(nIn).nOut(hidden).activation(Activation.TANH).build(),
                        "in")
                .addLayer("head", new DenseLayer.Builder().nIn(hidden).nOut(c.freeWidth())
                        .activation(Activation.IDENTITY).build(), "hidden")
                .addVertex("laws", vertex, "xmap", "head")
                .addLayer("loss", new LossLayer.Builder(LossFunctions.LossFunction.MSE)
                        .activation(Activation.IDENTITY).build(), "laws")
                .setOutputs("loss")
                .build();
        ComputationGraph g = new ComputationGraph(conf);
        g.init();
        return g;
    }

    /** @return a {@code rows × cols} array of uniform values in [lo, hi), seeded */
    static double[][] uniform(SplittableRandom r, int rows, int cols, double lo, double hi) {
        double[][] v = new double[rows][cols];
        for (double[] row : v) {
            for (int j = 0; j < cols; j++) {
                row[j] = lo + (hi - lo) * r.nextDouble();
            }
        }
        return v;
    }

    static INDArray array(double[][] v, DataType type) {
        return Nd4j.createFromArray(v).castTo(type);
    }

    static double[] flat(INDArray a) {
        return a.castTo(DataType.DOUBLE).dup('c').data().asDouble();
    }

    /**
     * Asserts on every law of every sample the bound the core documents for its outputs:
     * |C_i| ≤ (d_i + 3)·2⁻⁵³·s_i (double), plus ½·Σ_j |∂C_i/∂y_c,j|·ulp_f32(y_c,j) over the completed outputs when
     * the outputs were rounded to float. Residuals and scales come from the law set's own evaluator.
     *
     * @return the largest |C_i| / bound_i seen (at most 1)
     */
    static double assertWithinDocumentedBound(Completion c, double[] x, double[] y, int batch, boolean fromFloat) {
        // Source: constraints-core Completion class documentation, "Exactness" (the documented bound)
        LawSet laws = c.laws();
        ExpandedLaws expanded = laws.expand();
        LawEvaluator ev = laws.evaluator();
        int n = ev.lawCount();
        int p = c.outputWidth();
        double[] residual = new double[batch * n];
        double[] scale = new double[batch * n];
        double[] jy = new double[batch * ev.outputNonzeros()];
        ev.evaluate(x, y, batch, residual, scale, jy, null);
        boolean[] completed = new boolean[p];
        for (int o : c.completedOutputs()) {
            completed[o] = true;
        }
        double worst = 0;
        for (int s = 0; s < batch; s++) {
            for (int i = 0; i < n; i++) {
                double bound = (expanded.roundingDepth(i) + 3) * 0x1p-53 * scale[s * n + i];
                if (fromFloat) {
                    int[] cols = ev.outputColumns(i);
                    double extra = 0;
                    for (int k = 0; k < cols.length; k++) {
                        if (completed[cols[k]]) {
                            double dc = jy[s * ev.outputNonzeros() + ev.outputOffset(i) + k];
                            extra += Math.abs(dc) * Math.ulp((float) y[s * p + cols[k]]);
                        }
                    }
                    bound += 0.5 * extra;
                }
                double r = Math.abs(residual[s * n + i]);
                if (!(r <= bound)) {
                    throw new AssertionError("sample " + s + ", law " + expanded.name(i) + ": |C| = " + r
                            + " exceeds the documented bound " + bound + " (scale " + scale[s * n + i] + ")");
                }
                if (bound > 0) {
                    worst = Math.max(worst, r / bound);
                }
            }
        }
        return worst;
    }
}
