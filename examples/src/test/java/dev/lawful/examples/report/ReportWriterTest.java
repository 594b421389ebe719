package dev.lawful.examples.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.io.CsvReader;
import dev.lawful.io.CsvTable;
import java.awt.image.BufferedImage;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import javax.imageio.ImageIO;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.jfree.chart.JFreeChart;
import org.jfree.data.xy.XYIntervalSeriesCollection;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.nd4j.shade.jackson.databind.JsonNode;
import org.nd4j.shade.jackson.databind.ObjectMapper;

class ReportWriterTest {
    private static final int ROWS = 50;
    private static final ScenarioResult RESULT = Fixtures.result(ROWS);
    private static final List<String> LABELS = List.of("unconstrained", "penalty", "exact");

    @TempDir
    static Path dir;
    private static List<Path> files;
    private static String table;
    private static JsonNode json;

    @BeforeAll
    static void write() throws IOException {
        files = new ReportWriter().write(RESULT, dir.resolve("reformer"));
        table = Files.readString(dir.resolve("reformer").resolve(ReportWriter.TABLE), StandardCharsets.UTF_8);
        json = new ObjectMapper().readTree(dir.resolve("reformer").resolve(ReportWriter.JSON).toFile());
    }

    private static Path file(String name) {
        return dir.resolve("reformer").resolve(name);
    }

    @Test
    void everyFileIsWrittenAndReturned() throws IOException {
        List<Path> expected = new ArrayList<>();
        for (String n : List.of(ReportWriter.TABLE, ReportWriter.JSON, ReportWriter.METRICS_CSV,
                ReportWriter.RESIDUALS_CSV, ReportWriter.RESIDUALS_PNG, ReportWriter.PARITY_PNG)) {
            expected.add(file(n));
        }
        assertEquals(expected, files);
        for (Path p : files) {
            assertTrue(Files.size(p) > 0, p + " is empty");
        }
        assertEquals(new ReportWriter().table(RESULT), table);
    }

    @Test
    void figuresDecodeAtTheDocumentedSize() throws IOException {
        for (String name : List.of(ReportWriter.RESIDUALS_PNG, ReportWriter.PARITY_PNG)) {
            BufferedImage image = ImageIO.read(file(name).toFile());
            assertNotNull(image, name + " does not decode as an image");
            // two panels in one row of two columns: a 44 px title band and one 440 px panel row
            assertEquals(1200, image.getWidth(), name);
            assertEquals(44 + 440, image.getHeight(), name);
        }
    }

    @Test
    void theDistributionFigureDecodesAndItsBinsCountEveryRowOnce(@TempDir Path other) throws IOException {
        Path png = DistributionPlot.write(RESULT, 0, 0.0, other);
        BufferedImage image = ImageIO.read(png.toFile());
        assertNotNull(image, png + " does not decode as an image");
        assertEquals(1200, image.getWidth());
        assertEquals(44 + 440, image.getHeight());
        double[] v = {-1, 0, 0, 0.5, 2};
        org.jfree.data.xy.XYSeries s = DistributionPlot.histogram("v", v, 1, 0, v.length, -1, 3.0 / DistributionPlot.BINS);
        int total = 0;
        for (int b = 0; b < DistributionPlot.BINS; b++) {
            total += s.getY(b).intValue() - 1;
        }
        // every row in exactly one bin (counts are shown plus one, for the log axis); the largest in the last
        assertEquals(v.length, total);
        assertEquals(2, s.getY(0).intValue());
        assertEquals(2, s.getY(DistributionPlot.BINS - 1).intValue());
        assertEquals(3, s.getY(DistributionPlot.BINS / 3).intValue(), "the two zeros share the bin at 0");
    }

    @Test
    void aSinglePanelFigureIsOneColumnAndThreePanelsAreTwoRows() {
        assertEquals(44 + 440, Charts.height(1));
        assertEquals(1, Charts.columns(1));
        assertEquals(44 + 2 * 440, Charts.height(3));
    }

    /**
     * @return the table's cells of one metric row, one per network: the row is the first at or after the row
     *         labelled {@code block} whose metric column reads {@code metric}
     */
    private static List<String> cells(String block, String metric) {
        String[] lines = table.split("\n");
        int header = 0;
        while (!lines[header].contains(" unit ")) {
            header++;
        }
        int row = header;
        while (!lines[row].startsWith("  " + block + " ")) {
            row++;
        }
        if (!metric.isEmpty()) {
            int metricColumn = lines[row].indexOf(' ', 2 + block.length());
            while (lines[row].charAt(metricColumn) == ' ') {
                metricColumn++;
            }
            while (!lines[row].startsWith(metric + " ", metricColumn)) {
                row++;
            }
        }
        List<String> out = new ArrayList<>();
        int from = lines[header].indexOf(" unit ");
        for (String label : LABELS) {
            int end = lines[header].indexOf(label, from) + label.length();
            from = end;
            String prefix = lines[row].substring(0, end).stripTrailing();
            assertEquals(end, prefix.length(), "the value under '" + label + "' is not right-aligned");
            out.add(prefix.substring(prefix.lastIndexOf(' ') + 1));
        }
        return out;
    }

    private static List<String> fromJson(String array, int index, String key, boolean rSquared) {
        List<String> out = new ArrayList<>();
        for (JsonNode n : json.get("networks")) {
            JsonNode v = n.get(array).get(index).get(key);
            out.add(rSquared ? Figures.rSquared(v.asDouble()) : v.isInt() ? v.asText() : Figures.of(v.asDouble()));
        }
        return out;
    }

    @Test
    void theJsonHoldsTheNumbersOfTheTable() {
        assertEquals("reformer", json.get("scenario").asText());
        assertEquals(ROWS, json.get("rows").asInt());
        assertEquals(3, json.get("networks").size());
        for (int i = 0; i < 3; i++) {
            assertEquals(LABELS.get(i), json.get("networks").get(i).get("label").asText());
        }
        assertEquals(List.of("out[1]", "T"), List.of(json.get("completedOutputs").get(0).asText(),
                json.get("completedOutputs").get(1).asText()));
        for (int g = 0; g < 2; g++) {
            String group = Fixtures.GROUPS.get(g).name();
            assertEquals(fromJson("testError", g, "rmse", false), cells(group, "RMSE"), group);
            assertEquals(fromJson("testError", g, "rSquared", true), cells(group, "R²"), group);
        }
        for (int j = 0; j < 2; j++) {
            String law = Fixtures.LAWS.get(j);
            assertEquals(fromJson("residuals", j, "maxAbs", false), cells(law, "max"), law);
            assertEquals(fromJson("residuals", j, "meanAbs", false), cells(law, "mean"), law);
            assertEquals(fromJson("residuals", j, "p99Abs", false), cells(law, "p99"), law);
            assertEquals(fromJson("residuals", j, "zeros", false), cells(law, "= 0"), law);
            assertEquals(fromJson("residuals", j, "aboveMark", false), cells(law, "> mark"), law);
        }
        List<String> seconds = new ArrayList<>();
        for (JsonNode n : json.get("networks")) {
            seconds.add(Figures.of(n.get("secondsPerEpoch").asDouble()));
            assertEquals(4, n.get("lossPerEpoch").size());
            assertEquals(0.125, n.get("finalLoss").asDouble(), 0);
        }
        assertEquals(seconds, cells("time per epoch", ""));
        assertTrue(table.contains("Caution: synthetic numbers for tests"), table);
    }

    @Test
    void theJsonResidualStatisticsAgreeWithCommonsMath() {
        for (int i = 0; i < 3; i++) {
            double[] r = RESULT.runs().get(i).residuals();
            for (int j = 0; j < 2; j++) {
                double[] a = new double[ROWS];
                for (int s = 0; s < ROWS; s++) {
                    a[s] = Math.abs(r[s * 2 + j]);
                }
                JsonNode n = json.get("networks").get(i).get("residuals").get(j);
                DescriptiveStatistics stats = new DescriptiveStatistics(a);
                // Source: Apache Commons Math 3.6.1 DescriptiveStatistics and Percentile (R_1, nearest rank)
                assertEquals(stats.getMax(), n.get("maxAbs").asDouble(), 0);
                assertEquals(stats.getMean(), n.get("meanAbs").asDouble(), 1e-14 * stats.getMean());
                assertEquals(new Percentile(99).withEstimationType(EstimationType.R_1).evaluate(a),
                        n.get("p99Abs").asDouble(), 0);
            }
        }
    }

    @Test
    void csvFilesHaveOneRowPerMetricAndPerSampleAndNetwork() throws IOException {
        CsvReader metrics = CsvReader.open(file(ReportWriter.METRICS_CSV));
        assertEquals(List.of("network", "section", "item", "metric", "unit", "value"), metrics.header());
        CsvTable values = metrics.read(List.of("value"));
        // 3 networks x (2 groups x 2 metrics + 2 laws x 5 metrics + 3 training metrics)
        assertEquals(3 * (2 * 2 + 2 * 5 + 3), values.rows());
        assertEquals(ReportCsv.metricRows(RESULT), values.rows());

        CsvReader residuals = CsvReader.open(file(ReportWriter.RESIDUALS_CSV));
        assertEquals(List.of("sample", "network", "carbon", "energy"), residuals.header());
        CsvTable r = residuals.read(List.of("sample", "carbon", "energy"));
        assertEquals(3 * ROWS, r.rows());
        // every signed residual reads back exactly, networks in run order
        for (int i = 0; i < 3; i++) {
            double[] expected = RESULT.runs().get(i).residuals();
            for (int s = 0; s < ROWS; s++) {
                assertEquals(s, r.get(i * ROWS + s, 0), 0);
                assertEquals(expected[s * 2], r.get(i * ROWS + s, 1), 0);
                assertEquals(expected[s * 2 + 1], r.get(i * ROWS + s, 2), 0);
            }
        }
    }

    private static int zerosOf(int run, int law) {
        double[] r = RESULT.runs().get(run).residuals();
        int n = 0;
        for (int s = 0; s < ROWS; s++) {
            n += r[s * 2 + law] == 0 ? 1 : 0;
        }
        return n;
    }

    @Test
    void exactZerosAreCountedEverywhereAndDrawnInTheirOwnBar() {
        int zeros = zerosOf(2, 0);
        assertTrue(zeros > 0 && zeros < ROWS, "the fixture should have some exact zeros, has " + zeros);
        assertEquals(zeros, json.get("networks").get(2).get("residuals").get(0).get("zeros").asInt());
        assertEquals(Integer.toString(zeros), cells("carbon", "= 0").get(2));

        List<RunMetrics> metrics = RunMetrics.of(RESULT);
        JFreeChart panel = ResidualPlot.panel(RESULT, metrics, 0);
        XYIntervalSeriesCollection data = (XYIntervalSeriesCollection) panel.getXYPlot().getDataset();
        assertEquals("exact, " + zeros + " of " + ROWS + " rows = 0", data.getSeriesKey(2));
        assertEquals("unconstrained", data.getSeriesKey(0));
        ResidualPlot.Bins bins = ResidualPlot.binsOf(RESULT, 0);
        double total = 0;
        boolean zeroBar = false;
        for (int item = 0; item < data.getItemCount(2); item++) {
            total += data.getYValue(2, item);
            if (data.getXValue(2, item) == bins.zeroPosition()) {
                zeroBar = true;
                assertEquals(100.0 * zeros / ROWS, data.getYValue(2, item), 1e-12);
            }
        }
        assertTrue(zeroBar, "no bar at the '= 0' position");
        // every row is in some bar: the shares add up to 100 %
        assertEquals(100, total, 1e-9);
        assertTrue(bins.zeroPosition() < bins.lo());
    }

    @Test
    void binsHoldEveryNonzeroMagnitudeAndTheMark() {
        ResidualPlot.Bins b = ResidualPlot.Bins.cover(List.of(new double[] {0, 3e-17, 2e-3}), 1e-6);
        assertTrue(b.lo() <= -17 && b.hi() >= -2, b.toString());
        for (double v : new double[] {3e-17, 1e-16, 5e-9, 2e-3}) {
            int bin = b.of(v);
            double left = Math.pow(10, b.lo() + (double) bin / b.perDecade());
            double right = Math.pow(10, b.lo() + (bin + 1.0) / b.perDecade());
            assertTrue(left <= v * (1 + 1e-12) && v < right, v + " is not in bin " + bin + " of " + b);
        }
        assertEquals(b.count() - 1, b.of(Math.pow(10, b.hi())));
        ResidualPlot.Bins onlyZeros = ResidualPlot.Bins.cover(List.of(new double[] {0, 0}), 1e-6);
        assertTrue(onlyZeros.lo() < -6 && onlyZeros.hi() > -6, onlyZeros.toString());
    }

    @Test
    void undefinedNumbersAreNullInJsonNaNInCsvAndNotAvailableInTheTable(@TempDir Path other) throws IOException {
        double[] truth = RESULT.truth();
        for (int s = 0; s < ROWS; s++) {
            truth[s * 4 + 3] = 700;
        }
        NetworkRun first = RESULT.runs().get(0);
        NetworkRun diverging = new NetworkRun("unconstrained", first.predicted(), first.residuals(),
                new double[] {1, Double.POSITIVE_INFINITY}, 0.5);
        ScenarioResult constant = new ScenarioResult("reformer", "Constant temperature", Fixtures.OUTPUTS,
                Fixtures.GROUPS, Fixtures.LAWS, Fixtures.UNITS, Fixtures.MARKS, truth, ROWS, Fixtures.COMPLETED,
                List.of(diverging), null);
        new ReportWriter().write(constant, other);
        JsonNode n = new ObjectMapper().readTree(other.resolve(ReportWriter.JSON).toFile());
        JsonNode net = n.get("networks").get(0);
        assertTrue(net.get("testError").get(1).get("rSquared").isNull());
        assertTrue(net.get("finalLoss").isNull());
        assertTrue(net.get("lossPerEpoch").get(1).isNull());
        assertEquals(1, net.get("lossPerEpoch").get(0).asDouble(), 0);
        assertEquals("", n.get("caution").asText());
        String csv = Files.readString(other.resolve(ReportWriter.METRICS_CSV));
        assertTrue(csv.contains("unconstrained,testError,temperature,rSquared,,NaN\n"), csv);
        assertTrue(csv.contains("unconstrained,training,,finalLoss,,Infinity\n"), csv);
        String text = Files.readString(other.resolve(ReportWriter.TABLE));
        assertTrue(text.lines().anyMatch(l -> l.strip().matches("R² +n/a")), text);
        assertTrue(text.lines().anyMatch(l -> l.strip().matches("final loss +inf")), text);
        assertTrue(!text.contains("Caution"), text);
    }

    @Test
    void subsampleKeepsDistinctRowsInOrder() {
        int[] all = ParityPlot.subsample(20, 1500);
        assertEquals(20, all.length);
        int[] some = ParityPlot.subsample(5000, 1500);
        assertEquals(1500, some.length);
        for (int i = 1; i < some.length; i++) {
            assertTrue(some[i] > some[i - 1] && some[i] < 5000);
        }
        // the same rows every time, so figures are reproducible
        assertEquals(java.util.Arrays.toString(some), java.util.Arrays.toString(ParityPlot.subsample(5000, 1500)));
    }
}
