package dev.lawful.bench;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.util.Locale;
import java.util.SplittableRandom;

/**
 * Prints the residuals completion reaches for the benchmark law set of each tier, in units of the rounding error
 * of the law's scale: the largest |C_i| / scale_i over a random batch, divided by 2⁻⁵³ for the double entry point
 * and by 2⁻²⁴ for the float one. Not a JMH suite: a measurement of exactness, not of time.
 *
 * <pre>
 * java -cp benchmarks/target/benchmarks.jar dev.lawful.bench.ResidualLevels [batch]
 * </pre>
 */
public final class ResidualLevels {
    private ResidualLevels() {
    }

    /** @param args optional batch size (default 100000) */
    public static void main(String[] args) {
        int batch = args.length > 0 ? Integer.parseInt(args[0]) : 100_000;
        System.out.printf(Locale.ROOT, "%-16s %10s %22s %22s%n", "tier", "samples", "max |C|/scale (double)",
                "max |C|/scale (float)");
        for (String tier : new String[] {"constant-affine", "affine", "nonlinear"}) {
            CompletionBench bench = new CompletionBench();
            bench.tier = tier;
            bench.setUp();
            String text = tier.equals("constant-affine") ? CompletionBench.CONSTANT_AFFINE
                    : tier.equals("affine") ? CompletionBench.AFFINE : CompletionBench.NONLINEAR;
            LawSet laws = LawSet.parse(tier + ".law", text);
            Completion c = Completion.of(laws);
            SplittableRandom random = new SplittableRandom(11);
            double[] x = new double[batch * c.inputWidth()];
            double[] z = new double[batch * c.freeWidth()];
            int perSample = bench.x.length / CompletionBench.BATCH;
            int freePerSample = bench.z.length / CompletionBench.BATCH;
            for (int s = 0; s < batch; s++) {
                int from = random.nextInt(CompletionBench.BATCH);
                System.arraycopy(bench.x, from * perSample, x, s * perSample, perSample);
                System.arraycopy(bench.z, from * freePerSample, z, s * freePerSample, freePerSample);
                for (int i = 0; i < perSample; i++) {
                    x[s * perSample + i] *= 1 + 0.01 * (random.nextDouble() - 0.5);
                }
            }
            double[] y = new double[batch * c.outputWidth()];
            c.forward(x, z, batch, y, null, c.newWorkspace());
            double worstDouble = worst(laws, x, y, batch) / 0x1p-53;
            float[] xf = new float[x.length];
            float[] zf = new float[z.length];
            float[] yf = new float[y.length];
            for (int i = 0; i < x.length; i++) {
                xf[i] = (float) x[i];
            }
            for (int i = 0; i < z.length; i++) {
                zf[i] = (float) z[i];
            }
            c.forward(xf, zf, batch, yf, null, c.newWorkspace());
            double[] xw = new double[x.length];
            double[] yw = new double[y.length];
            for (int i = 0; i < x.length; i++) {
                xw[i] = xf[i];
            }
            for (int i = 0; i < y.length; i++) {
                yw[i] = yf[i];
            }
            double worstFloat = worst(laws, xw, yw, batch) / 0x1p-24;
            System.out.printf(Locale.ROOT, "%-16s %10d %17.2f ulp %17.2f ulp%n", tier, batch, worstDouble, worstFloat);
        }
    }

    private static double worst(LawSet laws, double[] x, double[] y, int batch) {
        LawEvaluator e = laws.evaluator();
        double[] r = new double[batch * e.lawCount()];
        double[] s = new double[batch * e.lawCount()];
        e.residuals(x, y, batch, r, s);
        double worst = 0;
        for (int i = 0; i < r.length; i++) {
            worst = Math.max(worst, s[i] > 0 ? Math.abs(r[i]) / s[i] : (r[i] == 0 ? 0 : Double.POSITIVE_INFINITY));
        }
        return worst;
    }
}
