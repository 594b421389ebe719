package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertDoesNotThrow;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import java.util.concurrent.Callable;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The compiled {@link LawEvaluator} against the reference evaluation {@link Term#evaluate(double[])}: both are
 * designed to do the same floating-point operations in the same order, so they must agree bit for bit.
 */
class EvaluatorTest {

    /** Every function, vector and scalar laws, definitions, constants, a variable exponent and mixed units. */
    private static final LawSet LAWS = LawSet.parse("<evaluator>", String.join("\n",
            "input a",
            "input b",
            "input v[4]",
            "input E1 kJ",
            "input E2 J",
            "output y",
            "output u[4]",
            "output Q J",
            "const k = [1, -2, 0.5, 3]",
            "let s = sum(k * v)",
            "law l1: y = a * b + s",
            "law l2: u = exp(-a * v) * k + b / (1 + v^2)",
            "law l3: Q = E1 + E2",
            "law l4: y^2 = log(1 + a^2) * sqrt(b^2 + 1) + pow(u[0]^2 + 1, a) - log10(2 + v[1]^2)",
            "law l5: sum(u * u) = tanh(a) - sinh(b) + cosh(v[1]) * atan(v[2]) + asin(tanh(v[3])) * a^3",
            "law l6: dot(u, v) = abs(a) * sign(b) + sin(a) * cos(b) - tan(b / 4) + acos(tanh(b)) / (2 + a^2)",
            "law l7: u[1:3] * y = -v[0:2]^2 + [a, b] - (a - b)^-2",
            ""));

    private static final ExpandedLaws EXPANDED = LAWS.expand();
    private static final LawEvaluator EVALUATOR = LAWS.evaluator();
    private static final int NX = LAWS.inputWidth();
    private static final int NY = LAWS.outputWidth();
    private static final int LAW_COUNT = EVALUATOR.lawCount();

    private static double[] random(Random r, int n) {
        double[] a = new double[n];
        for (int i = 0; i < n; i++) {
            a[i] = -2 + 4 * r.nextDouble();
        }
        return a;
    }

    /** Variables of sample {@code s} in the reference evaluation's order: inputs, then outputs. */
    private static double[] sample(double[] x, double[] y, int s, int nx, int ny) {
        double[] p = new double[nx + ny];
        System.arraycopy(x, s * nx, p, 0, nx);
        System.arraycopy(y, s * ny, p, nx, ny);
        return p;
    }

    private static void assertBits(double expected, double actual, String what) {
        assertEquals(Double.doubleToLongBits(expected), Double.doubleToLongBits(actual),
                () -> what + ": expected " + expected + ", found " + actual);
    }

    @Test
    void layoutMatchesTheExpandedLaws() {
        assertEquals(EXPANDED.size(), LAW_COUNT);
        assertEquals(1 + 4 + 1 + 1 + 1 + 1 + 2, LAW_COUNT);
        int outTotal = 0;
        int inTotal = 0;
        for (int i = 0; i < LAW_COUNT; i++) {
            assertEquals(EXPANDED.name(i), EVALUATOR.lawName(i));
            assertArrayEquals(EXPANDED.outputs(i), EVALUATOR.outputColumns(i), EXPANDED.name(i));
            assertArrayEquals(EXPANDED.inputs(i), EVALUATOR.inputColumns(i), EXPANDED.name(i));
            assertEquals(outTotal, EVALUATOR.outputOffset(i));
            assertEquals(inTotal, EVALUATOR.inputOffset(i));
            outTotal += EXPANDED.outputs(i).length;
            inTotal += EXPANDED.inputs(i).length;
        }
        assertEquals(outTotal, EVALUATOR.outputNonzeros());
        assertEquals(inTotal, EVALUATOR.inputNonzeros());
    }

    @ParameterizedTest(name = "batch of {0}")
    @ValueSource(ints = {0, 1, 2, 63, 64, 65, 127, 128, 129, 1000})
    void residualsScalesAndJacobiansEqualTheReferenceBitForBit(int batch) {
        Random r = new Random(batch);
        double[] x = random(r, batch * NX);
        double[] y = random(r, batch * NY);
        int pad = 3;
        double sentinel = -12345.678;
        double[] res = filled(batch * LAW_COUNT + pad, sentinel);
        double[] scales = filled(batch * LAW_COUNT + pad, sentinel);
        double[] jy = filled(batch * EVALUATOR.outputNonzeros() + pad, sentinel);
        double[] jx = filled(batch * EVALUATOR.inputNonzeros() + pad, sentinel);
        EVALUATOR.evaluate(x, y, batch, res, scales, jy, jx, EVALUATOR.newWorkspace());
        for (int s = 0; s < batch; s++) {
            double[] p = sample(x, y, s, NX, NY);
            for (int i = 0; i < LAW_COUNT; i++) {
                String law = EXPANDED.name(i) + " of sample " + s;
                Term residual = EXPANDED.residual(i);
                assertBits(residual.evaluate(p), res[s * LAW_COUNT + i], "residual " + law);
                double scale = scales[s * LAW_COUNT + i];
                assertBits(EXPANDED.scale(i).evaluate(p), scale, "scale " + law);
                // the scale sums the magnitudes of the addends, so it is at least the largest of them
                double largest = 0;
                for (Term t : EXPANDED.terms(i)) {
                    largest = Math.max(largest, Math.abs(t.evaluate(p)));
                }
                assertTrue(scale >= largest * (1 - 1e-15), "scale " + scale + " below the largest term " + largest
                        + " of " + law);
                int[] outs = EVALUATOR.outputColumns(i);
                for (int k = 0; k < outs.length; k++) {
                    double expected = residual.derivative(NX + outs[k]).evaluate(p);
                    assertBits(expected, jy[s * EVALUATOR.outputNonzeros() + EVALUATOR.outputOffset(i) + k],
                            "dC/d" + EXPANDED.variableName(NX + outs[k]) + " of " + law);
                }
                int[] ins = EVALUATOR.inputColumns(i);
                for (int k = 0; k < ins.length; k++) {
                    double expected = residual.derivative(ins[k]).evaluate(p);
                    assertBits(expected, jx[s * EVALUATOR.inputNonzeros() + EVALUATOR.inputOffset(i) + k],
                            "dC/d" + EXPANDED.variableName(ins[k]) + " of " + law);
                }
            }
        }
        // nothing is written past the batch
        for (double[] buffer : List.of(res, scales, jy, jx)) {
            for (int i = buffer.length - pad; i < buffer.length; i++) {
                assertBits(sentinel, buffer[i], "padding after the batch");
            }
        }
        // residuals() alone gives the same residuals and scales
        double[] res2 = new double[batch * LAW_COUNT];
        double[] scales2 = new double[batch * LAW_COUNT];
        EVALUATOR.residuals(x, y, batch, res2, scales2);
        assertArrayEquals(Arrays.copyOf(res, res2.length), res2);
        assertArrayEquals(Arrays.copyOf(scales, scales2.length), scales2);
    }

    private static double[] filled(int n, double v) {
        double[] a = new double[n];
        Arrays.fill(a, v);
        return a;
    }

    @Test
    void optionalBuffersMayBeNull() {
        int batch = 70;
        Random r = new Random(70);
        double[] x = random(r, batch * NX);
        double[] y = random(r, batch * NY);
        double[] res = new double[batch * LAW_COUNT];
        double[] scales = new double[batch * LAW_COUNT];
        double[] jy = new double[batch * EVALUATOR.outputNonzeros()];
        double[] jx = new double[batch * EVALUATOR.inputNonzeros()];
        EVALUATOR.evaluate(x, y, batch, res, scales, jy, jx);

        double[] only = new double[res.length];
        EVALUATOR.evaluate(x, y, batch, only, null, null, null);
        assertArrayEquals(res, only, "residuals alone");
        double[] onlyScales = new double[res.length];
        EVALUATOR.evaluate(x, y, batch, null, onlyScales, null, null);
        assertArrayEquals(scales, onlyScales, "scales alone");
        double[] onlyJy = new double[jy.length];
        EVALUATOR.evaluate(x, y, batch, null, null, onlyJy, null);
        assertArrayEquals(jy, onlyJy, "dC/dy alone");
        double[] onlyJx = new double[jx.length];
        EVALUATOR.evaluate(x, y, batch, null, null, null, onlyJx);
        assertArrayEquals(jx, onlyJx, "dC/dx alone");
        double[] resWithJx = new double[res.length];
        double[] jx2 = new double[jx.length];
        EVALUATOR.evaluate(x, y, batch, resWithJx, null, null, jx2, EVALUATOR.newWorkspace());
        assertArrayEquals(res, resWithJx, "residuals with dC/dx");
        assertArrayEquals(jx, jx2, "dC/dx with residuals");
        double[] onlyRes = new double[res.length];
        EVALUATOR.residuals(x, y, batch, onlyRes, null, EVALUATOR.newWorkspace());
        assertArrayEquals(res, onlyRes, "residuals() without scales");
        // every buffer null: nothing to write, nothing to fail; an empty batch needs no arrays at all
        assertDoesNotThrow(() -> EVALUATOR.evaluate(x, y, batch, null, null, null, null));
        assertDoesNotThrow(() -> EVALUATOR.residuals(x, y, batch, null, null));
        assertDoesNotThrow(() -> EVALUATOR.evaluate(null, null, 0, null, null, null, null));
        assertDoesNotThrow(() -> EVALUATOR.residuals(null, null, 0, null, null));
    }

    @Test
    void lawSetsWithoutInputsTakeNullInputs() {
        LawSet laws = LawSet.parse("<no inputs>", "output y[2]\nlaw l: y[0] + y[1] = 3\n");
        double[] res = new double[2];
        laws.evaluator().residuals(null, new double[] {1, 2.5, 4, -1}, 2, res, null);
        // hand calculation: 1 + 2.5 - 3 = 0.5 and 4 - 1 - 3 = 0
        assertArrayEquals(new double[] {0.5, 0}, res);
    }

    @Test
    void tooShortArraysAreRejectedWithAClearMessage() {
        int batch = 5;
        double[] x = new double[batch * NX];
        double[] y = new double[batch * NY];
        double[] res = new double[batch * LAW_COUNT];
        double[] scales = new double[batch * LAW_COUNT];
        double[] jy = new double[batch * EVALUATOR.outputNonzeros()];
        double[] jx = new double[batch * EVALUATOR.inputNonzeros()];
        expectMessage(() -> EVALUATOR.evaluate(new double[x.length - 1], y, batch, res, scales, jy, jx),
                "x (inputs)", x.length, x.length - 1);
        expectMessage(() -> EVALUATOR.evaluate(x, new double[y.length - 1], batch, res, scales, jy, jx),
                "y (outputs)", y.length, y.length - 1);
        expectMessage(() -> EVALUATOR.evaluate(x, y, batch, new double[res.length - 1], scales, jy, jx),
                "residuals", res.length, res.length - 1);
        expectMessage(() -> EVALUATOR.evaluate(x, y, batch, res, new double[1], jy, jx), "scales", scales.length, 1);
        expectMessage(() -> EVALUATOR.evaluate(x, y, batch, res, scales, new double[jy.length - 1], jx),
                "jacobianY", jy.length, jy.length - 1);
        expectMessage(() -> EVALUATOR.evaluate(x, y, batch, res, scales, jy, new double[0]), "jacobianX", jx.length, 0);
        expectMessage(() -> EVALUATOR.residuals(new double[3], y, batch, res, null), "x (inputs)", x.length, 3);
        expectMessage(() -> EVALUATOR.residuals(x, y, batch, new double[2], null), "residuals", res.length, 2);
        IllegalArgumentException nullInputs = assertThrows(IllegalArgumentException.class,
                () -> EVALUATOR.residuals(null, y, batch, res, null));
        assertTrue(nullInputs.getMessage().contains("x (inputs)") && nullInputs.getMessage().contains("null"),
                nullInputs.getMessage());
        IllegalArgumentException negative = assertThrows(IllegalArgumentException.class,
                () -> EVALUATOR.residuals(x, y, -1, res, null));
        assertTrue(negative.getMessage().contains("batch") && negative.getMessage().contains("-1"),
                negative.getMessage());
        // a workspace of a smaller evaluator cannot hold this one's registers
        LawEvaluator tiny = LawSet.parse("<tiny>", "input p\noutput q\nlaw l: q = p\n").evaluator();
        IllegalArgumentException foreign = assertThrows(IllegalArgumentException.class,
                () -> EVALUATOR.evaluate(x, y, batch, res, scales, jy, jx, tiny.newWorkspace()));
        assertTrue(foreign.getMessage().contains("workspace"), foreign.getMessage());
        // a failed check writes nothing
        double[] untouched = filled(res.length, 7);
        assertThrows(IllegalArgumentException.class,
                () -> EVALUATOR.evaluate(x, y, batch, untouched, scales, new double[1], jx));
        assertArrayEquals(filled(res.length, 7), untouched);
    }

    private static void expectMessage(Executable call, String array, int needed, int found) {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, call);
        String m = e.getMessage();
        assertTrue(m.contains(array) && m.contains(String.valueOf(needed)) && m.contains("found " + found),
                () -> "message should name " + array + ", " + needed + " needed and " + found + " found: " + m);
    }

    // ---- units ---------------------------------------------------------------------------------------------

    @Test
    void unitsAreConvertedToSiBeforeTheyMeet() {
        LawSet laws = LawSet.parse("<units>", String.join("\n",
                "input E1 kJ",
                "input E2 J",
                "input P1 MW",
                "input P2 kW",
                "input m1 mg",
                "input m2 g",
                "output Q J",
                "output P W",
                "output m kg",
                "law energy: Q = E1 + E2",
                "law power: P = P1 + P2",
                "law mass: m = m1 + m2",
                ""));
        LawEvaluator ev = laws.evaluator();
        double[] x = {2, 500, 1.5, 250, 250, 1.5};
        double[] y = {2600, 1.75e6, 0.00175};
        double[] res = new double[3];
        double[] scales = new double[3];
        double[] jy = new double[ev.outputNonzeros()];
        double[] jx = new double[ev.inputNonzeros()];
        ev.evaluate(x, y, 1, res, scales, jy, jx);
        // Source: BIPM SI Brochure, 9th edition (2019), prefixes: k = 10^3, M = 10^6, m = 10^-3 (and 1 g = 10^-3 kg).
        // Hand calculation: 2600 J - (2 x 10^3 J + 500 J) = 100 J
        assertEquals(100.0, res[0]);
        // 1.75 x 10^6 W - (1.5 x 10^6 W + 250 x 10^3 W) = 0 W
        assertEquals(0.0, res[1]);
        // 0.00175 kg - (250 x 10^-6 kg + 1.5 x 10^-3 kg) = 0 kg, up to the rounding of the decimal factors
        assertEquals(0.0, res[2], 4 * Math.ulp(0.00175));
        // natural scales, the sums of the terms' magnitudes: 2600 + 2000 + 500 J, 1.75 + 1.5 + 0.25 MW and
        // 1.75 + 0.25 + 1.5 g
        assertEquals(5100.0, scales[0]);
        assertEquals(3.5e6, scales[1]);
        assertEquals(0.0035, scales[2], 4 * Math.ulp(0.0035));
        // Jacobians are in SI units of the law per declared unit: dC/dE1 = -1000 J/kJ, dC/dE2 = -1 J/J
        int energy = 0;
        assertArrayEquals(new int[] {0, 1}, ev.inputColumns(energy));
        assertEquals(-1000.0, jx[ev.inputOffset(energy)]);
        assertEquals(-1.0, jx[ev.inputOffset(energy) + 1]);
        assertEquals(1.0, jy[ev.outputOffset(energy)]);
        assertEquals(-1e6, jx[ev.inputOffset(1)]);
        assertEquals(-1e3, jx[ev.inputOffset(1) + 1]);
        // the reference evaluation takes the same declared-unit values and agrees
        assertEquals(100.0, laws.expand().residual(0).evaluate(new double[] {2, 500, 1.5, 250, 250, 1.5, 2600,
                1.75e6, 0.00175}));
    }

    @Test
    void naturalScaleIsTheSumOfTheMagnitudesOfTheTerms() {
        LawSet laws = LawSet.parse("<scale>", "input a\ninput b\noutput y\nlaw l: y = a + b\n"
                + "law m: 2 * y = a * b - 10\nlaw n: y * (a + b) = 1\n");
        double[] res = new double[3];
        double[] scales = new double[3];
        laws.evaluator().residuals(new double[] {3, -5}, new double[] {-2}, 1, res, scales);
        // hand calculations at a = 3, b = -5, y = -2
        // l: residual -2 - 3 - (-5) = 0; terms -2, -3, 5: scale 2 + 3 + 5 = 10
        assertEquals(0.0, res[0]);
        assertEquals(10.0, scales[0]);
        // m: residual 2(-2) - (3(-5) - 10) = 21; terms -4, 15, 10: scale 4 + 15 + 10 = 29
        assertEquals(21.0, res[1]);
        assertEquals(29.0, scales[1]);
        // n: residual -2 (3 - 5) - 1 = 3; the product is distributed over the sum: |y|(|a| + |b|) + 1 = 17
        assertEquals(3.0, res[2]);
        assertEquals(17.0, scales[2]);
    }

    // ---- threads -------------------------------------------------------------------------------------------

    @Test
    void sixteenThreadsGetTheSameBitsAsOne() throws Exception {
        int batch = 1000;
        Random r = new Random(16);
        double[] x = random(r, batch * NX);
        double[] y = random(r, batch * NY);
        double[][] reference = run(EVALUATOR, x, y, batch, EVALUATOR.newWorkspace());

        // a fresh law set, so the first evaluator() calls also race
        LawSet fresh = LawSet.parse("<threads>", LAWS.toString());
        int threads = 16;
        ExecutorService pool = Executors.newFixedThreadPool(threads);
        try {
            CountDownLatch start = new CountDownLatch(1);
            List<Future<List<Object>>> futures = new ArrayList<>();
            for (int t = 0; t < threads; t++) {
                final boolean shared = t % 2 == 0;
                Callable<List<Object>> task = () -> {
                    start.await();
                    LawEvaluator ev = shared ? EVALUATOR : fresh.evaluator();
                    LawEvaluator.Workspace ws = ev.newWorkspace();
                    List<Object> out = new ArrayList<>();
                    out.add(ev);
                    for (int repeat = 0; repeat < 5; repeat++) {
                        out.add(run(ev, x, y, batch, ws));
                    }
                    return out;
                };
                futures.add(pool.submit(task));
            }
            start.countDown();
            LawEvaluator freshEvaluator = null;
            for (int t = 0; t < threads; t++) {
                List<Object> out = futures.get(t).get(60, TimeUnit.SECONDS);
                if (t % 2 == 1) {
                    if (freshEvaluator == null) {
                        freshEvaluator = (LawEvaluator) out.get(0);
                    }
                    assertSame(freshEvaluator, out.get(0), "one compiled evaluator per law set");
                }
                for (int repeat = 1; repeat < out.size(); repeat++) {
                    double[][] got = (double[][]) out.get(repeat);
                    for (int b = 0; b < reference.length; b++) {
                        assertArrayEquals(reference[b], got[b], "thread " + t + ", run " + repeat + ", buffer " + b);
                    }
                }
            }
        } finally {
            pool.shutdownNow();
            assertTrue(pool.awaitTermination(60, TimeUnit.SECONDS));
        }
    }

    private static double[][] run(LawEvaluator ev, double[] x, double[] y, int batch, LawEvaluator.Workspace ws) {
        double[] res = new double[batch * ev.lawCount()];
        double[] scales = new double[batch * ev.lawCount()];
        double[] jy = new double[batch * ev.outputNonzeros()];
        double[] jx = new double[batch * ev.inputNonzeros()];
        ev.evaluate(x, y, batch, res, scales, jy, jx, ws);
        return new double[][] {res, scales, jy, jx};
    }

    // ---- non-finite values ---------------------------------------------------------------------------------

    @Test
    void nanInAnyVariablePropagatesToEveryLawThatInvolvesIt() {
        Random r = new Random(99);
        int batch = 3;
        double[] x0 = random(r, batch * NX);
        double[] y0 = random(r, batch * NY);
        double[][] base = run(EVALUATOR, x0, y0, batch, EVALUATOR.newWorkspace());
        for (int v = 0; v < NX + NY; v++) {
            for (int s = 0; s < batch; s++) {
                double[] x = x0.clone();
                double[] y = y0.clone();
                if (v < NX) {
                    x[s * NX + v] = Double.NaN;
                } else {
                    y[s * NY + v - NX] = Double.NaN;
                }
                double[][] got = run(EVALUATOR, x, y, batch, EVALUATOR.newWorkspace());
                for (int i = 0; i < LAW_COUNT; i++) {
                    boolean involved = v < NX ? contains(EXPANDED.inputs(i), v) : contains(EXPANDED.outputs(i), v - NX);
                    for (int t = 0; t < batch; t++) {
                        String what = EXPANDED.name(i) + " of sample " + t + " with " + EXPANDED.variableName(v)
                                + " of sample " + s + " NaN";
                        int at = t * LAW_COUNT + i;
                        if (involved && t == s) {
                            assertTrue(Double.isNaN(got[0][at]), what + ": residual " + got[0][at]);
                            assertTrue(Double.isNaN(got[1][at]), what + ": scale " + got[1][at]);
                        } else {
                            assertBits(base[0][at], got[0][at], what + ": residual");
                            assertBits(base[1][at], got[1][at], what + ": scale");
                        }
                    }
                }
            }
        }
    }

    private static boolean contains(int[] a, int v) {
        for (int e : a) {
            if (e == v) {
                return true;
            }
        }
        return false;
    }

    @Test
    void anInfiniteTermGivesAnInfiniteResidualNotNaN() {
        // residual = lhs - rhs: with lhs = y = 1 and rhs = exp(1000) = +inf it is -inf in IEEE 754 arithmetic
        LawSet laws = LawSet.parse("<overflow>", "input a\ninput b\noutput y\nlaw l: y = exp(a) + b\n");
        double[] res = new double[1];
        double[] scales = new double[1];
        laws.evaluator().residuals(new double[] {1000, 2}, new double[] {1}, 1, res, scales);
        assertEquals(Double.NEGATIVE_INFINITY, res[0], "residual of y = exp(1000) + 2");
        assertEquals(Double.POSITIVE_INFINITY, scales[0], "scale of y = exp(1000) + 2");
        assertEquals(Double.NEGATIVE_INFINITY, laws.expand().residual(0).evaluate(new double[] {1000, 2, 1}),
                "reference residual of y = exp(1000) + 2");
        // an infinite input likewise
        laws.evaluator().residuals(new double[] {0, Double.POSITIVE_INFINITY}, new double[] {1}, 1, res, scales);
        assertEquals(Double.NEGATIVE_INFINITY, res[0], "residual of y = exp(0) + inf");
    }

    @Test
    void aPartialJacobianHasTheFullEvaluationsEntriesForItsColumnsAndLeavesTheOthers() {
        LawSet laws = LawSet.parse("partial.law", String.join("\n",
                "input a[2]",
                "output y[4]",
                "law one: y[0]^3 + a[0]*y[1] = sin(y[2]) * y[3]",
                "law two: y[1] * y[3] = a[1] + exp(y[0])",
                ""));
        LawEvaluator ev = laws.evaluator();
        Random r = new Random(17);
        int batch = 70;
        double[] x = new double[batch * 2];
        double[] y = new double[batch * 4];
        for (int i = 0; i < x.length; i++) {
            x[i] = r.nextDouble() - 0.5;
        }
        for (int i = 0; i < y.length; i++) {
            y[i] = r.nextDouble() * 2 - 1;
        }
        int nnz = ev.outputNonzeros();
        double[] res = new double[batch * 2];
        double[] scale = new double[batch * 2];
        double[] jy = new double[batch * nnz];
        ev.evaluate(x, y, batch, res, scale, jy, null);
        double[] pres = new double[batch * 2];
        double[] pscale = new double[batch * 2];
        double[] pjy = new double[batch * nnz];
        Arrays.fill(pjy, 42.0);
        ev.partial(new int[] {1, 3}).evaluate(x, y, batch, pres, pscale, pjy, ev.newWorkspace());
        // the reference is the full evaluation, itself checked against finite differences elsewhere
        assertArrayEquals(res, pres);
        assertArrayEquals(scale, pscale);
        int kept = 0;
        for (int law = 0; law < 2; law++) {
            int[] cols = ev.outputColumns(law);
            for (int k = 0; k < cols.length; k++) {
                for (int s = 0; s < batch; s++) {
                    int e = s * nnz + ev.outputOffset(law) + k;
                    if (cols[k] == 1 || cols[k] == 3) {
                        assertEquals(jy[e], pjy[e], "law " + law + ", column " + cols[k]);
                        kept++;
                    } else {
                        assertEquals(42.0, pjy[e], "an entry of another column is left as it was");
                    }
                }
            }
        }
        assertEquals(4 * batch, kept);
        assertThrows(IllegalArgumentException.class, () -> ev.partial(new int[] {4}));
    }
}
