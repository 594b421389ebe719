package dev.lawful.examples.report;

import dev.lawful.examples.TruthModel.ColumnGroup;
import java.util.ArrayList;
import java.util.List;

/**
 * Every number a report shows for one network: the table, {@code report.json} and {@code metrics.csv} are all
 * written from these, so they agree.
 *
 * @param label           the network's label
 * @param groups          test error per output group, in the order of {@link ScenarioResult#groups()}
 * @param laws            residual statistics per law, in the order of {@link ScenarioResult#lawNames()}
 * @param secondsPerEpoch mean training time per epoch in seconds
 * @param epochs          number of epochs with a recorded loss
 * @param finalLoss       the loss after the last epoch (the network's own loss); NaN when none was recorded, and
 *                        possibly infinite or NaN when training diverged
 */
public record RunMetrics(String label, List<GroupError> groups, List<LawResidualStats> laws, double secondsPerEpoch,
                         int epochs, double finalLoss) {

    /**
     * Copies the lists unmodifiable.
     *
     * @param label           see the class comment
     * @param groups          see the class comment
     * @param laws            see the class comment
     * @param secondsPerEpoch see the class comment
     * @param epochs          see the class comment
     * @param finalLoss       see the class comment
     */
    public RunMetrics {
        groups = List.copyOf(groups);
        laws = List.copyOf(laws);
    }

    /**
     * Computes the metrics of one run of a result.
     *
     * @param result the scenario (its truth, groups, laws and marks)
     * @param run    one of {@code result.runs()}
     * @return the run's metrics
     */
    public static RunMetrics of(ScenarioResult result, NetworkRun run) {
        int p = result.outputCount();
        double[] truth = result.truth();
        double[] predicted = run.predicted();
        List<GroupError> groups = new ArrayList<>();
        for (ColumnGroup g : result.groups()) {
            groups.add(new GroupError(g.name(), g.unit(), Metrics.rmse(predicted, truth, p, g.first(), g.count()),
                    Metrics.rSquared(predicted, truth, p, g.first(), g.count())));
        }
        double[] residuals = run.residuals();
        List<LawResidualStats> laws = new ArrayList<>();
        for (int j = 0; j < result.lawCount(); j++) {
            double[] a = Metrics.magnitudes(residuals, result.lawCount(), j);
            double mark = result.marks().get(j).value();
            laws.add(new LawResidualStats(result.lawNames().get(j), result.lawUnits().get(j), a.length,
                    Metrics.max(a), Metrics.mean(a), Metrics.percentile(a, 99), Metrics.zeros(a), mark,
                    Metrics.above(a, mark)));
        }
        return new RunMetrics(run.label(), groups, laws, run.secondsPerEpoch(), run.epochs(), run.finalLoss());
    }

    /**
     * @param result a scenario
     * @return the metrics of each of its runs, in run order
     */
    public static List<RunMetrics> of(ScenarioResult result) {
        List<RunMetrics> out = new ArrayList<>();
        for (NetworkRun r : result.runs()) {
            out.add(of(result, r));
        }
        return List.copyOf(out);
    }
}
