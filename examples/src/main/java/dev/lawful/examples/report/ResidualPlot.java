package dev.lawful.examples.report;

import dev.lawful.examples.TruthModel.LawMark;
import java.awt.BasicStroke;
import java.awt.Color;
import java.awt.Font;
import java.awt.image.BufferedImage;
import java.text.FieldPosition;
import java.text.NumberFormat;
import java.text.ParsePosition;
import java.util.ArrayList;
import java.util.List;
import org.jfree.chart.JFreeChart;
import org.jfree.chart.axis.NumberAxis;
import org.jfree.chart.axis.NumberTickUnit;
import org.jfree.chart.plot.PlotOrientation;
import org.jfree.chart.plot.ValueMarker;
import org.jfree.chart.plot.XYPlot;
import org.jfree.chart.renderer.xy.StandardXYBarPainter;
import org.jfree.chart.renderer.xy.XYBarRenderer;
import org.jfree.chart.title.LegendTitle;
import org.jfree.chart.ui.RectangleAnchor;
import org.jfree.chart.ui.RectangleEdge;
import org.jfree.chart.ui.TextAnchor;
import org.jfree.data.xy.XYIntervalSeries;
import org.jfree.data.xy.XYIntervalSeriesCollection;

/**
 * The headline figure {@code residuals.png}: for each law one panel with the histogram of |lhs − rhs| over the test
 * rows for every network, on a log10 axis in the law's SI unit, and the law's mark as a dashed line with its label.
 *
 * <p>Bars are the share of test rows (in %) whose |r| falls in a bin of 1/4, 1/2 or 1 decade (finer when the
 * residuals span fewer decades, see {@link Bins}). Residuals that are exactly zero have no place on a log axis: they
 * get a bar of their own left of the axis, at the tick labelled {@code = 0}, beyond a dashed separator, and the
 * legend gives their count ("exact, 1874 of 2000 rows = 0"). No residual is left out.
 */
final class ResidualPlot {
    private ResidualPlot() {
    }

    /**
     * The bins of one panel, in log10 units of the law's SI unit.
     *
     * @param lo        the left edge of the first bin, a multiple of {@code tickStep}
     * @param hi        the right edge of the last bin
     * @param perDecade bins per decade: 4, 2 or 1
     * @param tickStep  decades between labelled ticks
     */
    record Bins(int lo, int hi, int perDecade, int tickStep) {
        /** @return how many bins of nonzero values */
        int count() {
            return (hi - lo) * perDecade;
        }

        /** @return the position of the zero bar on the axis */
        double zeroPosition() {
            return lo - tickStep;
        }

        /**
         * @param magnitude a positive |r|
         * @return its bin, 0 .. count − 1; bins are closed below, the last one closed on both sides
         */
        int of(double magnitude) {
            int b = (int) Math.floor((Math.log10(magnitude) - lo) * perDecade);
            return Math.max(0, Math.min(count() - 1, b));
        }

        /**
         * Chooses bins that hold every nonzero magnitude and the mark.
         *
         * @param magnitudes |r| of each run (zeros allowed; they are not binned)
         * @param mark       the law's mark, &gt; 0
         * @return the bins
         */
        static Bins cover(List<double[]> magnitudes, double mark) {
            double min = Math.log10(mark);
            double max = min;
            boolean any = false;
            for (double[] a : magnitudes) {
                for (double v : a) {
                    if (v > 0) {
                        double l = Math.log10(v);
                        min = Math.min(min, l);
                        max = Math.max(max, l);
                        any = true;
                    }
                }
            }
            int lo = (int) Math.floor(min);
            int hi = (int) Math.ceil(max);
            if (!any) {
                // only zeros: show a few decades around the mark so the mark and the zero bar still read
                lo -= 3;
                hi += 1;
            }
            if (hi <= lo) {
                hi = lo + 1;
            }
            int span = hi - lo;
            int step = span <= 10 ? 1 : span <= 20 ? 2 : span <= 50 ? 5 : 10;
            lo = Math.floorDiv(lo, step) * step;
            hi = -Math.floorDiv(-hi, step) * step;
            span = hi - lo;
            int perDecade = span <= 8 ? 4 : span <= 16 ? 2 : 1;
            return new Bins(lo, hi, perDecade, step);
        }
    }

    /**
     * @param result  the scenario
     * @param metrics its runs' metrics (for the zero counts), in run order
     * @return the figure, {@value Charts#WIDTH} px wide and {@code Charts.height(laws)} high
     */
    static BufferedImage draw(ScenarioResult result, List<RunMetrics> metrics) {
        Charts.ensureHeadless();
        List<JFreeChart> panels = new ArrayList<>();
        for (int j = 0; j < result.lawCount(); j++) {
            panels.add(panel(result, metrics, j));
        }
        return Charts.grid(result.title() + ": |residual| of each law on the " + result.rows() + " test rows",
                panels);
    }

    /** @return the |residual| of law {@code law} for each run, in run order */
    private static List<double[]> magnitudes(ScenarioResult result, int law) {
        List<double[]> magnitudes = new ArrayList<>();
        for (NetworkRun run : result.runs()) {
            magnitudes.add(Metrics.magnitudes(run.residuals(), result.lawCount(), law));
        }
        return magnitudes;
    }

    /** @return the bins of law {@code law}'s panel */
    static Bins binsOf(ScenarioResult result, int law) {
        return Bins.cover(magnitudes(result, law), result.marks().get(law).value());
    }

    /**
     * @param result  the scenario
     * @param metrics its runs' metrics, in run order
     * @param law     the law's index
     * @return the law's panel: dataset 0 holds one series per run, keyed by its label (and its count of zeros)
     */
    static JFreeChart panel(ScenarioResult result, List<RunMetrics> metrics, int law) {
        List<double[]> magnitudes = magnitudes(result, law);
        LawMark mark = result.marks().get(law);
        Bins bins = Bins.cover(magnitudes, mark.value());
        double width = 1.0 / bins.perDecade();
        XYIntervalSeriesCollection data = new XYIntervalSeriesCollection();
        for (int i = 0; i < magnitudes.size(); i++) {
            double[] a = magnitudes.get(i);
            int zeros = metrics.get(i).laws().get(law).zeros();
            String key = result.runs().get(i).label()
                    + (zeros > 0 ? ", " + zeros + " of " + a.length + " rows = 0" : "");
            XYIntervalSeries s = new XYIntervalSeries(key);
            int[] counts = new int[bins.count()];
            for (double v : a) {
                if (v > 0) {
                    counts[bins.of(v)]++;
                }
            }
            double scale = 100.0 / a.length;
            if (zeros > 0) {
                double z = bins.zeroPosition();
                double half = 0.3 * bins.tickStep();
                s.add(z, z - half, z + half, zeros * scale, 0, zeros * scale);
            }
            for (int b = 0; b < counts.length; b++) {
                if (counts[b] > 0) {
                    double left = bins.lo() + b * width;
                    s.add(left + width / 2, left, left + width, counts[b] * scale, 0, counts[b] * scale);
                }
            }
            data.addSeries(s);
        }
        String unit = ComparisonTable.unit(result.lawUnits().get(law));
        NumberAxis x = new NumberAxis("|lhs \u2212 rhs| (" + unit + "), log scale");
        // room right of the last decade so its tick label is not cut
        x.setRange(bins.zeroPosition() - 0.5 * bins.tickStep(), bins.hi() + 0.4 * bins.tickStep());
        x.setTickUnit(new NumberTickUnit(bins.tickStep(), new DecadeFormat(bins)));
        NumberAxis y = new NumberAxis("share of test rows (%)");
        y.setUpperMargin(0.12);
        XYBarRenderer bars = new XYBarRenderer();
        bars.setBarPainter(new StandardXYBarPainter());
        bars.setShadowVisible(false);
        bars.setDrawBarOutline(true);
        bars.setUseYInterval(false);
        for (int i = 0; i < magnitudes.size(); i++) {
            Color c = Charts.colour(i);
            bars.setSeriesPaint(i, Charts.translucent(c, 140));
            bars.setSeriesOutlinePaint(i, c.darker());
            bars.setSeriesOutlineStroke(i, new BasicStroke(1f));
        }
        XYPlot plot = new XYPlot(data, x, y, bars);
        plot.setOrientation(PlotOrientation.VERTICAL);

        ValueMarker separator = new ValueMarker(bins.zeroPosition() + 0.5 * bins.tickStep());
        separator.setPaint(new Color(0x888888));
        separator.setStroke(new BasicStroke(1f, BasicStroke.CAP_BUTT, BasicStroke.JOIN_MITER, 10f,
                new float[] {3f, 3f}, 0f));
        plot.addDomainMarker(separator);

        double at = Math.log10(mark.value());
        ValueMarker line = new ValueMarker(at);
        line.setPaint(Color.BLACK);
        line.setStroke(new BasicStroke(2f, BasicStroke.CAP_BUTT, BasicStroke.JOIN_MITER, 10f,
                new float[] {8f, 4f}, 0f));
        // the line carries a short label; the mark's description goes under the panel title, where a long one fits
        line.setLabel("mark");
        line.setLabelFont(new Font(Font.SANS_SERIF, Font.ITALIC, 12));
        line.setLabelPaint(Color.BLACK);
        line.setLabelBackgroundColor(new Color(255, 255, 255, 210));
        boolean rightHalf = (at - x.getLowerBound()) > 0.6 * (x.getUpperBound() - x.getLowerBound());
        line.setLabelAnchor(rightHalf ? RectangleAnchor.TOP_LEFT : RectangleAnchor.TOP_RIGHT);
        line.setLabelTextAnchor(rightHalf ? TextAnchor.TOP_RIGHT : TextAnchor.TOP_LEFT);
        plot.addDomainMarker(line);

        JFreeChart chart = new JFreeChart(result.lawNames().get(law) + " (" + unit + ")", JFreeChart.DEFAULT_TITLE_FONT,
                plot, true);
        String described = mark.label().isBlank() ? Figures.of(mark.value()) + " " + unit : mark.label();
        chart.addSubtitle(new org.jfree.chart.title.TextTitle("dashed line, mark: " + described,
                new Font(Font.SANS_SERIF, Font.ITALIC, 12)));
        LegendTitle legend = chart.getLegend();
        legend.setPosition(RectangleEdge.BOTTOM);
        Charts.style(chart);
        return chart;
    }

    /**
     * Tick labels of the log axis: a power of ten as {@code 10⁻¹⁵}, the zero bar's position as {@code = 0}, nothing
     * elsewhere left of the separator.
     */
    private static final class DecadeFormat extends NumberFormat {
        private static final long serialVersionUID = 1L;
        private static final String SUPERSCRIPT = "\u2070\u00B9\u00B2\u00B3\u2074\u2075\u2076\u2077\u2078\u2079";
        private final double zero;
        private final double firstDecade;

        DecadeFormat(Bins bins) {
            this.zero = bins.zeroPosition();
            this.firstDecade = bins.lo();
        }

        @Override
        public StringBuffer format(double number, StringBuffer to, FieldPosition pos) {
            if (Math.abs(number - zero) < 1e-9) {
                return to.append("= 0");
            }
            if (number < firstDecade - 1e-9) {
                return to;
            }
            return to.append(power((int) Math.round(number)));
        }

        @Override
        public StringBuffer format(long number, StringBuffer to, FieldPosition pos) {
            return format((double) number, to, pos);
        }

        @Override
        public Number parse(String source, ParsePosition pos) {
            return null;
        }

        /** @return 10 with the exponent in superscript digits */
        static String power(int exponent) {
            StringBuilder sb = new StringBuilder("10");
            if (exponent < 0) {
                sb.append('\u207B');
            }
            for (char c : Integer.toString(Math.abs(exponent)).toCharArray()) {
                sb.append(SUPERSCRIPT.charAt(c - '0'));
            }
            return sb.toString();
        }
    }
}
