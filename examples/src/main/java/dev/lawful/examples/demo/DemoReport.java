package dev.lawful.examples.demo;

import dev.lawful.examples.report.DistributionPlot;
import dev.lawful.examples.report.NetworkRun;
import dev.lawful.examples.report.ReportWriter;
import dev.lawful.examples.report.ScenarioResult;
import java.io.IOException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * The report of one demo run: the {@link ScenarioResult} the report writer draws and tabulates, plus the verdict on
 * exactness (how many test rows of each network lie outside the completion's documented bound), which also goes
 * under the table and into the JSON as the report's note.
 */
public final class DemoReport {
    private final ScenarioTrainer.Outcome outcome;
    private final ScenarioResult result;
    private final ReportWriter writer = new ReportWriter();

    private DemoReport(ScenarioTrainer.Outcome outcome) {
        this.outcome = outcome;
        List<NetworkRun> runs = new ArrayList<>();
        for (ScenarioTrainer.Network n : outcome.networks()) {
            runs.add(new NetworkRun(n.label(), n.predicted(), n.residuals(), n.lossPerEpoch(), n.secondsPerEpoch()));
        }
        Scenario s = outcome.scenario();
        this.result = new ScenarioResult(s.name(), s.title(), outcome.laws().outputNames(),
                s.truth().outputGroups(), outcome.lawNames(), outcome.lawUnits(), outcome.lawMarks(),
                outcome.testY(), outcome.testRows(), outcome.completion().completedOutputs(), runs, note());
    }

    /**
     * @param outcome a finished run
     * @return its report
     */
    public static DemoReport of(ScenarioTrainer.Outcome outcome) {
        return new DemoReport(outcome);
    }

    /** @return what the report writer draws */
    public ScenarioResult result() {
        return result;
    }

    /** @return the comparison table, with the note under it */
    public String table() {
        return writer.table(result);
    }

    /**
     * @return true when the exact network obeyed every law within the documented bound on every test row
     */
    public boolean exactWithinBound() {
        for (ScenarioTrainer.Network n : outcome.networks()) {
            if (n.label().equals(ScenarioTrainer.EXACT)) {
                return n.outsideBound() == 0;
            }
        }
        return false;
    }

    /** @return one line per network: test rows outside the documented bound */
    public String verdict() {
        StringBuilder sb = new StringBuilder("Test rows outside the completion's documented float32 bound (any law):");
        for (ScenarioTrainer.Network n : outcome.networks()) {
            sb.append(String.format(Locale.ROOT, "%n  %-14s %d of %d", n.label(), n.outsideBound(),
                    outcome.testRows()));
        }
        List<Scenario.SideCheck> checks = outcome.scenario().sideChecks();
        for (int c = 0; c < checks.size(); c++) {
            sb.append(String.format(Locale.ROOT, "%nLargest |%s| over the test rows (%s), implied by the laws:",
                    checks.get(c).name(), checks.get(c).unit()));
            for (ScenarioTrainer.Network n : outcome.networks()) {
                sb.append(String.format(Locale.ROOT, "%n  %-14s %.3g", n.label(), n.sideCheckMax()[c]));
            }
        }
        if (!exactWithinBound()) {
            sb.append(String.format(Locale.ROOT, "%n  the exact network missed the bound: this is a defect, please"
                    + " report it with the command you ran"));
        }
        sb.append(limitLines("%n"));
        if (!exactInsideLimits()) {
            sb.append(String.format(Locale.ROOT, "%n  the exact network left a limit: this is a defect, please report"
                    + " it with the command you ran"));
        }
        return sb.toString();
    }

    /**
     * @return per limit of the law file and network, the test rows outside it (beyond float32 rounding) and the
     *         worst violation in the limit's unit; empty when the law file has none
     */
    private String limitLines(String newline) {
        StringBuilder sb = new StringBuilder();
        List<ScenarioTrainer.Network> nets = outcome.networks();
        LimitTally first = nets.get(0).limits();
        for (int c = 0; c < first.names().size(); c++) {
            sb.append(String.format(Locale.ROOT, newline + "Test rows outside limit '%s' (worst violation, %s):",
                    first.names().get(c), first.units().get(c)));
            for (ScenarioTrainer.Network n : nets) {
                sb.append(String.format(Locale.ROOT, newline + "  %-14s %d of %d (%.3g)", n.label(),
                        n.limits().outside()[c], outcome.testRows(), n.limits().worst()[c]));
            }
        }
        return sb.toString();
    }

    /** @return true when the exact network kept every test row inside every limit (beyond float32 rounding) */
    public boolean exactInsideLimits() {
        for (ScenarioTrainer.Network n : outcome.networks()) {
            if (n.label().equals(ScenarioTrainer.EXACT)) {
                return java.util.Arrays.stream(n.limits().outside()).allMatch(v -> v == 0);
            }
        }
        return false;
    }

    /**
     * Writes the report files.
     *
     * @param dir the scenario's report folder (created when missing)
     * @return the files written
     * @throws IOException when a file cannot be written
     */
    public List<Path> write(Path dir) throws IOException {
        List<Path> files = new ArrayList<>(writer.write(result, dir));
        int[] shown = limitedOutput();
        if (shown != null) {
            files.add(DistributionPlot.write(result, shown[0], outcome.laws().expand().limit(shown[1]).bound(), dir));
        }
        return List.copyOf(files);
    }

    /**
     * @return the completed output bounded by a constant limit that the unconstrained network leaves most often,
     *         and that limit's index, or null when no limit bounds a completed output by a constant
     */
    private int[] limitedOutput() {
        dev.lawful.algebra.ExpandedLaws e = outcome.laws().expand();
        int p = outcome.laws().outputWidth();
        double[] free = outcome.networks().get(0).predicted();
        int[] best = null;
        int most = -1;
        for (int j = 0; j < e.limitCount(); j++) {
            dev.lawful.algebra.ScalarLimit l = e.limit(j);
            int o = l.singleOutput();
            boolean completed = o >= 0 && java.util.Arrays.stream(outcome.completion().completedOutputs())
                    .anyMatch(c -> c == o);
            if (!completed || Double.isNaN(l.bound())) {
                continue;
            }
            int outside = 0;
            for (int s = 0; s < outcome.testRows(); s++) {
                double v = free[s * p + o];
                outside += l.lower() ? (v < l.bound() ? 1 : 0) : (v > l.bound() ? 1 : 0);
            }
            if (outside > most) {
                most = outside;
                best = new int[] {o, j};
            }
        }
        return best;
    }

    private String note() {
        ScenarioTrainer.Outcome o = outcome;
        Scenario s = o.scenario();
        StringBuilder sb = new StringBuilder();
        String caution = s.caution();
        sb.append(Character.toUpperCase(caution.charAt(0))).append(caution.substring(1)).append(" This run: ");
        sb.append(String.format(Locale.ROOT, "%d rows generated by the scenario's physical model (%d left out"
                        + " where the model did not converge), %d for training and %d for test, seed %d. Networks: float32,"
                        + " hidden layers %s (tanh), Adam %.3g, batch %d, %d epochs, standardised features and"
                        + " labels; penalty weight %.3g on squared residuals relative to each law's mean natural"
                        + " scale. ",
                o.trainRows() + o.testRows() + o.dropped(), o.dropped(), o.trainRows(), o.testRows(), o.seed(),
                java.util.Arrays.toString(s.hidden()), s.learningRate(), s.batchSize(), s.epochs(),
                s.penaltyWeight()));
        if (!s.limitWeights().isEmpty() && !o.laws().limits().isEmpty()) {
            sb.append("The exact network's limits move a sample the least in normalised units, weighted ")
                    .append(new java.util.TreeMap<>(s.limitWeights())).append(" (1 for the other outputs). ");
        }
        for (ScenarioTrainer.Network n : o.networks()) {
            sb.append(String.format(Locale.ROOT, "%s: %d of %d test rows outside the documented float32 bound. ",
                    n.label(), n.outsideBound(), o.testRows()));
        }
        for (int c = 0; c < s.sideChecks().size(); c++) {
            sb.append("Largest |").append(s.sideChecks().get(c).name()).append("| (")
                    .append(s.sideChecks().get(c).unit()).append("):");
            for (ScenarioTrainer.Network n : o.networks()) {
                sb.append(String.format(Locale.ROOT, " %s %.3g", n.label(), n.sideCheckMax()[c]));
            }
            sb.append(". ");
        }
        sb.append(limitLines(" "));
        return sb.toString().strip();
    }
}
