package dev.lawful.examples.report;

import dev.lawful.io.CsvWriter;
import java.util.ArrayList;
import java.util.List;

/**
 * Writes {@code metrics.csv} and {@code residuals.csv} with {@link CsvWriter} (shortest round-trip numbers; NaN
 * written as {@code NaN}). Their columns are listed in {@link ReportWriter}'s class comment.
 */
final class ReportCsv {
    /** Header of {@code metrics.csv}. */
    static final List<String> METRICS_HEADER = List.of("network", "section", "item", "metric", "unit", "value");

    private ReportCsv() {
    }

    /**
     * Writes one row per network and metric: per group {@code rmse} and {@code rSquared} (section
     * {@code testError}), per law {@code maxAbs}, {@code meanAbs}, {@code p99Abs}, {@code zeros},
     * {@code aboveMark} (section {@code residuals}), then {@code secondsPerEpoch}, {@code epochs} and
     * {@code finalLoss} (section {@code training}, item {@code ""}).
     *
     * @param metrics the runs' metrics, in run order
     * @param out     receives the CSV text
     */
    static void metrics(List<RunMetrics> metrics, Appendable out) {
        CsvWriter csv = new CsvWriter(out).header(METRICS_HEADER);
        for (RunMetrics m : metrics) {
            for (GroupError g : m.groups()) {
                row(csv, m, "testError", g.group(), "rmse", g.unit(), g.rmse());
                row(csv, m, "testError", g.group(), "rSquared", "", g.rSquared());
            }
            for (LawResidualStats s : m.laws()) {
                row(csv, m, "residuals", s.law(), "maxAbs", s.unit(), s.max());
                row(csv, m, "residuals", s.law(), "meanAbs", s.unit(), s.mean());
                row(csv, m, "residuals", s.law(), "p99Abs", s.unit(), s.p99());
                row(csv, m, "residuals", s.law(), "zeros", "", s.zeros());
                row(csv, m, "residuals", s.law(), "aboveMark", "", s.aboveMark());
            }
            row(csv, m, "training", "", "secondsPerEpoch", "s", m.secondsPerEpoch());
            row(csv, m, "training", "", "epochs", "", m.epochs());
            row(csv, m, "training", "", "finalLoss", "", m.finalLoss());
        }
        csv.flush();
    }

    /** @return the number of data rows {@link #metrics} writes for a result (without the header) */
    static int metricRows(ScenarioResult result) {
        return result.runs().size() * (2 * result.groups().size() + 5 * result.lawCount() + 3);
    }

    private static void row(CsvWriter csv, RunMetrics m, String section, String item, String metric, String unit,
                            double value) {
        csv.value(m.label()).value(section).value(item).value(metric).value(unit).value(value).endRow();
    }

    /**
     * Writes one row per network and test row, networks in run order and test rows in order within each:
     * {@code sample} (the 0-based test row), {@code network} (the label), then one column per law, named as the law,
     * holding the signed residual lhs − rhs in the law's SI unit.
     *
     * @param result the scenario
     * @param out    receives the CSV text
     */
    static void residuals(ScenarioResult result, Appendable out) {
        List<String> header = new ArrayList<>(List.of("sample", "network"));
        header.addAll(result.lawNames());
        CsvWriter csv = new CsvWriter(out).header(header);
        int m = result.lawCount();
        for (NetworkRun run : result.runs()) {
            double[] r = run.residuals();
            for (int s = 0; s < result.rows(); s++) {
                csv.value(s).value(run.label()).values(r, s * m, m).endRow();
            }
        }
        csv.flush();
    }
}
