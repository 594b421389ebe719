package dev.lawful.bench;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.BoundCheck;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Projection;
import java.util.Arrays;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OperationsPerInvocation;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;
import org.openjdk.jmh.infra.BenchmarkParams;
import org.openjdk.jmh.infra.Blackhole;

/**
 * What exactness costs in the enforcement kernels: forward and backward of every tier and of projection, on the
 * {@link GridLaws} law sets (demo structures) of any size, against the same mathematics written by hand
 * ({@link HandKernels}, the practical limit) and written with ND4J array ops ({@link Nd4jKernels}, what a user
 * would naturally write).
 *
 * <p>Every invocation processes {@value #SAMPLES} samples as {@code SAMPLES / batch} calls of {@code batch}
 * samples, each call on its own arrays, so scores are <b>nanoseconds per sample</b> at every batch size
 * ({@link OperationsPerInvocation}); per batch is score × batch. The library's entry points are {@code forward},
 * {@code forwardFloat}, {@code backward} and {@code backwardFloat} (float arrays in and out, double inside);
 * the baselines {@code handForward}, {@code handBackward}, {@code nd4jForward} and {@code nd4jBackward} are
 * double. Backward computes the gradients on the free outputs and on the inputs. Before measuring, the setup
 * checks that each baseline agrees with the library to 1e-9 relative, so a faster baseline is never a wrong one.
 *
 * <p>Parameters: {@code tier} (constant-affine, affine, nonlinear, projection), {@code batch}, {@code free}
 * (free outputs; projection moves all free + laws outputs), {@code laws}. The defaults are one point (1024, 64,
 * 4); the full grid is
 * <pre>
 * -p batch=64,1024,8192 -p free=16,64,512 -p laws=1,4,32
 * </pre>
 * {@link #bytesPerSample} gives the bytes each entry point must read and write per sample (the arrays passed in
 * and out; the constant coefficients stay in cache), so the memory-bandwidth bound of one core is
 * {@code bytesPerSample / 23 GB/s} per sample ({@link RatioTable} prints it next to each score).
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class KernelBench {
    /** Samples per invocation, whatever the batch. */
    static final int SAMPLES = 8192;

    /** Which enforcer and law set; see {@link GridLaws}. */
    @Param({"constant-affine", "affine", "nonlinear", "projection"})
    public String tier;

    /** Samples per call; must divide {@value #SAMPLES}. */
    @Param({"1024"})
    public int batch;

    /** Free outputs per sample. */
    @Param({"64"})
    public int free;

    /** Laws (completed outputs) per sample. */
    @Param({"4"})
    public int laws;

    Completion completion;
    Completion.Workspace completionWorkspace;
    Projection projection;
    Projection.Workspace projectionWorkspace;
    HandKernels hand;
    Nd4jKernels nd4j;
    int chunks;
    /** Per call: inputs, free outputs (projection: incoming outputs), outputs, upstream gradient, gradients. */
    double[][] x;
    double[][] z;
    double[][] y;
    double[][] gy;
    double[][] gz;
    double[][] gx;
    float[][] xf;
    float[][] zf;
    float[][] yf;
    float[][] gyf;
    float[][] gzf;
    float[][] gxf;
    INDArray[] xa;
    INDArray[] za;
    INDArray[] ya;
    INDArray[] gya;

    /**
     * Bytes an entry point reads and writes per sample: forward reads x and z and writes y; backward reads x, y
     * and ḡ and writes ḡ_z and ḡ_x (projection: reads x, the incoming outputs y and ḡ, writes ḡ_y and ḡ_x).
     *
     * @param tier         the {@code tier} parameter
     * @param backward     false for forward, true for backward
     * @param elementBytes 8 for the double entry points, 4 for the float ones
     * @param free         free outputs per sample
     * @param laws         laws per sample
     * @return bytes per sample; times the batch gives bytes per batch
     */
    public static long bytesPerSample(String tier, boolean backward, int elementBytes, int free, int laws) {
        long in = GridLaws.inputWidth(tier, laws);
        long p = free + laws;
        long freeSide = tier.equals("projection") ? p : free;
        long elements = backward ? in + p + p + freeSide + in : in + freeSide + p;
        return elements * elementBytes;
    }

    /**
     * Builds the law set, the enforcer, the inputs and, for the ND4J benchmarks only, the ND4J arrays (so the
     * other benchmarks never load ND4J).
     *
     * @param params which benchmark is about to run
     */
    @Setup(Level.Trial)
    public void setUp(BenchmarkParams params) {
        if (SAMPLES % batch != 0) {
            throw new IllegalArgumentException("batch must divide " + SAMPLES + ", found " + batch);
        }
        chunks = SAMPLES / batch;
        LawSet set = LawSet.parse(tier + ".law", GridLaws.text(tier, free, laws));
        int nIn = GridLaws.inputWidth(tier, laws);
        int p = free + laws;
        int freeSide = tier.equals("projection") ? p : free;
        if (tier.equals("projection")) {
            projection = Projection.of(set);
            projectionWorkspace = projection.newWorkspace();
        } else {
            completion = Completion.of(set);
            completionWorkspace = completion.newWorkspace();
            int[] expected = new int[free];
            Arrays.setAll(expected, j -> laws + j);
            if (!Arrays.equals(completion.freeOutputs(), expected)) {
                throw new IllegalStateException("free outputs are not y[" + laws + ":" + p + "] in order");
            }
        }
        SplittableRandom random = new SplittableRandom(7);
        x = new double[chunks][batch * nIn];
        z = new double[chunks][batch * freeSide];
        y = new double[chunks][batch * p];
        gy = new double[chunks][batch * p];
        gz = new double[chunks][batch * freeSide];
        gx = new double[chunks][batch * nIn];
        for (int c = 0; c < chunks; c++) {
            for (int i = 0; i < x[c].length; i++) {
                boolean coefficient = tier.equals("affine") && i % nIn < laws;
                x[c][i] = coefficient ? 1 + random.nextDouble() : 2 * random.nextDouble() - 1;
            }
            fill(z[c], random);
            fill(gy[c], random);
        }
        xf = narrow(x);
        zf = narrow(z);
        gyf = narrow(gy);
        yf = new float[chunks][batch * p];
        gzf = new float[chunks][batch * freeSide];
        gxf = new float[chunks][batch * nIn];
        forward();
        forwardFloat();
        hand = new HandKernels(tier, free, laws);
        double[] handY = new double[batch * p];
        hand.forward(x[0], z[0], batch, handY);
        agree("hand-written forward", y[0], handY);
        double[] handGz = new double[gz[0].length];
        double[] handGx = new double[gx[0].length];
        // projection's backward needs the incoming outputs, completion's the solution
        double[] at = tier.equals("projection") ? z[0] : y[0];
        hand.backward(x[0], at, gy[0], batch, handGz, handGx);
        backward();
        agree("hand-written backward (free outputs)", gz[0], handGz);
        agree("hand-written backward (inputs)", gx[0], handGx);
        if (params.getBenchmark().contains("nd4j")) {
            setUpNd4j();
        }
    }

    private void setUpNd4j() {
        Nd4j.setDefaultDataTypes(DataType.DOUBLE, DataType.DOUBLE);
        nd4j = new Nd4jKernels(tier, free, laws);
        xa = new INDArray[chunks];
        za = new INDArray[chunks];
        ya = new INDArray[chunks];
        gya = new INDArray[chunks];
        int nIn = x[0].length / batch;
        int p = y[0].length / batch;
        for (int c = 0; c < chunks; c++) {
            xa[c] = Nd4j.create(x[c], new long[] {batch, nIn}, DataType.DOUBLE);
            za[c] = Nd4j.create(z[c], new long[] {batch, z[c].length / batch}, DataType.DOUBLE);
            ya[c] = Nd4j.create(tier.equals("projection") ? z[c] : y[c], new long[] {batch, p}, DataType.DOUBLE);
            gya[c] = Nd4j.create(gy[c], new long[] {batch, p}, DataType.DOUBLE);
        }
        agree("ND4J forward", y[0], nd4j.forward(xa[0], za[0]).dup('c').data().asDouble());
        INDArray[] g = nd4j.backward(xa[0], ya[0], gya[0]);
        agree("ND4J backward (free outputs)", gz[0], g[0].dup('c').data().asDouble());
        agree("ND4J backward (inputs)", gx[0], g[1].dup('c').data().asDouble());
    }

    private static void fill(double[] a, SplittableRandom random) {
        for (int i = 0; i < a.length; i++) {
            a[i] = 2 * random.nextDouble() - 1;
        }
    }

    private static float[][] narrow(double[][] a) {
        float[][] r = new float[a.length][];
        for (int c = 0; c < a.length; c++) {
            r[c] = new float[a[c].length];
            for (int i = 0; i < a[c].length; i++) {
                r[c][i] = (float) a[c][i];
            }
        }
        return r;
    }

    private static void agree(String what, double[] expected, double[] actual) {
        double largest = 0;
        double worst = 0;
        for (int i = 0; i < expected.length; i++) {
            largest = Math.max(largest, Math.abs(expected[i]));
            worst = Math.max(worst, Math.abs(expected[i] - actual[i]));
        }
        if (expected.length != actual.length || !(worst <= 1e-9 * Math.max(1, largest))) {
            throw new IllegalStateException(what + " disagrees with the library: largest difference " + worst
                    + " for values up to " + largest);
        }
    }

    /** Library forward, double entry point: completed (or projected) outputs with every law at rounding level. */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public double[][] forward() {
        for (int c = 0; c < chunks; c++) {
            if (projection != null) {
                projection.forward(x[c], z[c], batch, y[c], null, projectionWorkspace);
            } else {
                completion.forward(x[c], z[c], batch, y[c], null, completionWorkspace);
            }
        }
        return y;
    }

    /**
     * Library forward without the final certifying evaluation ({@link BoundCheck#SKIP}), as a training pass runs
     * it; the same solve, nothing certified, and like the hand-written kernel it checks no bound. Projection has no
     * such option: there it runs the projection's own forward and the ratio table leaves the cell out.
     */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public double[][] forwardSkip() {
        for (int c = 0; c < chunks; c++) {
            if (projection != null) {
                projection.forward(x[c], z[c], batch, y[c], null, projectionWorkspace);
            } else {
                completion.forward(x[c], z[c], batch, y[c], null, completionWorkspace, BoundCheck.SKIP);
            }
        }
        return y;
    }

    /** Library forward, float entry point (double inside, rounded once). */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public float[][] forwardFloat() {
        for (int c = 0; c < chunks; c++) {
            if (projection != null) {
                projection.forward(xf[c], zf[c], batch, yf[c], null, projectionWorkspace);
            } else {
                completion.forward(xf[c], zf[c], batch, yf[c], null, completionWorkspace);
            }
        }
        return yf;
    }

    /** Library backward, double entry point: gradients on the free outputs (projection: all outputs) and inputs. */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public double[][] backward() {
        for (int c = 0; c < chunks; c++) {
            if (projection != null) {
                projection.backward(x[c], z[c], batch, gy[c], gz[c], gx[c], null, projectionWorkspace);
            } else {
                completion.backward(x[c], y[c], gy[c], batch, gz[c], gx[c], completionWorkspace);
            }
        }
        return gz;
    }

    /** Library backward, float entry point. */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public float[][] backwardFloat() {
        for (int c = 0; c < chunks; c++) {
            if (projection != null) {
                projection.backward(xf[c], zf[c], batch, gyf[c], gzf[c], gxf[c], null, projectionWorkspace);
            } else {
                completion.backward(xf[c], yf[c], gyf[c], batch, gzf[c], gxf[c], completionWorkspace);
            }
        }
        return gzf;
    }

    /** Baseline: the same forward written by hand for this law set ({@link HandKernels}). */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public double[][] handForward() {
        for (int c = 0; c < chunks; c++) {
            hand.forward(x[c], z[c], batch, y[c]);
        }
        return y;
    }

    /** Baseline: the same backward written by hand for this law set. */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public double[][] handBackward() {
        for (int c = 0; c < chunks; c++) {
            hand.backward(x[c], projection != null ? z[c] : y[c], gy[c], batch, gz[c], gx[c]);
        }
        return gz;
    }

    /** The same forward with ND4J array ops ({@link Nd4jKernels}), double. */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public void nd4jForward(Blackhole sink) {
        for (int c = 0; c < chunks; c++) {
            sink.consume(nd4j.forward(xa[c], za[c]));
        }
    }

    /** The same backward with ND4J array ops, double. */
    @Benchmark
    @OperationsPerInvocation(SAMPLES)
    public void nd4jBackward(Blackhole sink) {
        for (int c = 0; c < chunks; c++) {
            sink.consume(nd4j.backward(xa[c], ya[c], gya[c]));
        }
    }
}
