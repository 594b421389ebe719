package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.lawful.algebra.LawSet;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;

/**
 * One {@link Completion} shared by 16 threads at once, each with its own workspace, gives bit-identical results to a
 * single thread, for every tier: forward (double and float), backward and jacobians. The shared instance is first
 * used by all threads together, so any lazy initialisation inside it races; the single-thread reference comes from a
 * separate instance built from the same law text.
 */
class CompletionThreadTest {
    private static final int THREADS = 16;
    private static final int ROUNDS = 4;

    /** Everything one pass computes for a batch. */
    private record Results(double[] y, float[] yf, double[] gz, double[] gx, double[] dydz, double[] dydx) {
        void assertSame(Results other, String what) {
            assertArrayEquals(y, other.y, 0.0, what + ": forward");
            assertArrayEquals(yf, other.yf, 0.0f, what + ": forward (float)");
            assertArrayEquals(gz, other.gz, 0.0, what + ": backward ḡz");
            assertArrayEquals(gx, other.gx, 0.0, what + ": backward ḡx");
            assertArrayEquals(dydz, other.dydz, 0.0, what + ": dy/dz");
            assertArrayEquals(dydx, other.dydx, 0.0, what + ": dy/dx");
        }
    }

    private static Results pass(Completion c, double[] x, double[] z, double[] gy, int batch) {
        Completion.Workspace ws = c.newWorkspace();
        int p = c.outputWidth();
        double[] y = new double[batch * p];
        c.forward(x, z, batch, y, null, ws);
        float[] xf = new float[x.length];
        float[] zf = new float[z.length];
        for (int i = 0; i < x.length; i++) {
            xf[i] = (float) x[i];
        }
        for (int i = 0; i < z.length; i++) {
            zf[i] = (float) z[i];
        }
        float[] yf = new float[batch * p];
        c.forward(xf, zf, batch, yf, null, ws);
        double[] gz = new double[batch * c.freeWidth()];
        double[] gx = new double[batch * c.inputWidth()];
        c.backward(x, y, gy, batch, gz, gx, ws);
        double[] dydz = new double[batch * p * c.freeWidth()];
        double[] dydx = new double[batch * p * c.inputWidth()];
        c.jacobians(x, y, batch, dydz, dydx, ws);
        return new Results(y, yf, gz, gx, dydz, dydx);
    }

    private static void check(CompletionModelsTest.Model model, SplittableRandom r) throws Exception {
        String text = model.text();
        Completion shared = Completion.of(LawSet.parse("<shared>", text));
        Completion alone = Completion.of(LawSet.parse("<alone>", text));
        assertEquals(model.tier, shared.tier());
        int batch = 150;
        double[][] drawn = model.batch(r, batch);
        double[] gy = new double[batch * model.p];
        for (int i = 0; i < gy.length; i++) {
            gy[i] = CompletionModelsTest.signed(r, 0.1, 1);
        }
        CyclicBarrier start = new CyclicBarrier(THREADS);
        ExecutorService pool = Executors.newFixedThreadPool(THREADS);
        try {
            List<Future<List<Results>>> futures = new ArrayList<>();
            for (int t = 0; t < THREADS; t++) {
                futures.add(pool.submit(() -> {
                    start.await(30, TimeUnit.SECONDS);
                    List<Results> out = new ArrayList<>();
                    for (int k = 0; k < ROUNDS; k++) {
                        out.add(pass(shared, drawn[0], drawn[1], gy, batch));
                    }
                    return out;
                }));
            }
            Results reference = pass(alone, drawn[0], drawn[1], gy, batch);
            for (int t = 0; t < THREADS; t++) {
                List<Results> got = futures.get(t).get(60, TimeUnit.SECONDS);
                for (int k = 0; k < ROUNDS; k++) {
                    reference.assertSame(got.get(k), model.tier.label() + ", thread " + t + ", round " + k);
                }
            }
            reference.assertSame(pass(shared, drawn[0], drawn[1], gy, batch), "after the threads");
        } finally {
            pool.shutdownNow();
        }
    }

    /** A random model with at least two laws and one free output. */
    private static CompletionModelsTest.Model model(
            java.util.function.Function<SplittableRandom, CompletionModelsTest.Model> kind, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        CompletionModelsTest.Model m;
        do {
            m = kind.apply(r);
        } while (m.completed.length < 2 || m.free().length < 1);
        return m;
    }

    @Test
    void constantAffineIsBitIdenticalAcrossThreads() throws Exception {
        check(model(CompletionModelsTest::constantAffine, 0x7A1L), new SplittableRandom(1));
    }

    @Test
    void affineIsBitIdenticalAcrossThreads() throws Exception {
        check(model(CompletionModelsTest::inputAffine, 0x7A2L), new SplittableRandom(2));
    }

    @Test
    void nonlinearIsBitIdenticalAcrossThreads() throws Exception {
        check(model(CompletionModelsTest::nonlinear, 0x7A3L), new SplittableRandom(3));
    }
}
