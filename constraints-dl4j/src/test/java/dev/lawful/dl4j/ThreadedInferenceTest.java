package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotSame;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.function.Function;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.learning.config.Adam;

/**
 * Inference from several threads, each on its own network clone ({@code net.clone()}), gives outputs bit-identical to
 * a single-threaded run on the original network: float and double, a MultiLayerNetwork with a law layer and a
 * ComputationGraph with a law vertex, for each tier. What is compared: every output's bits against the
 * single-threaded run's.
 *
 * <p>Deeplearning4j's parallel inference ({@code org.deeplearning4j.parallelism.ParallelInference}) lives in
 * {@code deeplearning4j-parallel-wrapper}, which this module does not depend on, so it is not tested here; many
 * threads calling {@code output()} concurrently on separate clones is what it would do per worker. (Deeplearning4j
 * declares {@code output()} synchronized on the network, so threads sharing one network would only take turns; the
 * clones are what actually run at the same time.)
 */
class ThreadedInferenceTest {
    private static final int THREADS = 6;
    private static final int ROUNDS = 4;
    /** Batch sizes the threads use, so that different threads run different shapes at the same time. */
    private static final int[] BATCHES = {1, 7, 32, 64};

    /** Bits of every value, widened to double (exact for float), so -0.0 and 0.0 or two NaNs are told apart. */
    private static long[] bits(INDArray a) {
        double[] v = TestNets.flat(a);
        long[] b = new long[v.length];
        for (int i = 0; i < v.length; i++) {
            b[i] = Double.doubleToRawLongBits(v[i]);
        }
        return b;
    }

    private static MultiLayerNetwork trainedLayerNet(String laws, DataType type, long seed) {
        LawLayer layer = LawLayer.of(laws);
        int p = layer.lawCompletion().outputWidth();
        int free = layer.lawCompletion().freeWidth();
        MultiLayerNetwork net = TestNets.mln(layer, 3, 16, free, type, new Adam(1e-2), seed);
        SplittableRandom r = new SplittableRandom(seed);
        INDArray in = TestNets.array(TestNets.uniform(r, 32, 3, -1, 1), type);
        INDArray labels = TestNets.array(TestNets.uniform(r, 32, p, -1, 1), type);
        for (int i = 0; i < 3; i++) {
            net.fit(in, labels);
        }
        return net;
    }

    private static ComputationGraph trainedGraph(String laws, DataType type, long seed) {
        LawSpec spec = LawSpec.of(laws);
        ComputationGraph g = ConstrainedGraph.builder(spec).hidden(16).dataType(type).seed(seed).build();
        SplittableRandom r = new SplittableRandom(seed);
        int n = spec.completion().inputWidth();
        int p = spec.completion().outputWidth();
        INDArray in = TestNets.array(TestNets.uniform(r, 32, n, 0.5, 1.5), type);
        INDArray labels = TestNets.array(TestNets.uniform(r, 32, p, -1, 1), type);
        for (int i = 0; i < 3; i++) {
            g.fit(new INDArray[] {in}, new INDArray[] {labels});
        }
        return g;
    }

    /**
     * Runs {@code THREADS} threads that start together, each on its own clone made inside the thread, each running
     * every batch {@code ROUNDS} times in its own order, and checks every output against the single-threaded one.
     *
     * @param cloneOf  makes a thread's own network and returns its inference function
     * @param batches  the inputs
     * @param expected the single-threaded outputs' bits, one per input
     * @return the number of outputs compared
     */
    private static int runConcurrently(java.util.function.Supplier<Function<INDArray, INDArray>> cloneOf,
                                       List<INDArray> batches, List<long[]> expected) throws Exception {
        ExecutorService pool = Executors.newFixedThreadPool(THREADS);
        CyclicBarrier start = new CyclicBarrier(THREADS);
        try {
            List<Future<Integer>> futures = new ArrayList<>();
            for (int t = 0; t < THREADS; t++) {
                final int thread = t;
                futures.add(pool.submit(() -> {
                    Function<INDArray, INDArray> own = cloneOf.get();
                    start.await(30, TimeUnit.SECONDS);
                    int compared = 0;
                    for (int round = 0; round < ROUNDS; round++) {
                        for (int k = 0; k < batches.size(); k++) {
                            int b = (k + thread + round) % batches.size();
                            long[] got = bits(own.apply(batches.get(b)));
                            assertArrayEquals(expected.get(b), got, "thread " + thread + ", round " + round
                                    + ", batch " + b + ": outputs differ from the single-threaded run");
                            compared++;
                        }
                    }
                    return compared;
                }));
            }
            int total = 0;
            for (Future<Integer> f : futures) {
                total += f.get(60, TimeUnit.SECONDS);
            }
            return total;
        } finally {
            pool.shutdownNow();
        }
    }

    private static List<INDArray> inputs(int width, DataType type, double lo, double hi, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        List<INDArray> out = new ArrayList<>();
        for (int b : BATCHES) {
            out.add(TestNets.array(TestNets.uniform(r, b, width, lo, hi), type));
        }
        return out;
    }

    private static void checkLayerNet(String laws, DataType type, long seed) throws Exception {
        MultiLayerNetwork net = trainedLayerNet(laws, type, seed);
        List<INDArray> in = inputs(3, type, -2, 2, seed + 1);
        List<long[]> expected = new ArrayList<>();
        for (INDArray x : in) {
            expected.add(bits(net.output(x)));
        }
        int compared = runConcurrently(() -> {
            MultiLayerNetwork own = net.clone();
            // the clone runs its own law layer (and so its own completion workspace)
            assertNotSame(net.getLayer(2), own.getLayer(2));
            return x -> own.output(x);
        }, in, expected);
        assertEquals(THREADS * ROUNDS * BATCHES.length, compared);
        // the original network, used again on this thread after the others, still gives the same numbers
        for (int k = 0; k < in.size(); k++) {
            assertArrayEquals(expected.get(k), bits(net.output(in.get(k))));
        }
    }

    private static void checkGraph(String laws, DataType type, long seed) throws Exception {
        ComputationGraph g = trainedGraph(laws, type, seed);
        List<INDArray> in = inputs(LawSpec.of(laws).completion().inputWidth(), type, 0.5, 1.5, seed + 1);
        List<long[]> expected = new ArrayList<>();
        for (INDArray x : in) {
            expected.add(bits(g.outputSingle(x)));
        }
        int compared = runConcurrently(() -> {
            ComputationGraph own = g.clone();
            assertNotSame(g.getVertex(ConstrainedGraph.LAWS), own.getVertex(ConstrainedGraph.LAWS));
            return x -> own.outputSingle(x);
        }, in, expected);
        assertEquals(THREADS * ROUNDS * BATCHES.length, compared);
        for (int k = 0; k < in.size(); k++) {
            assertArrayEquals(expected.get(k), bits(g.outputSingle(in.get(k))));
        }
    }

    @Test
    void aLayerNetworkOnCloneThreadsMatchesOneThreadInFloat() throws Exception {
        checkLayerNet(TestNets.CONSTANT_AFFINE, DataType.FLOAT, 11);
        checkLayerNet(TestNets.AFFINE_FREE, DataType.FLOAT, 12);
        checkLayerNet(TestNets.NONLINEAR, DataType.FLOAT, 13);
    }

    @Test
    void aLayerNetworkOnCloneThreadsMatchesOneThreadInDouble() throws Exception {
        checkLayerNet(TestNets.CONSTANT_AFFINE, DataType.DOUBLE, 21);
        checkLayerNet(TestNets.AFFINE_FREE, DataType.DOUBLE, 22);
        checkLayerNet(TestNets.NONLINEAR, DataType.DOUBLE, 23);
    }

    @Test
    void aGraphOnCloneThreadsMatchesOneThreadInFloat() throws Exception {
        checkGraph(TestNets.X_CONSTANT_AFFINE, DataType.FLOAT, 31);
        checkGraph(TestNets.X_AFFINE, DataType.FLOAT, 32);
        checkGraph(TestNets.X_NONLINEAR, DataType.FLOAT, 33);
    }

    @Test
    void aGraphOnCloneThreadsMatchesOneThreadInDouble() throws Exception {
        checkGraph(TestNets.X_CONSTANT_AFFINE, DataType.DOUBLE, 41);
        checkGraph(TestNets.X_AFFINE, DataType.DOUBLE, 42);
        checkGraph(TestNets.X_NONLINEAR, DataType.DOUBLE, 43);
    }
}
