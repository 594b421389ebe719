package dev.lawful.cli;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.ScalarLimit;
import dev.lawful.io.JsonWriter;
import dev.lawful.io.ShortestDecimal;
import java.io.PrintWriter;
import java.util.Arrays;

/**
 * What {@code lawful verify} reports about the limits of a law file: per scalar limit, the rows outside it (its
 * value g below 0, or NaN) and the worst one. There is no tolerance: a limit holds exactly or not, since nothing
 * about a row's rounding makes a negative g acceptable.
 *
 * <p>Accumulated chunk by chunk, one per worker thread, and merged: the worst row is a NaN one first (the first
 * such row), else the smallest g (the first of equals), so the result does not depend on how the rows were split.
 */
final class LimitCheck {
    private final ExpandedLaws expanded;
    private final LawEvaluator evaluator;
    private final LawEvaluator.Workspace workspace;
    private final int m;
    private final long[] outside;
    private final double[] worst;
    private final long[] worstRow;
    private final long[] worstTag;
    private double[] g = new double[0];

    /** @param expanded the law set's expansion, with at least one limit */
    LimitCheck(ExpandedLaws expanded) {
        this.expanded = expanded;
        this.evaluator = expanded.limitEvaluator();
        this.workspace = evaluator.newWorkspace();
        this.m = expanded.limitCount();
        this.outside = new long[m];
        this.worst = new double[m];
        this.worstRow = new long[m];
        Arrays.fill(worstRow, -1);
        this.worstTag = new long[m];
    }

    /**
     * Evaluates every scalar limit on a chunk of rows.
     *
     * @param x        the inputs, row-major
     * @param y        the outputs, row-major
     * @param n        the rows
     * @param firstRow the index of the chunk's first row in the whole input
     * @param tags     each row's tag (its line)
     */
    void add(double[] x, double[] y, int n, long firstRow, long[] tags) {
        if (g.length < n * m) {
            g = new double[n * m];
        }
        evaluator.residuals(x, y, n, g, null, workspace);
        for (int j = 0; j < m; j++) {
            for (int s = 0; s < n; s++) {
                double v = g[s * m + j];
                if (!(v >= 0)) {
                    outside[j]++;
                }
                consider(j, v, firstRow + s, tags[s]);
            }
        }
    }

    /** Makes the row limit j's worst when it is worse: NaN first, then smaller g, then the earlier row. */
    private void consider(int j, double v, long row, long tag) {
        boolean take;
        if (worstRow[j] < 0) {
            take = true;
        } else if (Double.isNaN(v) != Double.isNaN(worst[j])) {
            take = Double.isNaN(v);
        } else if (Double.isNaN(v) || v == worst[j]) {
            take = row < worstRow[j];
        } else {
            take = v < worst[j];
        }
        if (take) {
            worst[j] = v;
            worstRow[j] = row;
            worstTag[j] = tag;
        }
    }

    /** Adds another worker's rows (of other indices) to this one. */
    void merge(LimitCheck other) {
        for (int j = 0; j < m; j++) {
            outside[j] += other.outside[j];
            if (other.worstRow[j] >= 0) {
                consider(j, other.worst[j], other.worstRow[j], other.worstTag[j]);
            }
        }
    }

    /** @return whether every row is inside every limit */
    boolean allInside() {
        return Arrays.stream(outside).allMatch(c -> c == 0);
    }

    /** @return the worst g of limit j in its unit, NaN without rows */
    private double worstValue(int j) {
        return worstRow[j] < 0 ? Double.NaN : worst[j] / expanded.limit(j).unit().factor();
    }

    /**
     * Prints one line per scalar limit: the rows outside and the worst value, or that every row is inside.
     *
     * @param out      receives the lines
     * @param rowCount the rows checked
     * @param source   names a row's place
     */
    void print(PrintWriter out, long rowCount, RowSource source) {
        out.println();
        out.println("limits (g >= 0 inside; no tolerance)");
        for (int j = 0; j < m; j++) {
            ScalarLimit limit = expanded.limit(j);
            String unit = limit.unit().text().isEmpty() ? "" : " " + limit.unit().text();
            if (outside[j] == 0) {
                out.println("  " + limit.name() + ": every row inside, smallest g " + number(worstValue(j)) + unit);
            } else {
                out.println("  " + limit.name() + ": " + outside[j] + " of " + rowCount + " rows outside, worst g "
                        + number(worstValue(j)) + unit + " at " + source.place(worstTag[j]));
            }
        }
    }

    /**
     * Writes the array {@code [{limit, unit, outside, worst, line}]}; worst and line are null when unknown.
     *
     * @param w     receives the array
     * @param place the key of a row's place: {@code line} for CSV, {@code row} otherwise
     */
    void writeJson(JsonWriter w, String place) {
        w.beginArray();
        for (int j = 0; j < m; j++) {
            ScalarLimit limit = expanded.limit(j);
            w.beginObject().name("limit").value(limit.name()).name("unit").value(limit.unit().text())
                    .name("outside").value(outside[j]).name("worst");
            double v = worstValue(j);
            if (Double.isNaN(v)) {
                w.nullValue();
            } else {
                w.value(v);
            }
            w.name(place);
            if (worstRow[j] < 0) {
                w.nullValue();
            } else {
                w.value(worstTag[j]);
            }
            w.endObject();
        }
        w.endArray();
    }

    private static String number(double v) {
        return Double.isNaN(v) ? "NaN" : ShortestDecimal.format(v);
    }
}
