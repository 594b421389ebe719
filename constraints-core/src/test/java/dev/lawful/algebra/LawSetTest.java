package dev.lawful.algebra;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Path;
import java.util.List;
import java.util.Random;
import java.util.stream.Collectors;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;

/**
 * {@link LawSet}: builder and text agree, printing parses back, the flat layout of inputs and outputs, equality,
 * and the example steam-reformer law file with an independent check of its element balances.
 */
class LawSetTest {

    /** The example law file, relative to the constraints-core module folder (Surefire's working directory). */
    private static final Path REFORMER = Path.of("../examples/laws/steam-reformer.law");

    private static LawSet parse(String... lines) {
        return LawSet.parse("set.law", String.join("\n", lines) + "\n");
    }

    private static LawSet reformerBuiltInJava() {
        return LawSet.builder()
                .input("feed", 6, "mol/s")
                .input("T", "K")
                .output("out", 6, "mol/s")
                .constant("C", new double[] {1, 0, 1, 1, 0, 0}, "")
                .constant("H", new double[] {4, 2, 0, 0, 2, 0}, "")
                .constant("O", new double[] {0, 1, 1, 2, 0, 0}, "")
                .constant("N", new double[] {0, 0, 0, 0, 0, 2}, "")
                .law("carbon", "dot(C, out)", "dot(C, feed)")
                .law("hydrogen", "dot(H, out) = dot(H, feed)")
                .law("oxygen", "dot(O, out)", "dot(O, feed)")
                .law("nitrogen", "dot(N, out) = dot(N, feed)")
                .complete("out[2]", "out[4]", "out[1]", "out[5]")
                .build();
    }

    // ---- builder, text, printing ----------------------------------------------------------------------------

    @Test
    void builderAndTextGiveEqualLawSets() throws IOException {
        LawSet read = LawSet.read(REFORMER);
        LawSet built = reformerBuiltInJava();
        assertEquals(read, built);
        assertEquals(read.hashCode(), built.hashCode());

        LawSet text = parse(
                "const cp = 4.184 kJ/(kg  K)   # written with extra spaces",
                "input  m kg/s",
                "input  T[2] K",
                "output P kW",
                "let dT = T[1] - T[0]",
                "law heat: P = cp * m * dT",
                "complete P");
        LawSet builder = LawSet.builder()
                .constant("cp", 4.184, "kJ/(kg K)")
                .input("m", "kg/s")
                .input("T", 2, "K")
                .output("P", "kW")
                .define("dT", "T[1] - T[0]")
                .law("heat", "P", "cp * m * dT")
                .complete("P")
                .build();
        assertEquals(text, builder);
        assertEquals(text.hashCode(), builder.hashCode());
        assertEquals(text, LawSet.of(text.declarations()));
    }

    @Test
    void builderErrorsPointAtTheLineTheCallWrote() {
        LawException e = assertThrows(LawException.class, () -> LawSet.builder()
                .input("x", "m").output("y", "s").law("copy", "y = x").build());
        assertEquals("<builder>:3:15: unit mismatch between the sides of law 'copy': left is s, right is m\n"
                + "law copy: y = x\n"
                + "              ^", e.getMessage());
        LawException infinite = assertThrows(LawException.class, () -> LawSet.builder()
                .constant("c", Double.POSITIVE_INFINITY, "").build());
        assertEquals("a constant must be finite, found Infinity", infinite.errors().get(0).message());
    }

    @Test
    void toStringParsesBackEqual() throws IOException {
        LawSet tricky = parse(
                "input  a m",
                "input  b m",
                "input  k",
                "output y[3] m",
                "output s m2",
                "const w = [0.1, -2.5, 1e-300, -0]",
                "const big = 1e20 km",
                "let d = a - (b - a) - b - a",
                "let q = 2 / (3 / k) / 4 - (2 - k) - 3",
                "law vec: y = [a, b, d] * w[0:3]",
                "law area: s = (a - b) * (a + b) - -a * b + a^2 + (-a)^2 - -a^2 + a^2^1 - (a^2)^1"
                        + " + a / (b / a) * b + exp(k)^2 * a * b + sqrt(s * s) + sum(y[0:2] * y[1:3])"
                        + " + dot(w[0:3], y) * a + pow(k, 2 - k) * a * b + k^-1 * a * b + big / big * q * a * b",
                "complete y[0:2], s");
        for (LawSet laws : List.of(tricky, LawSet.read(REFORMER), reformerBuiltInJava())) {
            String printed = laws.toString();
            LawSet again = LawSet.parse("printed.law", printed);
            assertEquals(laws, again, printed);
            assertEquals(printed, again.toString());
        }
        // the printed text keeps what was written, not a rounded form of it
        Declaration.Constant w = tricky.constants().get(0);
        assertEquals(List.of(0.1, -2.5, 1e-300, -0.0), w.values());
        assertEquals(w, LawSet.parse("p.law", tricky.toString()).constants().get(0));
    }

    // ---- layout ---------------------------------------------------------------------------------------------

    @Test
    void layoutFollowsTheDeclarationOrder() {
        LawSet laws = parse(
                "input  a m",
                "input  v[3] m/s",
                "input  one[1]",
                "input  b",
                "output out[3] mol/s",
                "output y K",
                "output z[2]",
                "const r = 1 mol",
                "const T0 = 300 K",
                "law flow: out = (v * b + z[0] * v) / a * r",
                "law heat: y = T0 * (b + z[1] * one[0])",
                "complete out[0:2], y");
        assertEquals(List.of("a", "v[0]", "v[1]", "v[2]", "one[0]", "b"), laws.inputNames());
        assertEquals(List.of("out[0]", "out[1]", "out[2]", "y", "z[0]", "z[1]"), laws.outputNames());
        assertEquals(6, laws.inputWidth());
        assertEquals(6, laws.outputWidth());
        assertEquals(0, laws.inputOffset("a"));
        assertEquals(1, laws.inputOffset("v"));
        assertEquals(4, laws.inputOffset("one"));
        assertEquals(5, laws.inputOffset("b"));
        assertEquals(0, laws.outputOffset("out"));
        assertEquals(3, laws.outputOffset("y"));
        assertEquals(4, laws.outputOffset("z"));
        assertArrayEquals(new int[] {0, 1, 3}, laws.completedOutputs());
        assertEquals(List.of("a", "v", "one", "b"),
                laws.inputs().stream().map(Declaration.Variable::name).collect(Collectors.toList()));
        assertEquals(List.of("out", "y", "z"),
                laws.outputs().stream().map(Declaration.Variable::name).collect(Collectors.toList()));
        assertEquals(3, laws.lawShape("flow"));
        assertEquals(0, laws.lawShape("heat"));
        // names under three characters are only suggested when they differ in case: all short names are near
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> laws.inputOffset("vv"));
        assertEquals("no input named 'vv'", e.getMessage());
        IllegalArgumentException upper = assertThrows(IllegalArgumentException.class, () -> laws.inputOffset("V"));
        assertEquals("no input named 'V'; did you mean 'v'?", upper.getMessage());
        IllegalArgumentException near = assertThrows(IllegalArgumentException.class, () -> laws.inputOffset("onw"));
        assertEquals("no input named 'onw'; did you mean 'one'?", near.getMessage());
    }

    @Test
    void completedOutputsKeepTheOrderWritten() {
        String[] head = {"input  x[4]", "output out[3]", "output y", "output z[2]",
            "law a: out[0] + out[1] + out[2] + y + z[0] + z[1] = sum(x)"};
        assertArrayEquals(new int[] {3, 2}, parse(concat(head, "complete y, out[2]")).completedOutputs());
        assertArrayEquals(new int[] {4, 5, 0}, parse(concat(head, "complete z, out[0]")).completedOutputs());
        assertArrayEquals(new int[] {1, 2, 3}, parse(concat(head, "complete out[1:3], y")).completedOutputs());
        assertArrayEquals(new int[0], parse(head).completedOutputs());
    }

    // ---- equality -------------------------------------------------------------------------------------------

    @Test
    void equalityComparesDeclarationsOnly() {
        LawSet a = parse("input x m", "output y m", "law copy: y = x");
        LawSet sameWrittenOtherwise = LawSet.parse("elsewhere.law",
                "# a comment\n\ninput   x  m   # metres\noutput y m\nlaw copy:   y =\n   x\n");
        assertEquals(a, sameWrittenOtherwise);
        assertEquals(a.hashCode(), sameWrittenOtherwise.hashCode());
        assertEquals(a, a);

        assertNotEquals(a, parse("input x km", "output y m", "law copy: y = x"));
        assertNotEquals(a, parse("input x m", "output y m", "law copy: y = 1 * x"));
        assertNotEquals(a, parse("input x m", "output y m", "law same: y = x"));
        assertNotEquals(a, parse("output y m", "input x m", "law copy: y = x"));
        assertNotEquals(a, parse("input x m", "output y m", "law copy: y = x", "complete y"));
        assertNotEquals(a, parse("input x[1] m", "output y m", "law copy: y = x[0]"));
        assertNotEquals(a, null);
        assertNotEquals(a, a.toString());
    }

    // ---- the steam reformer ---------------------------------------------------------------------------------

    @Test
    void readsTheSteamReformer() throws IOException {
        LawSet laws = LawSet.read(REFORMER);
        assertEquals(List.of("feed[0]", "feed[1]", "feed[2]", "feed[3]", "feed[4]", "feed[5]", "T"),
                laws.inputNames());
        assertEquals(List.of("out[0]", "out[1]", "out[2]", "out[3]", "out[4]", "out[5]"), laws.outputNames());
        assertEquals(List.of("carbon", "hydrogen", "oxygen", "nitrogen"),
                laws.laws().stream().map(Declaration.Law::name).collect(Collectors.toList()));
        for (Declaration.Law law : laws.laws()) {
            assertEquals(Unit.parse("mol/s"), laws.lawUnit(law.name()), law.name());
            assertEquals(0, laws.lawShape(law.name()), law.name());
        }
        assertArrayEquals(new int[] {2, 4, 1, 5}, laws.completedOutputs());
        assertTrue(laws.warnings().isEmpty());
    }

    /** Species in the order of the law file: CH4, H2O, CO, CO2, H2, N2. */
    private static final int SPECIES = 6;

    /**
     * Atoms of C, H, O, N per molecule, written from the chemical formulas CH4, H2O, CO, CO2, H2, N2 (not read
     * from the law file, so the file's constants are checked too).
     */
    private static final double[][] ATOMS = {
        {1, 0, 1, 1, 0, 0},
        {4, 2, 0, 0, 2, 0},
        {0, 1, 1, 2, 0, 0},
        {0, 0, 0, 0, 0, 2},
    };

    // Source: IUPAC CIAAW standard atomic weights 2021, abridged values (g/mol), in the rows' order C, H, O, N
    private static final double[] ATOMIC_WEIGHT = {12.011, 1.008, 15.999, 14.007};

    private static double molarMass(int species) {
        double m = 0;
        for (int e = 0; e < ATOMS.length; e++) {
            m += ATOMS[e][species] * ATOMIC_WEIGHT[e];
        }
        return m;
    }

    private static double massFlow(double[] molarFlows, int from) {
        double m = 0;
        for (int i = 0; i < SPECIES; i++) {
            m += molarMass(i) * molarFlows[from + i];
        }
        return m;
    }

    @Test
    void theElementBalancesConserveMass() throws IOException {
        LawSet laws = LawSet.read(REFORMER);
        LawEvaluator evaluator = laws.evaluator();
        assertEquals(4, evaluator.lawCount());
        assertEquals(List.of("carbon", "hydrogen", "oxygen", "nitrogen"),
                List.of(evaluator.lawName(0), evaluator.lawName(1), evaluator.lawName(2), evaluator.lawName(3)));

        int batch = 200;
        int nx = laws.inputWidth();
        int ny = laws.outputWidth();
        double[] x = new double[batch * nx];
        double[] y = new double[batch * ny];
        // the balances solved for out[1], out[2], out[4], out[5] given out[0] and out[3]
        int[] solved = {1, 2, 4, 5};
        int[] given = {0, 3};
        double[][] m = new double[4][4];
        for (int e = 0; e < 4; e++) {
            for (int k = 0; k < 4; k++) {
                m[e][k] = ATOMS[e][solved[k]];
            }
        }
        // Source: Apache Commons Math 3.6.1, LUDecomposition as the independent solver
        LUDecomposition lu = new LUDecomposition(new Array2DRowRealMatrix(m));
        Random random = new Random(20_210_501L);
        for (int s = 0; s < batch; s++) {
            double[] feed = new double[SPECIES];
            for (int i = 0; i < SPECIES; i++) {
                feed[i] = 0.05 + 2.0 * random.nextDouble();
                x[s * nx + i] = feed[i];
            }
            x[s * nx + 6] = 700.0 + 300.0 * random.nextDouble();
            double[] out = new double[SPECIES];
            out[0] = feed[0] * random.nextDouble();
            out[3] = feed[0] * random.nextDouble();
            double[] rhs = new double[4];
            for (int e = 0; e < 4; e++) {
                for (int i = 0; i < SPECIES; i++) {
                    rhs[e] += ATOMS[e][i] * feed[i];
                }
                for (int g : given) {
                    rhs[e] -= ATOMS[e][g] * out[g];
                }
            }
            RealVector u = lu.getSolver().solve(new ArrayRealVector(rhs));
            for (int k = 0; k < 4; k++) {
                out[solved[k]] = u.getEntry(k);
            }
            System.arraycopy(out, 0, y, s * ny, SPECIES);

            double massIn = massFlow(x, s * nx);
            double massOut = massFlow(y, s * ny);
            assertEquals(massIn, massOut, 1e-12 * massIn, "mass flow (g/s) of sample " + s);
        }

        double[] residuals = new double[batch * 4];
        double[] scales = new double[batch * 4];
        evaluator.residuals(x, y, batch, residuals, scales);
        for (int s = 0; s < batch; s++) {
            for (int i = 0; i < 4; i++) {
                double r = residuals[s * 4 + i];
                double scale = scales[s * 4 + i];
                assertTrue(scale > 0, "scale of " + evaluator.lawName(i));
                assertTrue(Math.abs(r) <= 1e-12 * scale,
                        "sample " + s + ", law " + evaluator.lawName(i) + ": residual " + r + " at scale " + scale);
            }
        }

        // the residuals can fail: one more mol/s of H2 (2 H atoms each) breaks only the hydrogen balance
        double delta = 1e-3;
        y[4] += delta;
        double[] r = new double[4];
        evaluator.residuals(x, y, 1, r, null);
        assertEquals(0.0, r[0], 1e-12);
        assertEquals(2 * delta, r[1], 1e-12);
        assertEquals(0.0, r[2], 1e-12);
        assertEquals(0.0, r[3], 1e-12);
    }

    private static String[] concat(String[] head, String... tail) {
        String[] all = new String[head.length + tail.length];
        System.arraycopy(head, 0, all, 0, head.length);
        System.arraycopy(tail, 0, all, head.length, tail.length);
        return all;
    }
}
