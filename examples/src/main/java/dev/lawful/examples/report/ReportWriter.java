package dev.lawful.examples.report;

import java.awt.image.BufferedImage;
import java.io.IOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Objects;

/**
 * Writes the report of one worked scenario: the comparison of its networks ({@link ScenarioResult#runs()}) as a
 * text table, JSON, CSV and two PNG figures, all in one directory.
 *
 * <pre>{@code
 * ScenarioResult result = new ScenarioResult("reformer", "Steam reformer outlet", outputNames,
 *         model.outputGroups(), lawNames, lawUnits, model.lawMarks(), truth, rows, new int[] {2, 4, 1, 5},
 *         List.of(unconstrained, penalty, exact), "synthetic data; timings on 2 shared cores");
 * ReportWriter writer = new ReportWriter();
 * System.out.print(writer.table(result));
 * List<Path> files = writer.write(result, Path.of("target/report/reformer"));
 * }</pre>
 *
 * <h2>Files</h2>
 * <ul>
 *   <li>{@value #TABLE}: the text of {@link #table(ScenarioResult)}, UTF-8.</li>
 *   <li>{@value #JSON}: one object with {@code scenario}, {@code title}, {@code rows}, {@code caution},
 *       {@code outputs} (output names), {@code completedOutputs} (their names), {@code groups}
 *       ({@code {name, unit, columns}}), {@code laws} ({@code {name, unit, mark, markLabel}}), {@code percentile}
 *       ({@code {percent: 99, method: "nearest-rank"}}) and {@code networks}, one per run in run order:
 *       {@code {label, testError: [{group, unit, rmse, rSquared}], residuals: [{law, unit, samples, maxAbs, meanAbs,
 *       p99Abs, zeros, aboveMark}], secondsPerEpoch, epochs, finalLoss, lossPerEpoch}}. Numbers are full
 *       doubles that read back exactly; {@code rSquared} is {@code null} when the group's true values are constant
 *       (R² undefined), {@code finalLoss} when no loss was recorded, and a loss entry when it was not finite.</li>
 *   <li>{@value #METRICS_CSV}: columns {@code network, section, item, metric, unit, value}; one row per network
 *       and metric: section {@code testError} with item the group and metric {@code rmse} or {@code rSquared};
 *       section {@code residuals} with item the law and metric {@code maxAbs}, {@code meanAbs}, {@code p99Abs},
 *       {@code zeros} or {@code aboveMark}; section {@code training} (item empty) with {@code secondsPerEpoch},
 *       {@code epochs} and {@code finalLoss}. Units are SI text, empty for pure numbers and counts. An undefined
 *       value is {@code NaN}.</li>
 *   <li>{@value #RESIDUALS_CSV}: columns {@code sample, network}, then one per law (named as the law): the signed
 *       residual lhs − rhs in the law's SI unit, one row per network and test row (networks in run order, rows in
 *       order within each). Exact zeros are written {@code 0}.</li>
 *   <li>{@value #RESIDUALS_PNG}: per law, the histogram of |residual| of every network on a log axis, exact zeros
 *       in a bar of their own labelled {@code = 0} and counted in the legend, the law's mark as a dashed line
 *       (see {@link ResidualPlot}).</li>
 *   <li>{@value #PARITY_PNG}: per completed output, predicted against true for every network, with y = x
 *       (see {@link ParityPlot}).</li>
 * </ul>
 * Figures are 1200 px wide, panels in two columns (one for a single panel), 440 px high each, under a 44 px title.
 *
 * <h2>Statistics</h2>
 * RMSE and R² per output group ({@link Metrics#rmse}, {@link Metrics#rSquared}: R² = 1 − SSE/SST pooled over the
 * group's columns, SST about each column's own mean); per law the largest, mean and nearest-rank 99th percentile
 * |residual| ({@link Metrics#percentile}), the number of exact zeros and the number of rows above the law's mark.
 *
 * <p>The writer holds no state and is thread-safe. Drawing sets {@code java.awt.headless=true} unless the property
 * is already set.
 */
public final class ReportWriter {
    /** File name of the comparison table. */
    public static final String TABLE = "table.txt";
    /** File name of the JSON report. */
    public static final String JSON = "report.json";
    /** File name of the metrics CSV. */
    public static final String METRICS_CSV = "metrics.csv";
    /** File name of the per-row residuals CSV. */
    public static final String RESIDUALS_CSV = "residuals.csv";
    /** File name of the residual histograms. */
    public static final String RESIDUALS_PNG = "residuals.png";
    /** File name of the predicted-versus-true figure. */
    public static final String PARITY_PNG = "predicted-vs-true.png";

    /** Makes a writer. */
    public ReportWriter() {
    }

    /**
     * Computes every metric of the report.
     *
     * @param result the scenario
     * @return one entry per run, in run order
     */
    public List<RunMetrics> metrics(ScenarioResult result) {
        return RunMetrics.of(Objects.requireNonNull(result, "result"));
    }

    /**
     * The comparison table: per network, test RMSE and R² per output group, per law max, mean and 99th percentile
     * |residual| with the counts of exact zeros and of rows above the mark, and training time per epoch, epochs and
     * final loss; then the marks, the definitions and the caution.
     *
     * @param result the scenario
     * @return the table, lines ended by {@code \n}, for the console or {@value #TABLE}
     */
    public String table(ScenarioResult result) {
        return ComparisonTable.render(result, metrics(result));
    }

    /**
     * Writes every file of the report into {@code dir}, creating it (and its parents) when needed and replacing
     * files of the same names.
     *
     * @param result the scenario
     * @param dir    the scenario's report directory
     * @return the files written, in the order of the class comment
     * @throws IOException when the directory or a file cannot be written
     */
    public List<Path> write(ScenarioResult result, Path dir) throws IOException {
        Objects.requireNonNull(result, "result");
        Files.createDirectories(dir);
        List<RunMetrics> metrics = metrics(result);
        List<Path> written = new ArrayList<>();
        Path table = dir.resolve(TABLE);
        Files.writeString(table, ComparisonTable.render(result, metrics), StandardCharsets.UTF_8);
        written.add(table);
        Path json = dir.resolve(JSON);
        try (Writer w = Files.newBufferedWriter(json, StandardCharsets.UTF_8)) {
            ReportJson.write(result, metrics, w);
        }
        written.add(json);
        Path metricsCsv = dir.resolve(METRICS_CSV);
        try (Writer w = Files.newBufferedWriter(metricsCsv, StandardCharsets.UTF_8)) {
            ReportCsv.metrics(metrics, w);
        }
        written.add(metricsCsv);
        Path residualsCsv = dir.resolve(RESIDUALS_CSV);
        try (Writer w = Files.newBufferedWriter(residualsCsv, StandardCharsets.UTF_8)) {
            ReportCsv.residuals(result, w);
        }
        written.add(residualsCsv);
        Path residualsPng = dir.resolve(RESIDUALS_PNG);
        BufferedImage residuals = ResidualPlot.draw(result, metrics);
        Charts.writePng(residuals, residualsPng);
        written.add(residualsPng);
        Path parityPng = dir.resolve(PARITY_PNG);
        Charts.writePng(ParityPlot.draw(result), parityPng);
        written.add(parityPng);
        return List.copyOf(written);
    }
}
