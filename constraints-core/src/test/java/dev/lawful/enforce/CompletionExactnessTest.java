package dev.lawful.enforce;

import static dev.lawful.enforce.CompletionModelsTest.U;
import static dev.lawful.enforce.CompletionModelsTest.block;
import static dev.lawful.enforce.CompletionModelsTest.exactCheck;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static dev.lawful.enforce.CompletionModelsTest.uniform;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.CompletionModelsTest.Law;
import dev.lawful.enforce.CompletionModelsTest.Model;
import java.util.Arrays;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Exactness of {@link Completion}: on random law sets of every tier, every sample of random batches satisfies the
 * bound of the class documentation after {@code forward}, for the double and the float entry points.
 *
 * <p>Each law is judged twice: by the library's own residual ({@link LawEvaluator}, compensated sums, the quantity
 * the documented bound is stated for) and by an independent evaluation of the law as the test generated it, in
 * double-double arithmetic (exact products by {@link Math#fma}), which may differ from the computed residual by the
 * rounding of each addend's products.
 *
 * <p>The random law sets are those of {@link CompletionModelsTest}.
 */
class CompletionExactnessTest {
    // ---- checks ----------------------------------------------------------------------------------------------

    /** Copies outputs from the completion's layout to declaration order. */
    static double[] declared(Completion c, double[] y, int batch) {
        if (c.layout() == Completion.Layout.DECLARED) {
            return y.clone();
        }
        int p = c.outputWidth();
        int[] free = c.freeOutputs();
        int[] completed = c.completedOutputs();
        double[] out = new double[y.length];
        for (int s = 0; s < batch; s++) {
            for (int f = 0; f < free.length; f++) {
                out[s * p + free[f]] = y[s * p + f];
            }
            for (int k = 0; k < completed.length; k++) {
                out[s * p + completed[k]] = y[s * p + free.length + k];
            }
        }
        return out;
    }

    /** Largest |C_i| / s_i a check has seen: how close the results come to the bound. */
    static final class Worst {
        double relative;

        void see(double residual, double scale) {
            if (scale > 0) {
                relative = Math.max(relative, Math.abs(residual) / scale);
            }
        }
    }

    /**
     * Asserts the documented bound on every law of every sample with the library's residual:
     * |C_i| ≤ (d_i + 3)·2⁻⁵³·s_i (d_i the rounding depth, s_i the natural scale), plus, for float outputs,
     * ½·Σ_j |∂C_i/∂y_c,j|·ulp_f32(y_c,j) over the completed outputs.
     *
     * @param y outputs in declaration order
     */
    static void assertDocumentedBound(Completion c, double[] x, double[] y, int batch, boolean fromFloat, Worst worst) {
        LawSet laws = c.laws();
        ExpandedLaws expanded = laws.expand();
        LawEvaluator ev = laws.evaluator();
        int n = ev.lawCount();
        int p = c.outputWidth();
        double[] residual = new double[batch * n];
        double[] scale = new double[batch * n];
        double[] jy = new double[batch * ev.outputNonzeros()];
        ev.evaluate(x, y, batch, residual, scale, jy, null);
        boolean[] isCompleted = new boolean[p];
        for (int o : c.completedOutputs()) {
            isCompleted[o] = true;
        }
        for (int s = 0; s < batch; s++) {
            for (int i = 0; i < n; i++) {
                int d = expanded.roundingDepth(i);
                double bound = (d + 3) * U * scale[s * n + i];
                if (fromFloat) {
                    int[] cols = ev.outputColumns(i);
                    double extra = 0;
                    double floor = 0;
                    for (int k = 0; k < cols.length; k++) {
                        if (isCompleted[cols[k]]) {
                            double dc = jy[s * ev.outputNonzeros() + ev.outputOffset(i) + k];
                            extra += Math.abs(dc) * Math.ulp((float) y[s * p + cols[k]]);
                            floor += Math.abs(dc) * Float.MIN_VALUE;
                        }
                    }
                    bound += 0.5 * extra;
                    if (c.tier() != Tier.NONLINEAR) {
                        // the documented simplification ½·Σ_j |∂C_i/∂y_c,j|·ulp_f32(y_c,j) ≤ 2⁻²⁴·s_i (one float ulp of
                        // the magnitude), which holds for addends linear in the completed outputs (above float's
                        // subnormal range, where ulp_f32 stops shrinking)
                        final int sample = s;
                        final int law = i;
                        final double term = 0.5 * extra;
                        final double allowed = 0x1p-24 * scale[s * n + i] * (1 + 1e-12) + 0.5 * floor;
                        assertTrue(term <= allowed, () -> "sample " + sample + ", law "
                                + expanded.name(law) + ": float rounding term " + term + " exceeds 2⁻²⁴·s");
                    }
                }
                double r = residual[s * n + i];
                worst.see(r, scale[s * n + i]);
                if (!(Math.abs(r) <= bound)) {
                    fail("sample " + s + ", law " + expanded.name(i) + ": |C| = " + Math.abs(r) + " exceeds the bound "
                            + bound + " (scale " + scale[s * n + i] + ", rounding depth " + d
                            + (fromFloat ? ", float" : "") + ")\n" + laws);
                }
            }
        }
    }


    /**
     * The same bound against the exact residual of the law as generated (in double-double; exp and log are the StrictMath
     * values the library also uses), widened by the rounding the evaluator makes in each addend
     * (|addend|·roundings·2⁻⁵³) and by the final rounding of the compensated sum. The natural scale is recomputed
     * from the model (the sum of the addends' magnitudes, as documented) and compared with the library's.
     *
     * @param y outputs in declaration order
     */
    static void assertExactBound(Model model, Completion c, double[] x, double[] y, int batch, boolean fromFloat,
                                 Worst worst) {
        int q = model.q;
        int p = model.p;
        ExpandedLaws expanded = c.laws().expand();
        LawEvaluator ev = c.laws().evaluator();
        double[] libraryScale = new double[batch * ev.lawCount()];
        ev.residuals(x, y, batch, null, libraryScale);
        double[] v = new double[q + p];
        for (int s = 0; s < batch; s++) {
            System.arraycopy(x, s * q, v, 0, q);
            System.arraycopy(y, s * p, v, q, p);
            double[][] blk = fromFloat ? block(model, v) : null;
            for (int i = 0; i < model.laws.size(); i++) {
                Law law = model.laws.get(i);
                int d = expanded.roundingDepth(i);
                double[] check = exactCheck(law, v, d);
                double residual = check[0];
                double scale = check[1];
                double bound = check[2];
                final int law_ = i;
                assertEquals(scale, libraryScale[s * ev.lawCount() + i], 1e-13 * scale,
                        () -> "natural scale of law " + law_ + " (sum of the addends' magnitudes " + scale + ")");
                if (fromFloat) {
                    double extra = 0;
                    for (int k = 0; k < model.completed.length; k++) {
                        extra += Math.abs(blk[i][k]) * Math.ulp((float) v[q + model.completed[k]]);
                    }
                    bound += 0.5 * extra * (1 + 1e-6);
                }
                worst.see(residual, scale);
                if (!(Math.abs(residual) <= bound)) {
                    fail("sample " + s + ", law " + law.name() + ": exact |C| = " + Math.abs(residual) + " exceeds "
                            + bound + " (scale " + scale + ", rounding depth " + d + (fromFloat ? ", float" : "")
                            + ")\n" + model.text());
                }
            }
        }
    }

    /**
     * Runs one model through both entry points and checks every sample.
     *
     * @param worst null, or four records of the largest relative residual seen: documented and exact check, for double
     *              and for float outputs
     */
    static void checkModel(Model model, SplittableRandom r, Worst[] worst) {
        Worst[] w = worst != null ? worst : new Worst[] {new Worst(), new Worst(), new Worst(), new Worst()};
        LawSet laws = model.lawSet();
        Completion.Layout layout = r.nextBoolean() ? Completion.Layout.DECLARED : Completion.Layout.FREE_FIRST;
        Completion c = Completion.builder(laws).layout(layout).build();
        assertEquals(model.tier, c.tier(), () -> "tier of\n" + model.text());
        assertTrue(Arrays.equals(model.free(), c.freeOutputs()), "free outputs");
        Completion.Workspace ws = c.newWorkspace();
        for (int round = 0; round < 3; round++) {
            int batch = 1 + r.nextInt(round == 0 ? 3 : 150);
            double[][] drawn = model.batch(r, batch);
            double[] x = drawn[0];
            double[] z = drawn[1];
            double[] y = new double[batch * model.p];
            byte[] status = new byte[batch];
            c.forward(x, z, batch, y, status, ws);
            double[] yd = declared(c, y, batch);
            for (int s = 0; s < batch; s++) {
                assertEquals(SampleStatus.OK, status[s], "status of sample " + s);
                int[] free = model.free();
                for (int f = 0; f < free.length; f++) {
                    // free outputs pass through bit for bit
                    assertEquals(z[s * free.length + f], yd[s * model.p + free[f]], 0.0, "free output");
                }
            }
            assertDocumentedBound(c, x, yd, batch, false, w[0]);
            assertExactBound(model, c, x, yd, batch, false, w[1]);
            if (model.tier == Tier.NONLINEAR) {
                // Newton found the intended root, not another one
                double[] rows = drawn[2];
                for (int s = 0; s < batch; s++) {
                    for (int k : model.completed) {
                        double want = rows[s * (model.q + model.p) + model.q + k];
                        assertEquals(want, yd[s * model.p + k], 1e-9 * Math.abs(want), "root of sample " + s);
                    }
                }
            }
            // float entry point on the same samples rounded to float
            float[] xf = new float[x.length];
            float[] zf = new float[z.length];
            for (int i = 0; i < x.length; i++) {
                xf[i] = (float) x[i];
            }
            for (int i = 0; i < z.length; i++) {
                zf[i] = (float) z[i];
            }
            float[] yf = new float[y.length];
            c.forward(xf, zf, batch, yf, status, ws);
            double[] xw = new double[x.length];
            double[] yw = new double[y.length];
            for (int i = 0; i < x.length; i++) {
                xw[i] = xf[i];
            }
            for (int i = 0; i < y.length; i++) {
                yw[i] = yf[i];
            }
            double[] ywd = declared(c, yw, batch);
            assertDocumentedBound(c, xw, ywd, batch, true, w[2]);
            assertExactBound(model, c, xw, ywd, batch, true, w[3]);
        }
    }

    @Test
    void constantAffineLawsHoldToTheDocumentedBound() {
        trials("constant-affine exactness", 0xC0A1L, 40, r -> checkModel(CompletionModelsTest.constantAffine(r), r, null));
    }

    @Test
    void inputDependentAffineLawsHoldToTheDocumentedBound() {
        trials("affine exactness", 0xAFF1L, 40, r -> checkModel(CompletionModelsTest.inputAffine(r), r, null));
    }

    @Test
    void nonlinearLawsHoldToTheDocumentedBound() {
        trials("nonlinear exactness", 0x0E1L, 40, r -> checkModel(CompletionModelsTest.nonlinear(r), r, null));
    }

    // ---- a law whose addends all vanish at the solution ------------------------------------------------------

    /**
     * Law L1 fixes y[1] = 0.3·x[1]/0.8475019578769357; where x[1] = 0 (an absent species, a closed valve) every addend
     * of L1 is zero at the solution, its natural scale is |0.8475·y[1]|, and the bound can only hold with y[1] exactly 0.
     * y[1] also appears in L3, so the elimination couples it to the other laws' rounding. The system is well
     * conditioned (condition number below 100), so every sample must be enforced.
     */
    private static final String VANISHING = String.join("\n",
            "input x[2]",
            "output y[4]",
            "law L0: -0.11818089275831745*x[0] = -1.5441824868183465*y[0] + 1.8402803116019097*y[2] + 0.9069412857467885*y[3]",
            "law L1: 0.8475019578769357*y[1] = 0.3*x[1]",
            "law L2: 1.0672421515368218*x[0] = 0.32464922990581213*y[2]",
            "law L3: 0.46912894072779787*y[0] + 1.5490409154466704*y[1] - 1.968892185223316*y[2] = 1.5847126213432767*x[0]",
            "complete y[3], y[1], y[0], y[2]",
            "");

    private static void checkVanishing(String text, Tier tier) {
        Completion c = Completion.of(LawSet.parse("<vanishing>", text));
        assertEquals(tier, c.tier());
        assertTrue(c.condition() < 100, "well conditioned: " + c.condition());
        SplittableRandom r = new SplittableRandom(0xE0L);
        int batch = 64;
        double[] x = new double[2 * batch];
        for (int s = 0; s < batch; s++) {
            x[2 * s] = uniform(r, 0.5, 1.5);
        }
        double[] y = new double[4 * batch];
        c.forward(x, new double[0], batch, y, null, c.newWorkspace());
        for (int s = 0; s < batch; s++) {
            assertEquals(0.0, y[4 * s + 1], 0.0, "y[1] = 0.3·x[1]/0.8475 = 0 at sample " + s);
        }
        assertDocumentedBound(c, x, y, batch, false, new Worst());
    }

    @Test
    void aLawWhoseAddendsAllVanishIsEnforcedConstantAffine() {
        checkVanishing(VANISHING, Tier.CONSTANT_AFFINE);
    }

    @Test
    void aLawWhoseAddendsAllVanishIsEnforcedAffine() {
        checkVanishing(VANISHING.replace("0.46912894072779787*y[0]", "0.46912894072779787*x[0]*y[0]"), Tier.AFFINE);
    }

    @Test
    void aLawWhoseAddendsAllVanishIsEnforcedNonlinear() {
        checkVanishing(VANISHING.replace("0.9069412857467885*y[3]", "0.9069412857467885*y[3] + 0.01*y[3]^2"),
                Tier.NONLINEAR);
    }

    @Test
    void floatRoundingIsOneFloatUlpOfTheScaleForLinearLawsOnly() {
        // The class documentation bounds the float rounding term by ½·Σ_j |∂C_i/∂y_c,j|·ulp_f32(y_c,j), and that by
        // 2⁻²⁴·s_i only for laws linear in their completed outputs. Linear: 3·c = x, so ½·3·ulp_f32(c) ≤ 2⁻²⁴·|3c|.
        LawSet linear = LawSet.parse("<linear>", "input x\noutput c\nlaw l: 3 * c = x\n");
        Completion cl = Completion.of(linear);
        SplittableRandom r = new SplittableRandom(0x11L);
        for (int k = 0; k < 200; k++) {
            float[] x = {(float) (r.nextDouble() * 1e3 - 5e2)};
            float[] y = new float[1];
            cl.forward(x, new float[0], 1, y, null, cl.newWorkspace());
            double[] scale = new double[1];
            double[] jy = new double[1];
            linear.evaluator().evaluate(new double[] {x[0]}, new double[] {y[0]}, 1, null, scale, jy, null);
            double term = 0.5 * Math.abs(jy[0]) * Math.ulp(y[0]);
            assertTrue(term <= 0x1p-24 * scale[0], "½·|∂C/∂c|·ulp_f32(c) = " + term + " > 2⁻²⁴·s = " + 0x1p-24 * scale[0]);
        }
        // Nonlinear: exp(c) = x at c = 5: ∂C/∂c = e⁵, ulp_f32(5) = 2⁻²¹, s = |e^c| + |x| = 2e⁵, so the term is e⁵·2⁻²²,
        // above 2⁻²⁴·s = e⁵·2⁻²³: the documentation does not claim the one-ulp form there, only the first inequality
        LawSet laws = LawSet.parse("<exp>", "input x\ninput g\noutput c\nlaw e: exp(c) = x\nguess c = g\n");
        Completion c = Completion.of(laws);
        float[] x = {(float) Math.exp(5), 5};
        float[] y = new float[1];
        c.forward(x, new float[0], 1, y, null, c.newWorkspace());
        double[] scale = new double[1];
        double[] jy = new double[1];
        laws.evaluator().evaluate(new double[] {x[0], x[1]}, new double[] {y[0]}, 1, null, scale, jy, null);
        double term = 0.5 * Math.abs(jy[0]) * Math.ulp(y[0]);
        assertTrue(term > 0x1p-24 * scale[0], "the example should show why the one-ulp form is for linear laws only");
        double[] residual = new double[1];
        laws.evaluator().residuals(new double[] {x[0], x[1]}, new double[] {y[0]}, 1, residual, null);
        double doubleBound = (laws.expand().roundingDepth(0) + 3) * U * scale[0];
        assertTrue(Math.abs(residual[0]) <= term + doubleBound, "documented float bound: " + residual[0]);
    }
}
