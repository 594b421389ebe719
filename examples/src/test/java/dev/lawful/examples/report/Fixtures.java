package dev.lawful.examples.report;

import dev.lawful.examples.TruthModel.ColumnGroup;
import dev.lawful.examples.TruthModel.LawMark;
import java.util.List;
import java.util.SplittableRandom;

/**
 * Small synthetic scenario results for the report tests: random numbers with a fixed seed, shaped like a real
 * scenario (three networks whose residuals differ by many decades, the exact one with many exact zeros).
 */
final class Fixtures {
    static final List<String> OUTPUTS = List.of("out[0]", "out[1]", "out[2]", "T");
    static final List<ColumnGroup> GROUPS = List.of(new ColumnGroup("outlet flows", "mol/s", 0, 3),
            new ColumnGroup("temperature", "K", 3, 1));
    static final List<String> LAWS = List.of("carbon", "energy");
    static final List<String> UNITS = List.of("mol/s", "W");
    static final List<LawMark> MARKS = List.of(new LawMark("carbon", 1e-6, "1 ppm of the carbon feed"),
            new LawMark("energy", 0.5, "0.5 W, a sensor's resolution"));
    static final int[] COMPLETED = {1, 3};

    private Fixtures() {
    }

    /** @return a result with {@code rows} test rows and the three usual networks */
    static ScenarioResult result(int rows) {
        SplittableRandom random = new SplittableRandom(7);
        double[] truth = truth(random, rows);
        return new ScenarioResult("reformer", "Test reformer", OUTPUTS, GROUPS, LAWS, UNITS, MARKS, truth, rows,
                COMPLETED, List.of(run(random, "unconstrained", truth, rows, 1e-2, 1e-3, 0),
                        run(random, "penalty", truth, rows, 5e-3, 1e-5, 0),
                        run(random, "exact", truth, rows, 5e-3, 1e-17, 0.6)),
                "synthetic numbers for tests");
    }

    static double[] truth(SplittableRandom random, int rows) {
        double[] t = new double[rows * OUTPUTS.size()];
        for (int r = 0; r < rows; r++) {
            for (int c = 0; c < 3; c++) {
                t[r * 4 + c] = random.nextDouble(0.5, 2.0) * (c + 1);
            }
            t[r * 4 + 3] = random.nextDouble(600, 900);
        }
        return t;
    }

    /**
     * @param noise     relative size of the prediction error
     * @param residual  typical residual magnitude
     * @param zeroShare share of rows whose residuals are exactly zero
     */
    static NetworkRun run(SplittableRandom random, String label, double[] truth, int rows, double noise,
                          double residual, double zeroShare) {
        double[] p = truth.clone();
        for (int i = 0; i < p.length; i++) {
            p[i] += noise * p[i] * random.nextGaussian();
        }
        double[] r = new double[rows * LAWS.size()];
        for (int i = 0; i < r.length; i++) {
            boolean zero = random.nextDouble() < zeroShare;
            // a spread over about three decades, both signs; the energy law's unit makes its residuals larger
            r[i] = zero ? 0 : residual * (i % 2 == 0 ? 1 : 1e3) * Math.pow(10, random.nextDouble(-2, 1))
                    * (random.nextBoolean() ? 1 : -1);
        }
        double[] loss = {1.0, 0.5, 0.25, 0.125};
        return new NetworkRun(label, p, r, loss, 0.0125);
    }
}
