package dev.lawful.enforce;

import dev.lawful.io.ShortestDecimal;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.IntFunction;

/**
 * The aligned text form of a {@link ResidualReport}:
 *
 * <pre>
 *                 |r| in the law's unit         |r| / scale
 * law       unit        max      mean       p99       max      mean       p99  over tol  non-finite
 * carbon    mol/s  2.22e-16  4.44e-17  2.22e-16  1.06e-16  2.11e-17  1.06e-16         0           0
 *
 * relative residual, samples per bin (bins empty for every law left out)
 * law          0  &lt;=1e-16  &lt;=1e-15
 * carbon       4        1        0
 *
 * 5 samples, relative tolerance 1e-9: every law within tolerance
 * </pre>
 *
 * Numbers have three significant digits ({@code 2.22e-16}); {@code 0} is exact zero, {@code -} means no finite
 * sample, {@code inf} infinity. Text columns are left-aligned, numbers right-aligned.
 */
final class ResidualTable {
    private static final String GAP = "  ";
    /** Characters of a number with three significant digits and a two-digit exponent: {@code 2.22e-16}. */
    private static final int NUMBER_WIDTH = 8;

    private ResidualTable() {
    }

    static String render(ResidualReport report, IntFunction<String> sampleName) {
        StringBuilder sb = new StringBuilder();
        List<LawResiduals> laws = report.laws();
        if (laws.isEmpty()) {
            sb.append("no laws\n\n");
        } else {
            statistics(laws, sb);
            sb.append('\n');
            histogram(laws, sb);
            sb.append('\n');
        }
        verdict(report, sampleName, sb);
        return sb.toString();
    }

    private static void statistics(List<LawResiduals> laws, StringBuilder sb) {
        List<String[]> rows = new ArrayList<>();
        rows.add(new String[] {"law", "unit", "max", "mean", "p99", "max", "mean", "p99", "over tol", "non-finite"});
        for (LawResiduals l : laws) {
            rows.add(new String[] {l.name(), l.unit().display(), number(l.absolute().max()),
                number(l.absolute().mean()), number(l.absolute().p99()), number(l.relative().max()),
                number(l.relative().mean()), number(l.relative().p99()), Integer.toString(l.overTolerance()),
                Integer.toString(l.nonFinite())});
        }
        int[] width = widths(rows);
        // every statistic gets the width of a full number (2.22e-16), so the group headings fit above their columns
        for (int c = 2; c < 8; c++) {
            width[c] = Math.max(width[c], NUMBER_WIDTH);
        }
        // the group headings start above the first column of their group
        int absoluteAt = width[0] + GAP.length() + width[1] + GAP.length();
        int relativeAt = absoluteAt + width[2] + width[3] + width[4] + 3 * GAP.length();
        StringBuilder group = new StringBuilder();
        group.append(" ".repeat(absoluteAt)).append("|r| in the law's unit");
        group.append(" ".repeat(Math.max(1, relativeAt - group.length()))).append("|r| / scale");
        sb.append(group).append('\n');
        table(rows, width, 2, sb);
    }

    private static void histogram(List<LawResiduals> laws, StringBuilder sb) {
        List<Integer> bins = new ArrayList<>();
        for (int b = 0; b < ResidualHistogram.BINS; b++) {
            for (LawResiduals l : laws) {
                if (l.histogram().get(b) != 0) {
                    bins.add(b);
                    break;
                }
            }
        }
        if (bins.isEmpty()) {
            sb.append("relative residual: no finite residuals to count\n");
            return;
        }
        sb.append("relative residual, samples per bin (bins empty for every law left out)\n");
        List<String[]> rows = new ArrayList<>();
        String[] head = new String[bins.size() + 1];
        head[0] = "law";
        for (int j = 0; j < bins.size(); j++) {
            head[j + 1] = ResidualHistogram.heading(bins.get(j));
        }
        rows.add(head);
        for (LawResiduals l : laws) {
            String[] row = new String[bins.size() + 1];
            row[0] = l.name();
            for (int j = 0; j < bins.size(); j++) {
                row[j + 1] = Integer.toString(l.histogram().get(bins.get(j)));
            }
            rows.add(row);
        }
        table(rows, widths(rows), 1, sb);
    }

    private static void verdict(ResidualReport report, IntFunction<String> sampleName, StringBuilder sb) {
        sb.append(count(report.samples(), "sample")).append(", relative tolerance ")
                .append(ShortestDecimal.format(report.tolerance())).append(": ");
        if (report.withinTolerance()) {
            sb.append(report.laws().isEmpty() ? "nothing to check" : "every law within tolerance").append('\n');
            return;
        }
        sb.append(count(report.failingSamples(), "sample")).append(" over tolerance for at least one law\n");
        for (LawResiduals l : report.exceeding()) {
            sb.append(GAP).append(l.name()).append(": ").append(count(l.overTolerance(), "sample"))
                    .append(" over tolerance; worst ").append(sampleName.apply(l.worstSample()));
            if (l.nonFinite() > 0) {
                sb.append(" (").append(l.nonFinite()).append(" NaN or infinite)");
            } else {
                sb.append(" (relative residual ").append(number(l.relative().max())).append(')');
            }
            sb.append('\n');
        }
    }

    /** Columns before {@code textColumns} are left-aligned, the others right-aligned; trailing spaces dropped. */
    private static void table(List<String[]> rows, int[] width, int textColumns, StringBuilder sb) {
        for (String[] row : rows) {
            StringBuilder line = new StringBuilder();
            for (int c = 0; c < row.length; c++) {
                if (c > 0) {
                    line.append(GAP);
                }
                String pad = " ".repeat(width[c] - length(row[c]));
                if (c < textColumns) {
                    line.append(row[c]).append(pad);
                } else {
                    line.append(pad).append(row[c]);
                }
            }
            sb.append(line.toString().stripTrailing()).append('\n');
        }
    }

    private static int[] widths(List<String[]> rows) {
        int[] width = new int[rows.get(0).length];
        for (String[] row : rows) {
            for (int c = 0; c < row.length; c++) {
                width[c] = Math.max(width[c], length(row[c]));
            }
        }
        return width;
    }

    private static int length(String s) {
        return s.codePointCount(0, s.length());
    }

    /** @return {@code v} with three significant digits, {@code 0}, {@code -} for NaN or {@code inf} */
    static String number(double v) {
        if (Double.isNaN(v)) {
            return "-";
        }
        if (Double.isInfinite(v)) {
            return v > 0 ? "inf" : "-inf";
        }
        if (v == 0) {
            return "0";
        }
        return String.format(Locale.ROOT, "%.2e", v);
    }

    private static String count(int n, String noun) {
        return n + " " + noun + (n == 1 ? "" : "s");
    }
}
