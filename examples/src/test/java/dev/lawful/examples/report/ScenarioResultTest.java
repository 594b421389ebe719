package dev.lawful.examples.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.util.List;
import org.junit.jupiter.api.Test;

/** Bad input is refused on construction with a message that names what is wrong and how to fix it. */
class ScenarioResultTest {
    private static final ScenarioResult GOOD = Fixtures.result(10);

    private static NetworkRun withPredicted(NetworkRun r, double[] predicted) {
        return new NetworkRun(r.label(), predicted, r.residuals(), r.lossPerEpoch(), r.secondsPerEpoch());
    }

    private static ScenarioResult withRuns(List<NetworkRun> runs) {
        return new ScenarioResult(GOOD.scenario(), GOOD.title(), GOOD.outputNames(), GOOD.groups(), GOOD.lawNames(),
                GOOD.lawUnits(), GOOD.marks(), GOOD.truth(), GOOD.rows(), GOOD.completedOutputs(), runs,
                GOOD.caution());
    }

    private static String message(Runnable r) {
        return assertThrows(IllegalArgumentException.class, r::run).getMessage();
    }

    @Test
    void predictionsOfTheWrongLength() {
        NetworkRun first = GOOD.runs().get(0);
        NetworkRun shortRun = withPredicted(first, new double[39]);
        assertEquals("run 'unconstrained': predicted has 39 values, expected rows x outputs = 10 x 4 = 40"
                + " (row-major, physical units)", message(() -> withRuns(List.of(shortRun))));
    }

    @Test
    void residualsOfTheWrongLength() {
        NetworkRun first = GOOD.runs().get(0);
        NetworkRun r = new NetworkRun("exact", first.predicted(), new double[21], first.lossPerEpoch(), 1);
        assertEquals("run 'exact': residuals has 21 values, expected rows x laws = 10 x 2 = 20 (row-major, one"
                + " signed residual per law per test row)", message(() -> withRuns(List.of(r))));
    }

    @Test
    void truthOfTheWrongLength() {
        assertEquals("truth has 3 values, expected rows x outputs = 10 x 4 = 40 (row-major, physical units)",
                message(() -> new ScenarioResult("s", "t", GOOD.outputNames(), GOOD.groups(), GOOD.lawNames(),
                        GOOD.lawUnits(), GOOD.marks(), new double[3], 10, GOOD.completedOutputs(), GOOD.runs(),
                        null)));
    }

    @Test
    void noRuns() {
        assertEquals("runs is empty; pass at least one NetworkRun (normally unconstrained, penalty and exact)",
                message(() -> withRuns(List.of())));
    }

    @Test
    void nanPrediction() {
        double[] p = GOOD.runs().get(1).predicted();
        p[2 * 4 + 3] = Double.NaN;
        NetworkRun bad = withPredicted(GOOD.runs().get(1), p);
        assertEquals("run 'penalty': predicted at row 2, column 'T' is NaN; every value must be finite: a network"
                + " that predicts non-finite values has diverged or was given non-finite inputs; report that"
                + " instead, or leave the run out", message(() -> withRuns(List.of(GOOD.runs().get(0), bad))));
    }

    @Test
    void infiniteResidual() {
        NetworkRun first = GOOD.runs().get(0);
        double[] r = first.residuals();
        r[5] = Double.NEGATIVE_INFINITY;
        NetworkRun bad = new NetworkRun("x", first.predicted(), r, first.lossPerEpoch(), 0);
        assertEquals("run 'x': residuals at row 2, column 'energy' is -Infinity; every value must be finite: a"
                + " residual that is not finite comes from a non-finite prediction or an overflow while evaluating"
                + " the law; check that row's predictions", message(() -> withRuns(List.of(bad))));
    }

    @Test
    void repeatedLabels() {
        assertEquals("two runs are labelled 'penalty'; give every run its own label",
                message(() -> withRuns(List.of(GOOD.runs().get(1), GOOD.runs().get(1)))));
    }

    @Test
    void marksOutOfOrder() {
        assertEquals("marks[0] is for law 'energy' but law 0 is 'carbon'; give one LawMark per law, in the order"
                + " of lawNames", message(() -> new ScenarioResult("s", "t", GOOD.outputNames(), GOOD.groups(),
                        GOOD.lawNames(), GOOD.lawUnits(), List.of(GOOD.marks().get(1), GOOD.marks().get(0)),
                        GOOD.truth(), 10, GOOD.completedOutputs(), GOOD.runs(), "")));
    }

    @Test
    void completedOutputOutOfRangeAndGroupOutsideTheOutputs() {
        assertEquals("completedOutputs[1] is 4, outside the output columns 0 .. 3",
                message(() -> new ScenarioResult("s", "t", GOOD.outputNames(), GOOD.groups(), GOOD.lawNames(),
                        GOOD.lawUnits(), GOOD.marks(), GOOD.truth(), 10, new int[] {1, 4}, GOOD.runs(), "")));
        assertEquals("group 'g' covers columns 2 .. 4 (first 2, count 3), but the outputs are columns 0 .. 3; a"
                + " group needs count >= 1 and must lie inside the outputs",
                message(() -> new ScenarioResult("s", "t", GOOD.outputNames(),
                        List.of(new dev.lawful.examples.TruthModel.ColumnGroup("g", "K", 2, 3)), GOOD.lawNames(),
                        GOOD.lawUnits(), GOOD.marks(), GOOD.truth(), 10, GOOD.completedOutputs(), GOOD.runs(),
                        "")));
    }

    @Test
    void lawNamedLikeAResidualsCsvColumn() {
        assertEquals("lawNames[1] is 'sample', a name residuals.csv uses for one of its own columns (sample,"
                + " network); rename it", message(() -> new ScenarioResult("s", "t", GOOD.outputNames(),
                        GOOD.groups(), List.of("carbon", "sample"), GOOD.lawUnits(), GOOD.marks(), GOOD.truth(), 10,
                        GOOD.completedOutputs(), GOOD.runs(), "")));
    }

    @Test
    void negativeTimeAndBlankLabel() {
        assertEquals("run 'exact': secondsPerEpoch is -1.0; expected the mean training time of one epoch in"
                + " seconds, finite and >= 0", message(() -> new NetworkRun("exact", new double[0], new double[0],
                        new double[0], -1)));
        assertEquals("a network run needs a label of one line that is not blank, found ' '; use a name such as"
                + " \"exact\"", message(() -> new NetworkRun(" ", new double[0], new double[0], new double[0], 0)));
    }

    @Test
    void arraysAreCopiedInAndOut() {
        double[] p = {1, 2};
        NetworkRun r = new NetworkRun("a", p, new double[0], new double[0], 0);
        p[0] = 99;
        assertEquals(1, r.predicted()[0]);
        assertNotSame(r.predicted(), r.predicted());
        double[] t = GOOD.truth();
        t[0] = -5;
        assertEquals(Fixtures.result(10).truth()[0], GOOD.truth()[0]);
    }
}
