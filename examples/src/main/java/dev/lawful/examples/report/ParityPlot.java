package dev.lawful.examples.report;

import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.awt.Shape;
import java.awt.geom.Ellipse2D;
import java.awt.geom.Path2D;
import java.awt.geom.Rectangle2D;
import java.awt.image.BufferedImage;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.axis.NumberAxis;
import org.jfree.chart.plot.DatasetRenderingOrder;
import org.jfree.chart.plot.SeriesRenderingOrder;
import org.jfree.chart.plot.XYPlot;
import org.jfree.chart.renderer.xy.XYLineAndShapeRenderer;
import org.jfree.chart.title.TextTitle;
import org.jfree.chart.ui.RectangleEdge;
import org.jfree.data.xy.XYSeries;
import org.jfree.data.xy.XYSeriesCollection;

/**
 * The figure {@code predicted-vs-true.png}: one panel per completed output, the predicted value against the true
 * value of every network on the same test rows, with the line y = x; the legend gives each network's RMSE on that
 * output over all test rows (in the output's unit, as the axes). When there are more than
 * {@value #MAX_POINTS} test rows, the same {@value #MAX_POINTS} rows, drawn at random with a fixed seed, are shown
 * for every network and the panel says so.
 */
final class ParityPlot {
    /** Most test rows drawn per panel. */
    static final int MAX_POINTS = 1000;
    /** Seed of the row subsample, fixed so the figure is the same on every run. */
    private static final long SEED = 0x5EED;

    private ParityPlot() {
    }

    /**
     * @param rows  the number of test rows
     * @param limit the most rows to keep
     * @return all rows when {@code rows <= limit}, else {@code limit} distinct rows drawn uniformly with the fixed
     *         seed; ascending
     */
    static int[] subsample(int rows, int limit) {
        int[] all = new int[rows];
        for (int i = 0; i < rows; i++) {
            all[i] = i;
        }
        if (rows <= limit) {
            return all;
        }
        SplittableRandom random = new SplittableRandom(SEED);
        for (int i = 0; i < limit; i++) {
            int j = i + random.nextInt(rows - i);
            int t = all[i];
            all[i] = all[j];
            all[j] = t;
        }
        int[] chosen = Arrays.copyOf(all, limit);
        Arrays.sort(chosen);
        return chosen;
    }

    /**
     * @param result the scenario
     * @return the figure, {@value Charts#WIDTH} px wide and {@code Charts.height(completed outputs)} high
     */
    static BufferedImage draw(ScenarioResult result) {
        Charts.ensureHeadless();
        int[] shown = subsample(result.rows(), MAX_POINTS);
        double[] truth = result.truth();
        List<double[]> predicted = new ArrayList<>();
        for (NetworkRun r : result.runs()) {
            predicted.add(r.predicted());
        }
        List<JFreeChart> panels = new ArrayList<>();
        for (int c : result.completedOutputs()) {
            panels.add(panel(result, c, shown, truth, predicted));
        }
        return Charts.grid(result.title() + ": predicted vs true, outputs computed by the law layer", panels);
    }

    private static JFreeChart panel(ScenarioResult result, int column, int[] shown, double[] truth,
                                    List<double[]> predicted) {
        int p = result.outputCount();
        XYSeriesCollection points = new XYSeriesCollection();
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < predicted.size(); i++) {
            double[] y = predicted.get(i);
            double rmse = Metrics.rmse(y, truth, p, column, 1);
            XYSeries s = new XYSeries(result.runs().get(i).label() + ", RMSE " + Figures.of(rmse), false, true);
            for (int r : shown) {
                double t = truth[r * p + column];
                double v = y[r * p + column];
                s.add(t, v, false);
                lo = Math.min(lo, Math.min(t, v));
                hi = Math.max(hi, Math.max(t, v));
            }
            points.addSeries(s);
        }
        double pad = hi > lo ? 0.04 * (hi - lo) : Math.max(1e-12, Math.abs(hi) * 0.05 + 1e-300);
        lo -= pad;
        hi += pad;
        XYSeriesCollection diagonal = new XYSeriesCollection();
        XYSeries d = new XYSeries("y = x");
        d.add(lo, lo);
        d.add(hi, hi);
        diagonal.addSeries(d);

        String name = result.outputNames().get(column);
        String unit = ComparisonTable.unit(result.unitOf(column));
        NumberAxis x = new NumberAxis("true " + name + " (" + unit + ")");
        NumberAxis y = new NumberAxis("predicted " + name + " (" + unit + ")");
        x.setAutoRangeIncludesZero(false);
        y.setAutoRangeIncludesZero(false);
        x.setRange(lo, hi);
        y.setRange(lo, hi);
        XYLineAndShapeRenderer dots = new XYLineAndShapeRenderer(false, true);
        for (int i = 0; i < predicted.size(); i++) {
            dots.setSeriesPaint(i, Charts.translucent(Charts.colour(i), 110));
            dots.setSeriesShape(i, shape(i));
        }
        XYLineAndShapeRenderer line = new XYLineAndShapeRenderer(true, false);
        line.setSeriesPaint(0, new Color(0x333333));
        line.setSeriesStroke(0, new BasicStroke(1.5f, BasicStroke.CAP_BUTT, BasicStroke.JOIN_MITER, 10f,
                new float[] {6f, 4f}, 0f));
        XYPlot plot = new XYPlot(points, x, y, dots);
        plot.setDataset(1, diagonal);
        plot.setRenderer(1, line);
        // the runs in order, the last on top, and y = x over all of them
        plot.setSeriesRenderingOrder(SeriesRenderingOrder.FORWARD);
        plot.setDatasetRenderingOrder(DatasetRenderingOrder.FORWARD);

        JFreeChart chart = new JFreeChart(name + " (completed output)", JFreeChart.DEFAULT_TITLE_FONT, plot, true);
        chart.getLegend().setPosition(RectangleEdge.BOTTOM);
        if (shown.length < result.rows()) {
            TextTitle note = new TextTitle(shown.length + " of " + result.rows() + " test rows shown, drawn at random",
                    new Font(Font.SANS_SERIF, Font.ITALIC, 12));
            chart.addSubtitle(note);
        }
        Charts.style(chart);
        return chart;
    }

    /** @return a distinct marker per network: circle, square, triangle, diamond, then repeating */
    private static Shape shape(int index) {
        double s = 5;
        switch (index % 4) {
            case 0:
                return new Ellipse2D.Double(-s / 2, -s / 2, s, s);
            case 1:
                return new Rectangle2D.Double(-s / 2, -s / 2, s, s);
            case 2: {
                Path2D.Double t = new Path2D.Double();
                t.moveTo(0, -s / 2 - 1);
                t.lineTo(s / 2 + 1, s / 2);
                t.lineTo(-s / 2 - 1, s / 2);
                t.closePath();
                return t;
            }
            default: {
                Path2D.Double q = new Path2D.Double();
                q.moveTo(0, -s / 2 - 1);
                q.lineTo(s / 2 + 1, 0);
                q.lineTo(0, s / 2 + 1);
                q.lineTo(-s / 2 - 1, 0);
                q.closePath();
                return q;
            }
        }
    }
}
