package dev.lawful.examples.report;

import dev.lawful.examples.TruthModel.LawMark;
import java.util.ArrayList;
import java.util.List;

/**
 * The plain-text comparison table: one column per network, one row per metric, numbers right-aligned, followed by
 * the laws' marks, the definitions of the statistics and the scenario's caution.
 *
 * <pre>
 * Steam reformer outlet (reformer): 3 networks on 2000 test rows
 *
 *                           unit   unconstrained    penalty      exact
 * test error
 *   outlet flows    RMSE    mol/s          0.135      0.101     0.0819
 *                   R²                    0.9983    0.99903    0.99936
 * law residuals |lhs - rhs| over the test rows
 *   carbon          max     mol/s         0.0706    0.00421   1.96e-15
 *                   mean    mol/s        0.00525   0.000340   1.03e-16
 *                   p99     mol/s         0.0424    0.00283   1.07e-15
 *                   = 0     rows               0          0        800
 *                   &gt; mark  rows            1998       1986          0
 * training
 *   time per epoch          s              0.800      0.900       1.00
 *   epochs                                    40         40         40
 *   final loss                            0.0202     0.0202     0.0202
 * </pre>
 *
 * Numbers are written by {@link Figures}: three significant digits, R² with enough decimals to tell it from 1.
 */
final class ComparisonTable {
    /** Text lines are wrapped to about this many characters. */
    static final int WIDTH = 100;
    private static final String INDENT = "  ";
    private static final String GAP = "  ";
    private static final String VALUE_GAP = "   ";

    /** A line of the table: a section title ({@code cells} null) or a row of cells. */
    private record Line(String section, String[] cells) {
    }

    private final ScenarioResult result;
    private final List<RunMetrics> metrics;
    private final List<Line> lines = new ArrayList<>();

    private ComparisonTable(ScenarioResult result, List<RunMetrics> metrics) {
        this.result = result;
        this.metrics = metrics;
    }

    /**
     * @param result  the scenario
     * @param metrics its runs' metrics, in run order
     * @return the table text, lines ended by {@code \n}
     */
    static String render(ScenarioResult result, List<RunMetrics> metrics) {
        return new ComparisonTable(result, metrics).build();
    }

    private String build() {
        int k = metrics.size();
        String[] header = new String[3 + k];
        header[0] = "";
        header[1] = "";
        header[2] = "unit";
        for (int i = 0; i < k; i++) {
            header[3 + i] = metrics.get(i).label();
        }
        lines.add(new Line(null, header));
        lines.add(new Line("test error", null));
        for (int g = 0; g < result.groups().size(); g++) {
            GroupError first = metrics.get(0).groups().get(g);
            int gi = g;
            row(INDENT + first.group(), "RMSE", unit(first.unit()), m -> Figures.of(m.groups().get(gi).rmse()));
            row("", "R²", "", m -> Figures.rSquared(m.groups().get(gi).rSquared()));
        }
        lines.add(new Line("law residuals |lhs - rhs| over the test rows", null));
        for (int j = 0; j < result.lawCount(); j++) {
            int lj = j;
            String u = unit(result.lawUnits().get(j));
            row(INDENT + result.lawNames().get(j), "max", u, m -> Figures.of(m.laws().get(lj).max()));
            row("", "mean", u, m -> Figures.of(m.laws().get(lj).mean()));
            row("", "p99", u, m -> Figures.of(m.laws().get(lj).p99()));
            row("", "= 0", "rows", m -> Integer.toString(m.laws().get(lj).zeros()));
            row("", "> mark", "rows", m -> Integer.toString(m.laws().get(lj).aboveMark()));
        }
        lines.add(new Line("training", null));
        row(INDENT + "time per epoch", "", "s", m -> Figures.of(m.secondsPerEpoch()));
        row(INDENT + "epochs", "", "", m -> Integer.toString(m.epochs()));
        row(INDENT + "final loss", "", "", m -> m.epochs() == 0 ? "-" : Figures.of(m.finalLoss()));

        StringBuilder sb = new StringBuilder();
        sb.append(result.title()).append(" (").append(result.scenario()).append("): ").append(k)
                .append(k == 1 ? " network" : " networks").append(" on ").append(result.rows())
                .append(result.rows() == 1 ? " test row" : " test rows").append("\n\n");
        grid(sb);
        sb.append("\nmarks (|r| > mark counts the test rows whose residual exceeds it):\n");
        for (int j = 0; j < result.lawCount(); j++) {
            LawMark mark = result.marks().get(j);
            wrap(sb, INDENT, mark.law() + ": " + Figures.of(mark.value()) + " " + unit(result.lawUnits().get(j))
                    + (mark.label().isEmpty() ? "" : ", " + mark.label()));
        }
        sb.append('\n');
        wrap(sb, "", "RMSE: root-mean-square error over the group's columns. R²: 1 - SSE/SST pooled over the"
                + " group's columns, SST about each column's own mean (n/a when the true values are constant)."
                + " p99: nearest-rank 99th percentile of |r|, the |r| of rank ceil(0.99 n) among the n sorted"
                + " values. = 0: residuals exactly zero. Final loss: each network's own training loss (the penalty"
                + " network's includes its law penalty), so it compares epochs of one network, not networks.");
        if (!result.caution().isBlank()) {
            sb.append('\n');
            wrap(sb, "", "Caution: " + result.caution().strip());
        }
        return sb.toString();
    }

    private interface Cell {
        String of(RunMetrics m);
    }

    private void row(String label, String metric, String unit, Cell cell) {
        String[] cells = new String[3 + metrics.size()];
        cells[0] = label;
        cells[1] = metric;
        cells[2] = unit;
        for (int i = 0; i < metrics.size(); i++) {
            cells[3 + i] = cell.of(metrics.get(i));
        }
        lines.add(new Line(null, cells));
    }

    private void grid(StringBuilder sb) {
        int columns = 3 + metrics.size();
        int[] width = new int[columns];
        for (Line l : lines) {
            if (l.cells() != null) {
                for (int c = 0; c < columns; c++) {
                    width[c] = Math.max(width[c], l.cells()[c].length());
                }
            }
        }
        // a section title may be wider than the label column: it stands on its own line
        for (Line l : lines) {
            if (l.cells() == null) {
                sb.append(l.section()).append('\n');
                continue;
            }
            StringBuilder line = new StringBuilder();
            for (int c = 0; c < 3; c++) {
                line.append(pad(l.cells()[c], width[c], false)).append(GAP);
            }
            for (int c = 3; c < columns; c++) {
                line.append(c == 3 ? "" : VALUE_GAP).append(pad(l.cells()[c], width[c], true));
            }
            sb.append(line.toString().stripTrailing()).append('\n');
        }
    }

    private static String pad(String s, int width, boolean right) {
        String fill = " ".repeat(Math.max(0, width - s.length()));
        return right ? fill + s : s + fill;
    }

    /** @return the unit as shown: {@code 1} for a pure number */
    static String unit(String unit) {
        return unit.isEmpty() ? "1" : unit;
    }

    /** Appends {@code text} as lines of at most about {@link #WIDTH} characters, each starting with {@code indent}. */
    private static void wrap(StringBuilder sb, String indent, String text) {
        StringBuilder line = new StringBuilder(indent);
        for (String word : text.split(" ")) {
            if (line.length() > indent.length() && line.length() + 1 + word.length() > WIDTH) {
                sb.append(line).append('\n');
                line = new StringBuilder(indent).append(indent.isEmpty() ? "" : "  ");
            } else if (line.length() > indent.length()) {
                line.append(' ');
            }
            line.append(word);
        }
        sb.append(line).append('\n');
    }
}
