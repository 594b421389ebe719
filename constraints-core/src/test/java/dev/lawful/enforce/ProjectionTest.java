package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.function.Consumer;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.MatrixUtils;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;

/**
 * {@link Projection}: against an independent closed form (Apache Commons Math pseudo-inverse) and the optimality
 * conditions of the weighted problem, its stated residual bound, idempotence, derivatives against central
 * differences, input-dependent coefficients, refusals word for word, bad samples under both policies, and
 * determinism across threads.
 */
class ProjectionTest {
    private static final double KMOL_PER_H = 1000.0 / 3600.0;

    // ---- randomised trials (JUnit only, seeded) --------------------------------------------------------------

    private static final long GOLDEN = 0x9E3779B97F4A7C15L;

    /** Runs {@code property} on {@code tries} seeded generators; a failure names the seed that reproduces it. */
    private static void trials(String name, long seed, int tries, Consumer<SplittableRandom> property) {
        for (int i = 0; i < tries; i++) {
            long s = seed + GOLDEN * i;
            try {
                property.accept(new SplittableRandom(s));
            } catch (AssertionError | RuntimeException e) {
                throw new AssertionError(name + ": trial " + i + " failed (seed " + s + ")\n" + e.getMessage(), e);
            }
        }
    }

    /**
     * A random affine law set in the law language, with its coefficients kept for the reference computation:
     * inputs x[q] in mol/s, outputs u[k] in mol/s and v[p-k] in kmol/h, laws
     * {@code dot(A_i, u) + dot(D_i, v) = dot(B_i, x) + c_i}. A scaled case has one more input, a dimensionless
     * {@code g} after x, and laws {@code g * dot(A_i, u) + g * dot(D_i, v) = ...}: output coefficients that
     * depend on an input, so each sample is factored on its own.
     */
    private record AffineCase(LawSet laws, int q, int p, int n, boolean scaled, double[][] a, double[][] b,
                              double[] c) {

        /** @return inputs per sample */
        int width() {
            return q + (scaled ? 1 : 0);
        }

        /** @return x uniform in ±5·magnitude, and g (when scaled) in [0.5, 2] */
        double[] inputs(SplittableRandom r, int batch, double magnitude) {
            double[] x = new double[batch * width()];
            for (int s = 0; s < batch; s++) {
                for (int k = 0; k < q; k++) {
                    x[s * width() + k] = magnitude * r.nextDouble(-5, 5);
                }
                if (scaled) {
                    x[s * width() + q] = r.nextDouble(0.5, 2);
                }
            }
            return x;
        }

        private double gain(double[] x, int xo) {
            return scaled ? x[xo + q] : 1;
        }

        /** C_i = g A y − B x − c in SI (mol/s), computed here, independently of the evaluator. */
        double[] residual(double[] x, int xo, double[] y, int yo) {
            double g = gain(x, xo);
            double[] r = new double[n];
            for (int i = 0; i < n; i++) {
                double s = -c[i];
                for (int j = 0; j < p; j++) {
                    s += g * a[i][j] * y[yo + j];
                }
                for (int k = 0; k < q; k++) {
                    s -= b[i][k] * x[xo + k];
                }
                r[i] = s;
            }
            return r;
        }

        /** @return the output coefficients ∂C/∂y (SI per declared unit) of the sample whose inputs start at xo */
        RealMatrix matrix(double[] x, int xo) {
            return new Array2DRowRealMatrix(a).scalarMultiply(gain(x, xo));
        }
    }

    private static AffineCase randomCase(SplittableRandom r, int maxOutputs, boolean scaled) {
        while (true) {
            int p = 2 + r.nextInt(maxOutputs - 1);
            int k = 1 + r.nextInt(p - 1);
            int n = 1 + r.nextInt(p - 1);
            int q = 1 + r.nextInt(4);
            double[][] a = new double[n][p];
            double[][] b = new double[n][q];
            double[] c = new double[n];
            StringBuilder text = new StringBuilder("input x[" + q + "] mol/s\n" + (scaled ? "input g\n" : "")
                    + "output u[" + k + "] mol/s\noutput v[" + (p - k) + "] kmol/h\n");
            String gain = scaled ? "g * " : "";
            for (int i = 0; i < n; i++) {
                double[] coef = new double[p];
                boolean any = false;
                for (int j = 0; j < p; j++) {
                    coef[j] = r.nextInt(5) == 0 ? 0.0 : r.nextDouble(-2, 2);
                    any |= coef[j] != 0;
                }
                if (!any) {
                    coef[r.nextInt(p)] = 1.5;
                }
                for (int j = 0; j < p; j++) {
                    a[i][j] = coef[j] * (j < k ? 1.0 : KMOL_PER_H);
                }
                for (int m = 0; m < q; m++) {
                    b[i][m] = r.nextDouble(-2, 2);
                }
                c[i] = r.nextDouble(-3, 3);
                text.append("const A").append(i).append(" = ").append(list(coef, 0, k)).append('\n')
                        .append("const D").append(i).append(" = ").append(list(coef, k, p)).append('\n')
                        .append("const B").append(i).append(" = ").append(list(b[i], 0, q)).append('\n')
                        .append("const c").append(i).append(" = ").append(c[i]).append(" mol/s\n")
                        .append("law l").append(i).append(": ").append(gain).append("dot(A").append(i)
                        .append(", u) + ").append(gain).append("dot(D").append(i).append(", v) = dot(B").append(i)
                        .append(", x) + c").append(i).append('\n');
            }
            AffineCase ac = new AffineCase(LawSet.parse("random.law", text.toString()), q, p, n, scaled, a, b, c);
            // well conditioned, so the reference and the projection can be compared tightly
            if (new SingularValueDecomposition(new Array2DRowRealMatrix(a)).getConditionNumber() < 100) {
                return ac;
            }
        }
    }

    private static String list(double[] v, int from, int to) {
        StringBuilder sb = new StringBuilder("[");
        for (int i = from; i < to; i++) {
            sb.append(i > from ? ", " : "").append(v[i]);
        }
        return sb.append(']').toString();
    }

    private static double[] uniform(SplittableRandom r, int count, double magnitude) {
        double[] v = new double[count];
        for (int i = 0; i < count; i++) {
            v[i] = magnitude * r.nextDouble(-5, 5);
        }
        return v;
    }

    private static double maxAbs(double[] v, int from, int count) {
        double m = 0;
        for (int i = from; i < from + count; i++) {
            m = Math.max(m, Math.abs(v[i]));
        }
        return m;
    }

    // ---- the forward map -------------------------------------------------------------------------------------

    @Test
    void orthogonalProjectionEqualsThePseudoInverseClosedForm() {
        trials("orthogonal projection", 11, 40, r -> {
            AffineCase ac = randomCase(r, 9, r.nextBoolean());
            Projection proj = Projection.of(ac.laws());
            assertEquals(!ac.scaled(), proj.supportsInputGradient());
            int batch = 70; // crosses a chunk boundary
            double magnitude = Math.pow(10, r.nextDouble(-2, 3));
            double[] x = ac.inputs(r, batch, magnitude);
            double[] y = uniform(r, batch * ac.p(), magnitude);
            double[] out = proj.forward(x, y, batch);
            for (int s = 0; s < batch; s++) {
                int xo = s * ac.width();
                // Source: Apache Commons Math 3.6.1 SingularValueDecomposition (pseudo-inverse A⁺):
                // the orthogonal projection onto {A y = b} is y − A⁺(A y − b)
                RealMatrix pinv = new SingularValueDecomposition(ac.matrix(x, xo)).getSolver().getInverse();
                RealVector c = new ArrayRealVector(ac.residual(x, xo, y, s * ac.p()));
                RealVector expected = new ArrayRealVector(Arrays.copyOfRange(y, s * ac.p(), (s + 1) * ac.p()))
                        .subtract(pinv.operate(c));
                double tol = 1e-12 * Math.max(maxAbs(y, s * ac.p(), ac.p()), maxAbs(x, xo, ac.q()));
                for (int j = 0; j < ac.p(); j++) {
                    assertEquals(expected.getEntry(j), out[s * ac.p() + j], tol, "sample " + s + " output " + j);
                }
            }
        });
    }

    @Test
    void weightedProjectionSatisfiesTheOptimalityConditions() {
        trials("weighted projection", 12, 40, r -> {
            AffineCase ac = randomCase(r, 9, r.nextBoolean());
            double[] w = new double[ac.p()];
            for (int j = 0; j < w.length; j++) {
                w[j] = Math.pow(10, r.nextDouble(-2, 2));
            }
            Projection proj = Projection.builder(ac.laws()).weights(w).build();
            assertArrayEquals(w, proj.weights());
            int batch = 20;
            double[] x = ac.inputs(r, batch, 1);
            double[] y = uniform(r, batch * ac.p(), 1);
            double[] out = proj.forward(x, y, batch);
            for (int s = 0; s < batch; s++) {
                int yo = s * ac.p();
                RealMatrix at = ac.matrix(x, s * ac.width()).transpose();
                // feasibility: the laws hold (reference residual computed in this test)
                double[] c = ac.residual(x, s * ac.width(), out, yo);
                for (int i = 0; i < ac.n(); i++) {
                    assertEquals(0, c[i], 1e-12, "law " + i + " of sample " + s);
                }
                // stationarity: W (y_out − y) = Aᵀ μ for some multipliers μ.
                // Source: Karush-Kuhn-Tucker conditions for equality-constrained least squares (Nocedal & Wright,
                // Numerical Optimization, 2nd ed., Theorem 12.1, from memory); μ by least squares with
                // Apache Commons Math 3.6.1 QRDecomposition
                double[] move = new double[ac.p()];
                for (int j = 0; j < ac.p(); j++) {
                    move[j] = w[j] * (out[yo + j] - y[yo + j]);
                }
                RealVector g = new ArrayRealVector(move);
                RealVector mu = new QRDecomposition(at).getSolver().solve(g);
                RealVector gap = at.operate(mu).subtract(g);
                assertTrue(gap.getLInfNorm() <= 1e-10 * Math.max(1, g.getLInfNorm()),
                        "sample " + s + ": W(y_out - y) is not in the range of A^T, gap " + gap.getLInfNorm());
            }
        });
    }

    @Test
    void scalesGiveTheInverseSquareWeights() {
        AffineCase ac = randomCase(new SplittableRandom(5), 6, false);
        double[] scales = new double[ac.p()];
        double[] w = new double[ac.p()];
        for (int j = 0; j < scales.length; j++) {
            scales[j] = 0.5 + j;
            w[j] = 1 / (scales[j] * scales[j]);
        }
        Projection byScale = Projection.builder(ac.laws()).scales(scales).build();
        Projection byWeight = Projection.builder(ac.laws()).weights(w).build();
        assertArrayEquals(w, byScale.weights());
        SplittableRandom r = new SplittableRandom(6);
        double[] x = ac.inputs(r, 10, 1);
        double[] y = uniform(r, 10 * ac.p(), 1);
        assertArrayEquals(byWeight.forward(x, y, 10), byScale.forward(x, y, 10));
    }

    @Test
    void projectingTwiceChangesNothingBeyondRounding() {
        trials("idempotence", 13, 30, r -> {
            AffineCase ac = randomCase(r, 9, r.nextBoolean());
            Projection proj = Projection.of(ac.laws());
            int batch = 50;
            double[] x = ac.inputs(r, batch, 10);
            double[] y = uniform(r, batch * ac.p(), 10);
            double[] once = proj.forward(x, y, batch);
            double[] twice = proj.forward(x, once, batch);
            for (int s = 0; s < batch; s++) {
                double tol = 64 * Math.ulp(maxAbs(once, s * ac.p(), ac.p()));
                for (int j = 0; j < ac.p(); j++) {
                    assertEquals(once[s * ac.p() + j], twice[s * ac.p() + j], tol, "sample " + s + " output " + j);
                }
            }
        });
    }

    @Test
    void residualsAfterProjectionMeetTheStatedBounds() {
        trials("residual bounds", 14, 60, r -> {
            AffineCase ac = randomCase(r, 12, r.nextBoolean());
            double[] w = new double[ac.p()];
            for (int j = 0; j < w.length; j++) {
                w[j] = r.nextBoolean() ? 1 : Math.pow(10, r.nextDouble(-3, 3));
            }
            Projection proj = Projection.builder(ac.laws()).weights(w).build();
            LawEvaluator ev = ac.laws().evaluator();
            int batch = 200;
            double magnitude = Math.pow(10, r.nextDouble(-4, 5));
            double[] x = ac.inputs(r, batch, magnitude);
            double[] y = uniform(r, batch * ac.p(), magnitude);
            byte[] status = new byte[batch];
            double[] out = proj.forward(x, y, batch, null, status, proj.newWorkspace());
            double[] res = new double[batch * ac.n()];
            double[] scale = new double[batch * ac.n()];
            ev.residuals(x, out, batch, res, scale);
            float[] xf = new float[x.length];
            float[] yf = new float[y.length];
            for (int i = 0; i < x.length; i++) {
                xf[i] = (float) x[i];
            }
            for (int i = 0; i < y.length; i++) {
                yf[i] = (float) y[i];
            }
            float[] outF = proj.forward(xf, yf, batch, null, null, proj.newWorkspace());
            double[] xd = new double[x.length];
            double[] outD = new double[outF.length];
            for (int i = 0; i < x.length; i++) {
                xd[i] = xf[i];
            }
            for (int i = 0; i < outF.length; i++) {
                outD[i] = outF[i];
            }
            double[] resF = new double[batch * ac.n()];
            double[] scaleF = new double[batch * ac.n()];
            ev.residuals(xd, outD, batch, resF, scaleF);
            for (int s = 0; s < batch; s++) {
                assertEquals(SampleStatus.OK, status[s], "status of sample " + s);
                for (int i = 0; i < ac.n(); i++) {
                    int at = s * ac.n() + i;
                    assertTrue(Math.abs(res[at]) <= proj.residualBound(i, scale[at]), "double: law " + i
                            + " of sample " + s + " has residual " + res[at] + ", scale " + scale[at]);
                    assertTrue(Math.abs(resF[at]) <= proj.residualBoundFloat(i, scaleF[at]), "float: law " + i
                            + " of sample " + s + " has residual " + resF[at] + ", scale " + scaleF[at]);
                }
            }
        });
    }

    /** Steam reformer outlet; species CH4, H2O, CO, CO2, H2, N2. */
    private static final LawSet REFORMER = LawSet.parse("reformer.law", String.join("\n",
            "input feed[6] mol/s",
            "output out[6] mol/s",
            // atoms per molecule (Source: the molecular formulas CH4, H2O, CO, CO2, H2, N2; common knowledge)
            "const C = [1, 0, 1, 1, 0, 0]",
            "const H = [4, 2, 0, 0, 2, 0]",
            "const O = [0, 1, 1, 2, 0, 0]",
            "const N = [0, 0, 0, 0, 0, 2]",
            "law carbon: dot(C, out) = dot(C, feed)",
            "law hydrogen: dot(H, out) = dot(H, feed)",
            "law oxygen: dot(O, out) = dot(O, feed)",
            "law nitrogen: dot(N, out) = dot(N, feed)",
            ""));

    @Test
    void theBoundsOfTheElementBalances() {
        Projection proj = Projection.of(REFORMER);
        // carbon is a plain sum (no rounded products, d = 0); the others multiply by atom counts (d = 1)
        assertEquals(3 * 0x1p-53, proj.residualBound(0, 1.0));
        assertEquals(4 * 0x1p-53, proj.residualBound(1, 1.0));
        assertEquals(0x1p-24 + 6 * 0x1p-53, proj.residualBoundFloat(1, 1.0));
    }

    @Test
    void unitAwareProjectionConservesTheAtomsOfTheReformer() {
        // typical outlet flows in mol/s (invented for this test): the large ones may move more
        double[] scales = {2, 5, 1, 1, 8, 0.5};
        Projection proj = Projection.builder(REFORMER).scales(scales).build();
        SplittableRandom r = new SplittableRandom(61);
        int batch = 100;
        double[] feed = new double[batch * 6];
        double[] out = new double[batch * 6];
        for (int i = 0; i < feed.length; i++) {
            feed[i] = r.nextDouble(0, 10);
            out[i] = feed[i] * r.nextDouble(0.5, 1.5);
        }
        double[] projected = proj.forward(feed, out, batch);
        double[][] atoms = {{1, 0, 1, 1, 0, 0}, {4, 2, 0, 0, 2, 0}, {0, 1, 1, 2, 0, 0}, {0, 0, 0, 0, 0, 2}};
        for (int s = 0; s < batch; s++) {
            for (int e = 0; e < 4; e++) {
                // the exact atom balance of the double outputs, in decimal arithmetic, and the sum of the
                // magnitudes of its terms (the natural scale)
                java.math.BigDecimal balance = java.math.BigDecimal.ZERO;
                double magnitude = 0;
                for (int j = 0; j < 6; j++) {
                    java.math.BigDecimal a = new java.math.BigDecimal(atoms[e][j]);
                    balance = balance.add(a.multiply(new java.math.BigDecimal(projected[s * 6 + j])))
                            .subtract(a.multiply(new java.math.BigDecimal(feed[s * 6 + j])));
                    magnitude += atoms[e][j] * (Math.abs(projected[s * 6 + j]) + feed[s * 6 + j]);
                }
                // the exact balance may differ from the evaluated one by the evaluation's rounding, (d + 1)·2⁻⁵³·s
                double allowed = proj.residualBound(e, magnitude) + 2 * 0x1p-53 * magnitude;
                assertTrue(Math.abs(balance.doubleValue()) <= allowed, "sample " + s + " element " + e
                        + ": exact balance " + balance.doubleValue() + ", allowed " + allowed);
            }
        }
    }

    @Test
    void outMayBeTheIncomingArrayAndTheBatchSizeDoesNotMatter() {
        AffineCase ac = randomCase(new SplittableRandom(9), 8, true);
        Projection proj = Projection.of(ac.laws());
        SplittableRandom r = new SplittableRandom(10);
        int batch = 130;
        double[] x = ac.inputs(r, batch, 3);
        double[] y = uniform(r, batch * ac.p(), 3);
        double[] expected = proj.forward(x, y, batch);
        double[] inPlace = y.clone();
        assertSame(inPlace, proj.forward(x, inPlace, batch, inPlace, null, proj.newWorkspace()));
        assertArrayEquals(expected, inPlace);
        // one sample at a time gives the same bits
        for (int s = 0; s < batch; s++) {
            double[] one = proj.forward(Arrays.copyOfRange(x, s * ac.width(), (s + 1) * ac.width()),
                    Arrays.copyOfRange(y, s * ac.p(), (s + 1) * ac.p()), 1);
            assertArrayEquals(Arrays.copyOfRange(expected, s * ac.p(), (s + 1) * ac.p()), one, "sample " + s);
        }
    }

    // ---- derivatives -----------------------------------------------------------------------------------------

    /** Constant output coefficients, right-hand sides nonlinear in the inputs. */
    private static final LawSet CONSTANT_COEFFICIENTS = LawSet.parse("constant.law", String.join("\n",
            "input x[3]",
            "output y[5]",
            "const A = [1, 2, 0, -1, 0.5]",
            "const B = [0, 1, 1, 1, -2]",
            "law first: dot(A, y) = exp(x[0]) * x[1]",
            "law second: dot(B, y) = x[2]^2 - sin(x[1])",
            ""));

    @Test
    void jacobiansAndBackwardMatchCentralDifferences() {
        double[] w = {1, 0.5, 3, 2, 0.25};
        Projection proj = Projection.builder(CONSTANT_COEFFICIENTS).weights(w).build();
        assertTrue(proj.supportsInputGradient());
        int p = 5;
        int q = 3;
        SplittableRandom r = new SplittableRandom(21);
        int batch = 3;
        double[] x = uniform(r, batch * q, 0.2);
        double[] y = uniform(r, batch * p, 1);
        double[] dy = new double[batch * p * p];
        double[] dx = new double[batch * p * q];
        proj.jacobian(x, y, batch, dy, dx, null, proj.newWorkspace());
        double[] g = uniform(r, batch * p, 1);
        double[] gx = new double[batch * q];
        double[] gy = proj.backward(x, y, batch, g, null, gx, null, proj.newWorkspace());
        for (int s = 0; s < batch; s++) {
            // Source: central difference f'(t) ≈ (f(t + h) − f(t − h)) / 2h, error O(h²) (common practice)
            double[] fdY = new double[p * p];
            double[] fdX = new double[p * q];
            double h = 1e-4;
            for (int k = 0; k < p; k++) {
                double[] plus = Arrays.copyOfRange(y, s * p, (s + 1) * p);
                double[] minus = plus.clone();
                plus[k] += h;
                minus[k] -= h;
                double[] xs = Arrays.copyOfRange(x, s * q, (s + 1) * q);
                double[] fp = proj.forward(xs, plus, 1);
                double[] fm = proj.forward(xs, minus, 1);
                for (int j = 0; j < p; j++) {
                    fdY[j * p + k] = (fp[j] - fm[j]) / (2 * h);
                }
            }
            double hx = 1e-5;
            for (int c = 0; c < q; c++) {
                double[] plus = Arrays.copyOfRange(x, s * q, (s + 1) * q);
                double[] minus = plus.clone();
                plus[c] += hx;
                minus[c] -= hx;
                double[] ys = Arrays.copyOfRange(y, s * p, (s + 1) * p);
                double[] fp = proj.forward(plus, ys, 1);
                double[] fm = proj.forward(minus, ys, 1);
                for (int j = 0; j < p; j++) {
                    fdX[j * q + c] = (fp[j] - fm[j]) / (2 * hx);
                }
            }
            assertRelative(fdY, Arrays.copyOfRange(dy, s * p * p, (s + 1) * p * p), 1e-7, "dy_out/dy, sample " + s);
            assertRelative(fdX, Arrays.copyOfRange(dx, s * p * q, (s + 1) * p * q), 1e-7, "dy_out/dx, sample " + s);
            // the vector-Jacobian products are the transposed finite-difference Jacobians applied to g
            double[] vjpY = new double[p];
            double[] vjpX = new double[q];
            for (int j = 0; j < p; j++) {
                for (int k = 0; k < p; k++) {
                    vjpY[k] += fdY[j * p + k] * g[s * p + j];
                }
                for (int c = 0; c < q; c++) {
                    vjpX[c] += fdX[j * q + c] * g[s * p + j];
                }
            }
            assertRelative(vjpY, Arrays.copyOfRange(gy, s * p, (s + 1) * p), 1e-7, "backward y, sample " + s);
            assertRelative(vjpX, Arrays.copyOfRange(gx, s * q, (s + 1) * q), 1e-7, "backward x, sample " + s);
        }
        // the float entry point computes the same in double and rounds once
        float[] xf = toFloat(x);
        float[] yf = toFloat(y);
        float[] gf = toFloat(g);
        float[] gxf = new float[batch * q];
        float[] gyf = proj.backward(xf, yf, batch, gf, null, gxf, null, proj.newWorkspace());
        double[] gyRef = proj.backward(toDouble(xf), toDouble(yf), batch, toDouble(gf), null, null, null, null);
        for (int i = 0; i < gyf.length; i++) {
            assertEquals((float) gyRef[i], gyf[i], "float backward entry " + i);
        }
    }

    private static void assertRelative(double[] expected, double[] actual, double tol, String what) {
        double scale = maxAbs(expected, 0, expected.length);
        double err = 0;
        for (int i = 0; i < expected.length; i++) {
            err = Math.max(err, Math.abs(expected[i] - actual[i]));
        }
        assertTrue(err <= tol * scale, what + ": relative error " + err / scale + " (max norm) above " + tol
                + "\nexpected " + Arrays.toString(expected) + "\nactual   " + Arrays.toString(actual));
    }

    private static float[] toFloat(double[] v) {
        float[] f = new float[v.length];
        for (int i = 0; i < v.length; i++) {
            f[i] = (float) v[i];
        }
        return f;
    }

    private static double[] toDouble(float[] v) {
        double[] d = new double[v.length];
        for (int i = 0; i < v.length; i++) {
            d[i] = v[i];
        }
        return d;
    }

    private static final LawSet INPUT_WEIGHTS = LawSet.parse("weights.law", String.join("\n",
            "input x[4]",
            "output y[4]",
            "law total: sum(x * y) = 1",
            ""));

    @Test
    void inputDependentCoefficientsProjectAndDifferentiateInTheOutputs() {
        Projection proj = Projection.of(INPUT_WEIGHTS);
        assertFalse(proj.supportsInputGradient());
        SplittableRandom r = new SplittableRandom(31);
        int batch = 40;
        double[] x = uniform(r, batch * 4, 1);
        double[] y = uniform(r, batch * 4, 1);
        double[] out = proj.forward(x, y, batch);
        double[] dy = new double[batch * 16];
        proj.jacobian(x, y, batch, dy, null, null, null);
        double[] g = uniform(r, batch * 4, 1);
        double[] gy = proj.backward(x, y, batch, g, null, null, null, proj.newWorkspace());
        for (int s = 0; s < batch; s++) {
            // Source: Apache Commons Math 3.6.1 SingularValueDecomposition pseudo-inverse of the 1×4 row A = x
            RealMatrix a = new Array2DRowRealMatrix(new double[][] {Arrays.copyOfRange(x, s * 4, s * 4 + 4)});
            RealMatrix pinv = new SingularValueDecomposition(a).getSolver().getInverse();
            RealVector ys = new ArrayRealVector(Arrays.copyOfRange(y, s * 4, s * 4 + 4));
            double c = a.operate(ys).getEntry(0) - 1;
            RealVector expected = ys.subtract(pinv.getColumnVector(0).mapMultiply(c));
            for (int j = 0; j < 4; j++) {
                assertEquals(expected.getEntry(j), out[s * 4 + j], 1e-12 * Math.max(1, ys.getLInfNorm()),
                        "sample " + s + " output " + j);
            }
            // dy_out/dy = I − A⁺A, independent of y
            RealMatrix p = MatrixUtils.createRealIdentityMatrix(4).subtract(pinv.multiply(a));
            for (int j = 0; j < 4; j++) {
                for (int k = 0; k < 4; k++) {
                    assertEquals(p.getEntry(j, k), dy[s * 16 + j * 4 + k], 1e-12, "P[" + j + "][" + k + "]");
                }
            }
            // the vector-Jacobian product is Pᵀ g
            RealVector vjp = p.transpose().operate(new ArrayRealVector(Arrays.copyOfRange(g, s * 4, s * 4 + 4)));
            for (int k = 0; k < 4; k++) {
                assertEquals(vjp.getEntry(k), gy[s * 4 + k], 1e-12, "backward, sample " + s + " output " + k);
            }
        }
        String refusal = "the gradient with respect to the inputs is not available for this law set: the"
                + " coefficient of output 'y[0]' in law 'total' depends on input 'x[0]', so that gradient needs"
                + " second derivatives of the laws, which projection does not compute; pass null for the input"
                + " gradient (the inputs are then treated as constants), or use completion, whose input gradient"
                + " needs first derivatives only";
        UnsupportedOperationException e = assertThrows(UnsupportedOperationException.class,
                () -> proj.backward(x, y, batch, y, null, new double[batch * 4], null, null));
        assertEquals(refusal, e.getMessage());
        UnsupportedOperationException j = assertThrows(UnsupportedOperationException.class,
                () -> proj.jacobian(x, y, batch, null, new double[batch * 16], null, null));
        assertEquals(refusal, j.getMessage());
    }

    // ---- refusals --------------------------------------------------------------------------------------------

    @Test
    void aLawSetNonlinearInTheOutputsIsRefusedNamingTheLawAndTheOutput() {
        String text = String.join("\n",
                "input R ohm",
                "input P W",
                "output I A",
                "output U V",
                "law ohm: U = R * I",
                "law power: U * I = P",
                "");
        LawException e = assertThrows(LawException.class, () -> Projection.of(LawSet.parse("circuit.law", text)));
        assertEquals(String.join("\n",
                "circuit.law:6:5: law 'power' is nonlinear in the outputs: its coefficient of output 'I' is U, which"
                        + " depends on output 'U'; projection needs laws that are affine in the outputs (their output"
                        + " coefficients may depend on inputs only); use completion for nonlinear laws, or rewrite"
                        + " the law",
                "law power: U * I = P",
                "    ^^^^^"), e.getMessage());
    }

    @Test
    void redundantLawsAreRefusedNamingTheLawsInvolved() {
        String text = String.join("\n",
                "input feed[2] mol/s",
                "output out[3] mol/s",
                "law a: out[0] + out[1] = feed[0]",
                "law b: out[1] + out[2] = feed[1]",
                "law c: out[0] + 2 * out[1] + out[2] = feed[0] + feed[1]",
                "");
        LawException e = assertThrows(LawException.class, () -> Projection.of(LawSet.parse("split.law", text)));
        // c = a + b, outputs, inputs and constants alike: the same diagnosis as completion's
        assertEquals(String.join("\n",
                "split.law:5:5: law 'c' is redundant: it is a + b (outputs, inputs and constants alike, at every"
                        + " point tried), so it says nothing new; remove it",
                "law c: out[0] + 2 * out[1] + out[2] = feed[0] + feed[1]",
                "    ^"), e.getMessage());
    }

    @Test
    void theDefaultReferencePointIsGenericSoASpecialInputValueIsNotMetByAccident() {
        // (x − 1)·y0 vanishes at x = 1 only: at the generic point shared with completion the laws are independent
        String text = "input x\noutput y[2]\nlaw z: (x - 1) * y[0] = 0\nlaw other: y[0] + y[1] = x\n";
        LawSet laws = LawSet.parse("vanish.law", text);
        assertEquals(2, Projection.of(laws).laws().expand().size());
        assertEquals(2, Completion.builder(laws).complete("y[0]", "y[1]").build().completedOutputs().length);
    }

    @Test
    void aLawWhoseCoefficientsVanishAtTheReferencePointIsRefused() {
        String text = "input x\noutput y[2]\nlaw z: (x - 1) * y[0] = 0\nlaw other: y[0] + y[1] = x\n";
        // a reference point with x = 1, where the coefficient x − 1 vanishes
        LawException e = assertThrows(LawException.class, () -> Projection.builder(LawSet.parse("vanish.law", text))
                .referencePoint(new double[] {1}, new double[] {1, 1}).build());
        assertEquals(String.join("\n",
                "vanish.law:3:5: law 'z' is redundant or contradictory: its output coefficients are all zero at the"
                        + " reference point, so moving the outputs cannot enforce it; remove the law or rewrite it",
                "law z: (x - 1) * y[0] = 0",
                "    ^"), e.getMessage());
    }

    @Test
    void coefficientsUndefinedAtTheReferencePointAreRefused() {
        String text = "input x\noutput y[2]\nlaw q: y[0] / (x - 1) + y[1] = 0\n";
        // a reference point with x = 1, the coefficient's pole
        LawException e = assertThrows(LawException.class, () -> Projection.builder(LawSet.parse("pole.law", text))
                .referencePoint(new double[] {1}, new double[] {1, 1}).build());
        assertEquals(String.join("\n",
                "pole.law:3:5: the output coefficients of law 'q' are not finite at the reference point, so the laws"
                        + " cannot be checked for independence; rewrite the law so its coefficients are defined there",
                "law q: y[0] / (x - 1) + y[1] = 0",
                "    ^"), e.getMessage());
    }

    @Test
    void badWeightsAreRefused() {
        IllegalArgumentException length = assertThrows(IllegalArgumentException.class,
                () -> Projection.builder(INPUT_WEIGHTS).weights(new double[3]).build());
        assertEquals("weights must hold one value per output element (4), found 3", length.getMessage());
        IllegalArgumentException negative = assertThrows(IllegalArgumentException.class,
                () -> Projection.builder(INPUT_WEIGHTS).weights(new double[] {1, -1, 1, 1}).build());
        assertEquals("weight of output 'y[1]' must be positive and finite, found -1.0", negative.getMessage());
        IllegalArgumentException scale = assertThrows(IllegalArgumentException.class,
                () -> Projection.builder(INPUT_WEIGHTS).scales(new double[] {1, 1, 0, 1}));
        assertEquals("scale of output element 2 must be positive and finite, found 0.0", scale.getMessage());
    }

    @Test
    void shortArraysAndForeignWorkspacesAreRejected() {
        Projection proj = Projection.of(INPUT_WEIGHTS);
        IllegalArgumentException shortY = assertThrows(IllegalArgumentException.class,
                () -> proj.forward(new double[8], new double[7], 2));
        assertEquals("y (outputs) must hold at least 8 values for this batch, found 7", shortY.getMessage());
        IllegalArgumentException nullX = assertThrows(IllegalArgumentException.class,
                () -> proj.forward(null, new double[8], 2));
        assertEquals("x (inputs) must hold at least 8 values for this batch, found null", nullX.getMessage());
        IllegalArgumentException foreign = assertThrows(IllegalArgumentException.class,
                () -> proj.forward(new double[4], new double[4], 1, null, null, Projection.of(INPUT_WEIGHTS)
                        .newWorkspace()));
        assertEquals("workspace belongs to another projection; use this projection's newWorkspace()",
                foreign.getMessage());
        // an empty batch needs no arrays
        assertEquals(0, proj.forward(null, null, 0).length);
    }

    // ---- bad samples -----------------------------------------------------------------------------------------

    /** Rows (a, 1) and (1, 2): dependent at a = 0.5, independent at the reference point a = 1. */
    private static final LawSet SOMETIMES_SINGULAR = LawSet.parse("pair.law", String.join("\n",
            "input a",
            "output y[2]",
            "law first: a * y[0] + y[1] = 1",
            "law second: y[0] + 2 * y[1] = 3",
            ""));

    @Test
    void badSamplesUnderMaskAreNaNRowsWithTheirStatus() {
        Projection proj = Projection.builder(SOMETIMES_SINGULAR).onBadSample(OnBadSample.MASK).build();
        assertEquals(OnBadSample.MASK, proj.onBadSample());
        double[] x = {2, Double.NaN, 3, 0.5, -1};
        double[] y = {1, 1, 1, 1, 1, Double.POSITIVE_INFINITY, 1, 1, 4, 5};
        byte[] status = new byte[5];
        double[] out = proj.forward(x, y, 5, null, status, proj.newWorkspace());
        assertArrayEquals(new byte[] {SampleStatus.OK, SampleStatus.NOT_FINITE, SampleStatus.NOT_FINITE,
                SampleStatus.SINGULAR, SampleStatus.OK}, status);
        for (int s : new int[] {1, 2, 3}) {
            assertTrue(Double.isNaN(out[2 * s]) && Double.isNaN(out[2 * s + 1]), "row " + s + " is NaN");
        }
        // the good samples are exactly what they are alone
        assertArrayEquals(proj.forward(new double[] {2}, new double[] {1, 1}, 1), Arrays.copyOfRange(out, 0, 2));
        assertArrayEquals(proj.forward(new double[] {-1}, new double[] {4, 5}, 1), Arrays.copyOfRange(out, 8, 10));
        // two independent laws on two outputs fix them: a y0 + y1 = 1, y0 + 2 y1 = 3 gives y0 = 1 / (1 - 2a)
        // (solved by hand)
        assertEquals(-1.0 / 3, out[0], 1e-15);
        assertEquals(1.0 / 3, out[8], 1e-15);

        byte[] backStatus = new byte[5];
        double[] g = {1, 2, 1, 2, 1, 2, 1, 2, 1, 2};
        double[] gy = proj.backward(x, y, 5, g, null, null, backStatus, null);
        assertArrayEquals(status, backStatus);
        for (int s : new int[] {1, 2, 3}) {
            assertTrue(Double.isNaN(gy[2 * s]) && Double.isNaN(gy[2 * s + 1]), "gradient row " + s + " is NaN");
        }
        // two independent laws on two outputs leave nothing free: the gradient with respect to y is zero
        assertEquals(0, gy[0], 1e-15);
        assertEquals(0, gy[9], 1e-15);
    }

    @Test
    void badSamplesUnderThrowNameTheSampleAndTheLaws() {
        Projection proj = Projection.of(SOMETIMES_SINGULAR);
        EnforcementException nan = assertThrows(EnforcementException.class,
                () -> proj.forward(new double[] {2, Double.NaN}, new double[] {1, 1, 1, 1}, 2));
        assertEquals(1, nan.sample());
        assertEquals(SampleStatus.NOT_FINITE, nan.status());
        assertEquals(List.of("first"), nan.laws());
        assertEquals("sample 1: input 'a' is NaN, so laws 'first' cannot be enforced; fix the data of this sample,"
                + " or build the projection with OnBadSample.MASK to get NaN rows flagged in a status mask instead",
                nan.getMessage());

        EnforcementException inf = assertThrows(EnforcementException.class,
                () -> proj.forward(new double[] {2}, new double[] {1, Double.NEGATIVE_INFINITY}, 1));
        assertEquals(0, inf.sample());
        assertEquals(List.of("first", "second"), inf.laws());
        assertEquals("sample 0: output 'y[1]' is -Infinity, so laws 'first' and 'second' cannot be enforced; fix"
                + " the data of this sample, or build the projection with OnBadSample.MASK to get NaN rows flagged"
                + " in a status mask instead", inf.getMessage());

        EnforcementException singular = assertThrows(EnforcementException.class,
                () -> proj.forward(new double[] {2, 0.5}, new double[] {1, 1, 1, 1}, 2));
        assertEquals(1, singular.sample());
        assertEquals(SampleStatus.SINGULAR, singular.status());
        assertEquals(List.of("first", "second"), singular.laws());
        assertEquals("sample 1: laws 'first' and 'second' are linearly dependent at this sample (the output"
                + " coefficients of law 'second' are a linear combination of those of 'first'), so the projection is"
                + " singular; fix the data of this sample, or build the projection with OnBadSample.MASK to get NaN"
                + " rows flagged in a status mask instead", singular.getMessage());

        EnforcementException gradient = assertThrows(EnforcementException.class,
                () -> proj.backward(new double[] {2}, new double[] {1, 1}, 1, new double[] {Double.NaN, 0}, null,
                        null, null, null));
        assertEquals(SampleStatus.NOT_FINITE, gradient.status());
        assertTrue(gradient.getMessage().startsWith("sample 0: the upstream gradient of output 'y[0]' is NaN"),
                gradient.getMessage());
    }

    @Test
    void aVanishingCoefficientRowAtASampleIsSingular() {
        Projection proj = Projection.of(INPUT_WEIGHTS);
        EnforcementException e = assertThrows(EnforcementException.class,
                () -> proj.forward(new double[] {0, 0, 0, 0}, new double[] {1, 2, 3, 4}, 1));
        assertEquals(SampleStatus.SINGULAR, e.status());
        assertEquals("sample 0: the output coefficients of law 'total' are all zero at this sample, so moving the"
                + " outputs cannot enforce it (singular system); fix the data of this sample, or build the projection"
                + " with OnBadSample.MASK to get NaN rows flagged in a status mask instead", e.getMessage());
    }

    @Test
    void nearlyDependentLawsStillHoldToTheBound() {
        // rows (1, 2, 1) and (1, a, 1) are dependent at a = 2; at a = 2 + 1e-9 the projection moves the outputs by
        // about 1e9, and the laws still hold to rounding of that scale
        LawSet laws = LawSet.parse("near.law", String.join("\n",
                "input a",
                "output y[3]",
                "law first: y[0] + 2 * y[1] + y[2] = 1",
                "law second: y[0] + a * y[1] + y[2] = 2",
                ""));
        Projection proj = Projection.of(laws);
        for (double d : new double[] {1e-3, 1e-6, 1e-9}) {
            double[] x = {2 + d};
            double[] out = proj.forward(x, new double[] {0.3, -0.2, 5}, 1);
            assertTrue(Math.abs(out[1]) > 0.5 / d, "the outputs move by about 1/d");
            double[] res = new double[2];
            double[] scale = new double[2];
            laws.evaluator().residuals(x, out, 1, res, scale);
            for (int i = 0; i < 2; i++) {
                assertTrue(Math.abs(res[i]) <= proj.residualBound(i, scale[i]), "d = " + d + ", law " + i
                        + ": residual " + res[i] + ", scale " + scale[i]);
            }
        }
        // closer than the rank tolerance, the sample is singular
        EnforcementException e = assertThrows(EnforcementException.class,
                () -> proj.forward(new double[] {2 + 1e-11}, new double[] {0.3, -0.2, 5}, 1));
        assertEquals(SampleStatus.SINGULAR, e.status());
    }

    // ---- threads ---------------------------------------------------------------------------------------------

    @Test
    void sixteenThreadsGiveBitIdenticalResultsToOne() throws Exception {
        for (boolean scaled : new boolean[] {false, true}) {
            AffineCase ac = randomCase(new SplittableRandom(41), 10, scaled);
            double[] w = new double[ac.p()];
            Arrays.fill(w, 1);
            w[0] = 7;
            Projection proj = Projection.builder(ac.laws()).weights(w).build();
            SplittableRandom r = new SplittableRandom(42);
            int batch = 1000;
            double[] x = ac.inputs(r, batch, 100);
            double[] y = uniform(r, batch * ac.p(), 100);
            double[] g = uniform(r, batch * ac.p(), 1);
            // the input gradient only where it is supported
            int gxLength = scaled ? 0 : batch * ac.width();
            double[] expectedOut = proj.forward(x, y, batch);
            double[] expectedGx = new double[gxLength];
            double[] expectedGy = proj.backward(x, y, batch, g, null, scaled ? null : expectedGx, null, null);
            ExecutorService pool = Executors.newFixedThreadPool(16);
            try {
                CountDownLatch start = new CountDownLatch(1);
                List<Future<double[][]>> results = new ArrayList<>();
                for (int t = 0; t < 16; t++) {
                    Callable<double[][]> task = () -> {
                        Projection.Workspace ws = proj.newWorkspace();
                        start.await();
                        double[][] all = new double[3][];
                        for (int round = 0; round < 3; round++) {
                            all[0] = proj.forward(x, y, batch, null, null, ws);
                            all[2] = new double[gxLength];
                            all[1] = proj.backward(x, y, batch, g, null, scaled ? null : all[2], null, ws);
                        }
                        return all;
                    };
                    results.add(pool.submit(task));
                }
                start.countDown();
                for (Future<double[][]> f : results) {
                    double[][] got = f.get(60, TimeUnit.SECONDS);
                    assertBits(expectedOut, got[0], "forward, scaled " + scaled);
                    assertBits(expectedGy, got[1], "backward y, scaled " + scaled);
                    assertBits(expectedGx, got[2], "backward x, scaled " + scaled);
                }
            } finally {
                pool.shutdownNow();
            }
        }
    }

    private static void assertBits(double[] expected, double[] actual, String what) {
        assertEquals(expected.length, actual.length, what);
        for (int i = 0; i < expected.length; i++) {
            assertEquals(Double.doubleToLongBits(expected[i]), Double.doubleToLongBits(actual[i]),
                    what + " entry " + i);
        }
    }

    @Test
    void aLawSetWithoutLawsLeavesTheOutputsAsTheyAre() {
        Projection proj = Projection.of(LawSet.parse("empty.law", "input x\noutput y[2]\n"));
        double[] y = {1.5, -2};
        assertArrayEquals(y, proj.forward(new double[] {3}, y, 1));
        double[] g = {0.25, 4};
        assertArrayEquals(g, proj.backward(new double[] {3}, y, 1, g, null, new double[1], null, null));
    }
}
