package dev.lawful.enforce;

import static dev.lawful.enforce.CompletionModelsTest.signed;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Gradients ({@code backward}: ḡz and ḡx) and Jacobians ({@code jacobians}: dy/dz and dy/dx) of every tier against
 * central finite differences of {@code forward} with one Richardson extrapolation step, in both layouts. The
 * reference is the completion's own forward map, differentiated numerically, so it is independent of the
 * implicit-function formula under test.
 */
class CompletionGradientTest {
    /** Relative step: h = STEP·|v|; with Richardson the truncation error is O(h⁴) and rounding about 2⁻⁵³/STEP. */
    private static final double STEP = 1e-4;
    private static final double TOLERANCE = 1e-6;

    /** One sample's outputs (this completion's layout) for perturbed copies of (x, z), in one batched call. */
    private static double[] forwardRows(Completion c, double[] xs, double[] zs, int rows) {
        double[] y = new double[rows * c.outputWidth()];
        c.forward(xs, zs, rows, y, null, c.newWorkspace());
        return y;
    }

    /**
     * Finite-difference Jacobians of one sample: {dy/dz (p × free), dy/dx (p × q)}, rows in the completion's layout,
     * from D = (4·D(h/2) − D(h))/3 with D(h) = (y(v + h) − y(v − h))/2h.
     */
    static double[][] finiteDifferences(Completion c, double[] x, double[] z) {
        int q = c.inputWidth();
        int f = c.freeWidth();
        int p = c.outputWidth();
        int vars = q + f;
        int rows = 4 * vars;
        double[] xs = new double[rows * q];
        double[] zs = new double[rows * f];
        double[] steps = new double[vars];
        for (int v = 0; v < vars; v++) {
            double value = v < q ? x[v] : z[v - q];
            double h = STEP * (value == 0 ? 1 : Math.abs(value));
            // make v ± h exact, so the step in the quotient is the step taken
            h = (value + h) - value;
            steps[v] = h;
            double[] offsets = {h, -h, h / 2, -h / 2};
            for (int k = 0; k < 4; k++) {
                int row = 4 * v + k;
                System.arraycopy(x, 0, xs, row * q, q);
                System.arraycopy(z, 0, zs, row * f, f);
                if (v < q) {
                    xs[row * q + v] += offsets[k];
                } else {
                    zs[row * f + v - q] += offsets[k];
                }
            }
        }
        double[] y = forwardRows(c, xs, zs, rows);
        double[] jz = new double[p * f];
        double[] jx = new double[p * q];
        for (int v = 0; v < vars; v++) {
            double h = steps[v];
            for (int o = 0; o < p; o++) {
                double full = (y[(4 * v) * p + o] - y[(4 * v + 1) * p + o]) / (2 * h);
                double half = (y[(4 * v + 2) * p + o] - y[(4 * v + 3) * p + o]) / h;
                double d = (4 * half - full) / 3;
                if (v < q) {
                    jx[o * q + v] = d;
                } else {
                    jz[o * f + v - q] = d;
                }
            }
        }
        return new double[][] {jz, jx};
    }

    private static double maxAbs(double[] a, int from, int to) {
        double m = 0;
        for (int i = from; i < to; i++) {
            m = Math.max(m, Math.abs(a[i]));
        }
        return m;
    }

    private static void assertRelative(double[] want, double[] got, int offset, String what) {
        double scale = maxAbs(want, 0, want.length);
        for (int i = 0; i < want.length; i++) {
            double err = Math.abs(got[offset + i] - want[i]);
            final int entry = i;
            assertTrue(err <= TOLERANCE * scale, () -> what + " entry " + entry + ": " + got[offset + entry]
                    + " vs finite differences " + want[entry] + " (largest entry " + scale + ")");
        }
    }

    /** Checks backward and jacobians at every sample of a small batch against finite differences. */
    static void checkGradients(Completion c, double[] x, double[] z, int batch, SplittableRandom r) {
        int q = c.inputWidth();
        int f = c.freeWidth();
        int p = c.outputWidth();
        Completion.Workspace ws = c.newWorkspace();
        double[] y = new double[batch * p];
        c.forward(x, z, batch, y, null, ws);
        double[] dydz = new double[batch * p * f];
        double[] dydx = new double[batch * p * q];
        c.jacobians(x, y, batch, dydz, dydx, ws);
        double[] gy = new double[batch * p];
        for (int i = 0; i < gy.length; i++) {
            gy[i] = signed(r, 0.1, 1);
        }
        double[] gz = new double[batch * f];
        double[] gx = new double[batch * q];
        c.backward(x, y, gy, batch, gz, gx, ws);
        for (int s = 0; s < batch; s++) {
            double[] xs = java.util.Arrays.copyOfRange(x, s * q, (s + 1) * q);
            double[] zs = java.util.Arrays.copyOfRange(z, s * f, (s + 1) * f);
            double[][] fd = finiteDifferences(c, xs, zs);
            String where = "sample " + s + " (" + c.tier().label() + ", " + c.layout() + ")\n" + c.laws();
            assertRelative(fd[0], dydz, s * p * f, "dy/dz, " + where);
            assertRelative(fd[1], dydx, s * p * q, "dy/dx, " + where);
            // vector-Jacobian products: ḡz = (dy/dz)ᵀ ḡ, ḡx = (dy/dx)ᵀ ḡ
            double[] wantZ = new double[f];
            double[] wantX = new double[q];
            double scaleZ = 0;
            double scaleX = 0;
            for (int o = 0; o < p; o++) {
                double g = gy[s * p + o];
                for (int k = 0; k < f; k++) {
                    wantZ[k] += fd[0][o * f + k] * g;
                    scaleZ = Math.max(scaleZ, Math.abs(fd[0][o * f + k] * g));
                }
                for (int k = 0; k < q; k++) {
                    wantX[k] += fd[1][o * q + k] * g;
                    scaleX = Math.max(scaleX, Math.abs(fd[1][o * q + k] * g));
                }
            }
            for (int k = 0; k < f; k++) {
                assertEquals(wantZ[k], gz[s * f + k], TOLERANCE * p * scaleZ, "ḡz[" + k + "], " + where);
            }
            for (int k = 0; k < q; k++) {
                assertEquals(wantX[k], gx[s * q + k], TOLERANCE * p * scaleX, "ḡx[" + k + "], " + where);
            }
        }
        // without ḡx the same ḡz comes back
        double[] gzOnly = new double[batch * f];
        c.backward(x, y, gy, batch, gzOnly, null, ws);
        for (int i = 0; i < gz.length; i++) {
            assertEquals(gz[i], gzOnly[i], 0.0, "ḡz without ḡx");
        }
        // the float entry point computes in double on the widened values and rounds the result
        float[] xf = new float[x.length];
        float[] yf = new float[y.length];
        float[] gyf = new float[gy.length];
        double[] xw = new double[x.length];
        double[] yw = new double[y.length];
        double[] gyw = new double[gy.length];
        for (int i = 0; i < x.length; i++) {
            xf[i] = (float) x[i];
            xw[i] = xf[i];
        }
        for (int i = 0; i < y.length; i++) {
            yf[i] = (float) y[i];
            yw[i] = yf[i];
            gyf[i] = (float) gy[i];
            gyw[i] = gyf[i];
        }
        float[] gzf = new float[gz.length];
        float[] gxf = new float[gx.length];
        c.backward(xf, yf, gyf, batch, gzf, gxf, ws);
        double[] gzw = new double[gz.length];
        double[] gxw = new double[gx.length];
        c.backward(xw, yw, gyw, batch, gzw, gxw, ws);
        for (int i = 0; i < gz.length; i++) {
            assertEquals((float) gzw[i], gzf[i], 0.0f, "float ḡz");
        }
        for (int i = 0; i < gx.length; i++) {
            assertEquals((float) gxw[i], gxf[i], 0.0f, "float ḡx");
        }
    }

    private static void checkModel(CompletionModelsTest.Model model, SplittableRandom r) {
        LawSet laws = model.lawSet();
        for (Completion.Layout layout : Completion.Layout.values()) {
            Completion c = Completion.builder(laws).layout(layout).build();
            assertEquals(model.tier, c.tier());
            int batch = 1 + r.nextInt(3);
            double[][] drawn = model.batch(r, batch);
            checkGradients(c, drawn[0], drawn[1], batch, r);
        }
    }

    @Test
    void constantAffineGradientsMatchFiniteDifferences() {
        trials("constant-affine gradients", 0x6AD1L, 20, r -> checkModel(CompletionModelsTest.constantAffine(r), r));
    }

    @Test
    void inputDependentAffineGradientsMatchFiniteDifferences() {
        trials("affine gradients", 0x6AD2L, 20, r -> checkModel(CompletionModelsTest.inputAffine(r), r));
    }

    @Test
    void nonlinearGradientsMatchFiniteDifferences() {
        trials("nonlinear gradients", 0x6AD3L, 20, r -> checkModel(CompletionModelsTest.nonlinear(r), r));
    }

    @Test
    void gradientsInDeclaredUnitsMatchFiniteDifferences() {
        // affine with a constant block (coefficients of the inputs are products of inputs): energy in kJ and J,
        // power in kW, time in min; and a nonlinear law in km/h and m
        LawSet energy = LawSet.parse("<units>", String.join("\n",
                "input P kW",
                "input dt min",
                "input T K",
                "output E kJ",
                "output loss J",
                "output h J/K",
                "law energy: E + loss = P*dt",
                "law capacity: h*T = loss",
                "complete E, loss",
                ""));
        LawSet fall = LawSet.parse("<fall>", String.join("\n",
                "input height m",
                "input drag",
                "output v km/h",
                "output w km/h",
                "const g = 9.80665 m s-2",
                "law speed: v^2 + drag*w^2 = 2*g*height",
                "guess v = sqrt(2*g*height)",
                "complete v",
                ""));
        SplittableRandom r = new SplittableRandom(0x6AD4L);
        for (Completion.Layout layout : Completion.Layout.values()) {
            Completion ce = Completion.builder(energy).layout(layout).build();
            assertEquals(Tier.AFFINE, ce.tier());
            checkGradients(ce, new double[] {2.5, 3, 300, 1.7, 6, 290}, new double[] {4.2, 3.9}, 2, r);
            Completion cf = Completion.builder(fall).layout(layout).build();
            assertEquals(Tier.NONLINEAR, cf.tier());
            checkGradients(cf, new double[] {12, 0.1, 3.5, 0.05}, new double[] {20, 7}, 2, r);
        }
    }
}
