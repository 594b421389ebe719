package dev.lawful.cli;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.ScalarLimit;
import dev.lawful.io.CsvTable;
import dev.lawful.io.JsonWriter;
import dev.lawful.io.ShortestDecimal;
import java.io.PrintWriter;
import java.util.ArrayList;
import java.util.List;

/**
 * What {@code lawful verify} reports about the limits of a law file: per scalar limit, the rows outside it (its
 * value g below 0, or NaN) and the worst one. There is no tolerance: a limit holds exactly or not, since nothing
 * about a row's rounding makes a negative g acceptable.
 *
 * @param rows the result of each scalar limit, in {@link ExpandedLaws#limit(int)} order
 */
record LimitCheck(List<Row> rows) {

    /**
     * One scalar limit.
     *
     * @param name    its name
     * @param unit    the unit {@code worst} is in (its text, empty for a pure number)
     * @param outside the rows where g &lt; 0 or g is NaN
     * @param worst   the smallest g in that unit (negative when a row is outside; NaN when a g is NaN or there
     *                are no rows)
     * @param line    the line of the file with the smallest g, or -1 without rows
     */
    record Row(String name, String unit, int outside, double worst, long line) {
    }

    /**
     * Evaluates every scalar limit on every row.
     *
     * @param expanded the law set's expansion
     * @param x        the inputs, row-major
     * @param y        the outputs, row-major
     * @param table    the table the rows came from (for line numbers)
     * @return the result per scalar limit
     */
    static LimitCheck of(ExpandedLaws expanded, double[] x, double[] y, CsvTable table) {
        int n = table.rows();
        int m = expanded.limitCount();
        LawEvaluator evaluator = expanded.limitEvaluator();
        double[] g = new double[n * m];
        evaluator.residuals(x, y, n, g, null);
        List<Row> rows = new ArrayList<>(m);
        for (int j = 0; j < m; j++) {
            ScalarLimit limit = expanded.limit(j);
            int outside = 0;
            int worst = -1;
            for (int s = 0; s < n; s++) {
                double v = g[s * m + j];
                if (!(v >= 0)) {
                    outside++;
                }
                // a NaN is the worst a row can be: it says nothing about the limit
                if (worst < 0 || Double.isNaN(v) || v < g[worst * m + j] && !Double.isNaN(g[worst * m + j])) {
                    worst = s;
                }
            }
            double value = worst < 0 ? Double.NaN : g[worst * m + j] / limit.unit().factor();
            rows.add(new Row(limit.name(), limit.unit().text(), outside, value, worst < 0 ? -1 : table.line(worst)));
        }
        return new LimitCheck(List.copyOf(rows));
    }

    /** @return whether every row is inside every limit */
    boolean allInside() {
        return rows.stream().allMatch(r -> r.outside() == 0);
    }

    /** Prints one line per scalar limit: the rows outside and the worst value, or that every row is inside. */
    void print(PrintWriter out, int rowCount) {
        out.println();
        out.println("limits (g >= 0 inside; no tolerance)");
        for (Row r : rows) {
            String unit = r.unit().isEmpty() ? "" : " " + r.unit();
            if (r.outside() == 0) {
                out.println("  " + r.name() + ": every row inside, smallest g " + number(r.worst()) + unit);
            } else {
                out.println("  " + r.name() + ": " + r.outside() + " of " + rowCount + " rows outside, worst g "
                        + number(r.worst()) + unit + " at line " + r.line());
            }
        }
    }

    /** Writes the array {@code [{limit, unit, outside, worst, line}]}; worst and line are null when unknown. */
    void writeJson(JsonWriter w) {
        w.beginArray();
        for (Row r : rows) {
            w.beginObject().name("limit").value(r.name()).name("unit").value(r.unit()).name("outside")
                    .value(r.outside()).name("worst");
            if (Double.isNaN(r.worst())) {
                w.nullValue();
            } else {
                w.value(r.worst());
            }
            w.name("line");
            if (r.line() < 0) {
                w.nullValue();
            } else {
                w.value(r.line());
            }
            w.endObject();
        }
        w.endArray();
    }

    private static String number(double v) {
        return Double.isNaN(v) ? "NaN" : ShortestDecimal.format(v);
    }
}
