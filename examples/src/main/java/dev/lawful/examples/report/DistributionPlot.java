package dev.lawful.examples.report;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.image.BufferedImage;
import java.util.List;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.axis.NumberAxis;
import org.jfree.chart.plot.ValueMarker;
import org.jfree.chart.plot.XYPlot;
import org.jfree.chart.renderer.xy.XYStepRenderer;
import org.jfree.chart.ui.RectangleEdge;
import org.jfree.data.xy.XYSeries;
import org.jfree.data.xy.XYSeriesCollection;

/**
 * The figure {@code distribution-NAME.png}: how the values of one output are distributed over the test rows, the
 * truth and every network, as counts in {@value #BINS} equal bins between the smallest and the largest value seen,
 * with the limit drawn as a vertical line. It shows at a glance which networks leave the physical range (negative
 * rain, negative flows) and how the exact network's values pile up on the limit where the truth does.
 */
public final class DistributionPlot {
    /** Number of bins. */
    static final int BINS = 60;

    private DistributionPlot() {
    }

    /**
     * @param result the scenario
     * @param column the output to show
     * @param limit  the value of its limit, drawn as a vertical line
     * @return the figure, {@value Charts#WIDTH} px wide and one panel high
     */
    public static BufferedImage draw(ScenarioResult result, int column, double limit) {
        Charts.ensureHeadless();
        int p = result.outputCount();
        int rows = result.rows();
        double[] truth = result.truth();
        List<NetworkRun> runs = result.runs();
        double lo = limit;
        double hi = limit;
        for (int s = 0; s < rows; s++) {
            lo = Math.min(lo, truth[s * p + column]);
            hi = Math.max(hi, truth[s * p + column]);
            for (NetworkRun r : runs) {
                double v = r.predicted()[s * p + column];
                lo = Math.min(lo, v);
                hi = Math.max(hi, v);
            }
        }
        double width = hi > lo ? (hi - lo) / BINS : 1;
        XYSeriesCollection counts = new XYSeriesCollection();
        counts.addSeries(histogram("truth", truth, p, column, rows, lo, width));
        for (NetworkRun r : runs) {
            counts.addSeries(histogram(r.label(), r.predicted(), p, column, rows, lo, width));
        }
        String name = result.outputNames().get(column);
        String unit = ComparisonTable.unit(result.unitOf(column));
        NumberAxis x = new NumberAxis(name + " (" + unit + ")");
        x.setAutoRangeIncludesZero(false);
        NumberAxis y = new NumberAxis("test rows per bin (log scale: counts + 1)");
        XYStepRenderer steps = new XYStepRenderer();
        steps.setSeriesPaint(0, Color.BLACK);
        steps.setSeriesStroke(0, new BasicStroke(2.5f));
        for (int i = 0; i < runs.size(); i++) {
            steps.setSeriesPaint(i + 1, Charts.colour(i));
            steps.setSeriesStroke(i + 1, new BasicStroke(1.8f));
        }
        org.jfree.chart.axis.LogAxis log = new org.jfree.chart.axis.LogAxis(y.getLabel());
        log.setSmallestValue(1);
        // whole powers of ten only: 1, 10, 100, 1000 rows
        log.setTickUnit(new org.jfree.chart.axis.NumberTickUnit(1));
        XYPlot plot = new XYPlot(counts, x, log, steps);
        ValueMarker marker = new ValueMarker(limit, new Color(0x333333), new BasicStroke(1.5f, BasicStroke.CAP_BUTT,
                BasicStroke.JOIN_MITER, 10f, new float[] {6f, 4f}, 0f));
        plot.addDomainMarker(marker);
        JFreeChart chart = new JFreeChart(name + ": distribution over " + rows + " test rows, limit at "
                + Figures.of(limit), JFreeChart.DEFAULT_TITLE_FONT, plot, true);
        chart.getLegend().setPosition(RectangleEdge.BOTTOM);
        Charts.style(chart);
        return Charts.grid(result.title() + ": " + name + " of each network against the truth", List.of(chart));
    }

    /**
     * Draws the figure into {@code dir/distribution-NAME.png}, NAME the output's name with brackets as dashes.
     *
     * @return the file written
     * @throws java.io.IOException when it cannot be written
     */
    public static java.nio.file.Path write(ScenarioResult result, int column, double limit, java.nio.file.Path dir)
            throws java.io.IOException {
        String name = result.outputNames().get(column).replace('[', '-').replace("]", "");
        java.nio.file.Path file = dir.resolve("distribution-" + name + ".png");
        Charts.writePng(draw(result, column, limit), file);
        return file;
    }

    /** @return the step series of bin counts + 1 (so an empty bin shows on the log axis), one point per bin edge */
    static XYSeries histogram(String label, double[] values, int p, int column, int rows, double lo,
            double width) {
        int[] count = new int[BINS];
        for (int s = 0; s < rows; s++) {
            int b = (int) Math.floor((values[s * p + column] - lo) / width);
            count[Math.max(0, Math.min(BINS - 1, b))]++;
        }
        XYSeries series = new XYSeries(label, false, true);
        for (int b = 0; b < BINS; b++) {
            series.add(lo + b * width, count[b] + 1);
        }
        series.add(lo + BINS * width, count[BINS - 1] + 1);
        return series;
    }
}
