package dev.lawful.examples;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.ResidualReport;
import dev.lawful.enforce.Tier;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.SplittableRandom;

/**
 * Checks shared by the scenarios' law-file tests: a truth model against its own law file, read from
 * {@code examples/laws} and from the class path.
 */
public final class ScenarioLaws {
    /** One double ulp of 1, 2⁻⁵³. */
    public static final double ULP = 0x1p-53;

    private ScenarioLaws() {
    }

    /** @return the law file of {@code model}, read from the source tree; fails when it equals not the class-path copy */
    public static LawSet read(TruthModel model) throws IOException {
        Path file = null;
        for (Path p : List.of(Path.of("laws", model.lawFile()), Path.of("examples", "laws", model.lawFile()))) {
            if (Files.isRegularFile(p)) {
                file = p;
            }
        }
        if (file == null) {
            return fail("cannot find laws/" + model.lawFile() + " from " + Path.of("").toAbsolutePath());
        }
        LawSet fromFile = LawSet.read(file);
        try (InputStream in = ScenarioLaws.class.getResourceAsStream("/laws/" + model.lawFile())) {
            assertNotNull(in, "/laws/" + model.lawFile() + " is not on the class path");
            LawSet fromClassPath = LawSet.parse(model.lawFile(), new String(in.readAllBytes(), StandardCharsets.UTF_8));
            assertEquals(fromFile, fromClassPath, "the class-path copy differs from " + file);
        }
        assertTrue(fromFile.warnings().isEmpty(), fromFile.warnings().toString());
        return fromFile;
    }

    /** Draws {@code n} input rows from {@code seed}. */
    public static double[] inputs(TruthModel model, int n, long seed) {
        SplittableRandom random = new SplittableRandom(seed);
        double[] x = new double[n * model.inputWidth()];
        for (int s = 0; s < n; s++) {
            model.sample(random, x, s * model.inputWidth());
        }
        return x;
    }

    /** @return the truth's outputs of the rows {@code x} */
    public static double[] outputs(TruthModel model, double[] x, int n) {
        double[] y = new double[n * model.outputWidth()];
        for (int s = 0; s < n; s++) {
            model.solve(x, s * model.inputWidth(), y, s * model.outputWidth());
        }
        return y;
    }

    /**
     * The checks every scenario passes: widths agree with the law set, the completion has the intended tier,
     * truth rows satisfy every law to {@code ulps} double ulps of its natural scale, completing the truth's free
     * outputs reproduces its completed outputs to {@code reproduce} of each completed column's largest magnitude in
     * the batch, the output groups tile the outputs and the law marks name the laws in order.
     *
     * @return the completion, for further checks
     */
    public static Completion check(TruthModel model, Tier tier, int n, double ulps, double reproduce)
            throws IOException {
        LawSet laws = read(model);
        assertEquals(laws.inputWidth(), model.inputWidth(), "input width");
        assertEquals(laws.outputWidth(), model.outputWidth(), "output width");
        Completion completion = Completion.of(laws);
        assertEquals(tier, completion.tier(), "tier");
        assertTrue(completion.warnings().isEmpty(), completion.warnings().toString());

        double[] x = inputs(model, n, 20240611L);
        double[] y = outputs(model, x, n);
        ResidualReport report = ResidualReport.of(laws, x, y, n, ulps * ULP);
        assertTrue(report.withinTolerance(), report.toTable());

        int p = model.outputWidth();
        int[] free = completion.freeOutputs();
        double[] z = new double[n * free.length];
        for (int s = 0; s < n; s++) {
            for (int f = 0; f < free.length; f++) {
                z[s * free.length + f] = y[s * p + free[f]];
            }
        }
        double[] completed = new double[n * p];
        completion.forward(x, z, n, completed, null, completion.newWorkspace());
        for (int k : completion.completedOutputs()) {
            double largest = 0;
            for (int s = 0; s < n; s++) {
                largest = Math.max(largest, Math.abs(y[s * p + k]));
            }
            for (int s = 0; s < n; s++) {
                double error = Math.abs(completed[s * p + k] - y[s * p + k]);
                if (!(error <= reproduce * largest)) {
                    fail(laws.outputNames().get(k) + " of sample " + s + ": completed " + completed[s * p + k]
                            + ", truth " + y[s * p + k] + " (largest in batch " + largest + ")");
                }
            }
        }

        int next = 0;
        for (TruthModel.ColumnGroup g : model.outputGroups()) {
            assertEquals(next, g.first(), "groups must tile the outputs in order: " + g);
            assertTrue(g.count() > 0, g.toString());
            next += g.count();
        }
        assertEquals(p, next, "groups must cover every output");
        List<TruthModel.LawMark> marks = model.lawMarks();
        assertEquals(laws.laws().size(), marks.size(), "one mark per law");
        for (int i = 0; i < marks.size(); i++) {
            assertEquals(laws.laws().get(i).name(), marks.get(i).law(), "marks in declaration order");
            assertTrue(marks.get(i).value() > 0 && !marks.get(i).label().isBlank(), marks.get(i).toString());
        }
        return completion;
    }

    /** The same seed gives the same rows. */
    public static void assertReproducibleSampling(TruthModel model) {
        double[] a = inputs(model, 50, 7);
        double[] b = inputs(model, 50, 7);
        assertEquals(java.util.Arrays.toString(a), java.util.Arrays.toString(b));
    }
}
