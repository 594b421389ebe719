package dev.lawful.cli;

import java.io.PrintWriter;
import java.util.ArrayList;
import java.util.List;

/**
 * The readable form of a {@link LawSummary}: a header line, then one table per kind of declaration, all sharing
 * one column grid so names, lengths and units line up down the whole report.
 *
 * <pre>
 * laws/x.law: valid (2 laws, 4 scalar equations, 5 output elements)
 *
 * inputs        length  unit
 *   m                3  kg/s
 * ...
 * laws          length  unit  outputs
 *   balance          3  kW    T[0], T[1], T[2]
 * limits        length  unit  outputs      (only when the file has limits)
 *   cold             3  K     T[0], T[1], T[2]
 *
 * completed     T[0], T[1], T[2]  (3 of 5 output elements)
 * free          a, b
 * tier          constant-affine, condition number 1.73 (equilibrated)
 * </pre>
 *
 * Lengths are right-aligned; a scalar has length 1; a pure number's unit shows as {@code 1}. A list of output
 * elements longer than the line wraps under its own column.
 */
final class TextReport {
    /** Lines are wrapped to about this many characters. */
    static final int WIDTH = 100;
    private static final String GAP = "  ";
    private static final String INDENT = "  ";

    private final LawSummary s;
    private final int nameWidth;
    private final int lengthWidth;
    private final int unitWidth;

    private TextReport(LawSummary s) {
        this.s = s;
        int name = width("definitions");
        int length = width("length");
        int unit = width("unit");
        List<LawSummary.Item> items = new ArrayList<>(s.inputs());
        items.addAll(s.outputs());
        items.addAll(s.constants());
        for (LawSummary.Item i : items) {
            name = Math.max(name, INDENT.length() + width(i.name()));
            length = Math.max(length, Integer.toString(i.length()).length());
            unit = Math.max(unit, width(i.unit().display()));
        }
        for (LawSummary.Definition d : s.definitions()) {
            name = Math.max(name, INDENT.length() + width(d.name()));
            length = Math.max(length, Integer.toString(d.length()).length());
        }
        for (LawSummary.Law l : s.laws()) {
            name = Math.max(name, INDENT.length() + width(l.name()));
            length = Math.max(length, Integer.toString(l.length()).length());
            unit = Math.max(unit, width(l.unit().display()));
        }
        for (LawSummary.Limit l : s.limits()) {
            name = Math.max(name, INDENT.length() + width(l.name()));
            length = Math.max(length, Integer.toString(l.length()).length());
            unit = Math.max(unit, width(l.unit().display()));
        }
        this.nameWidth = name;
        this.lengthWidth = length;
        this.unitWidth = unit;
    }

    /**
     * Prints the report.
     *
     * @param summary what to report
     * @param out     receives the lines
     */
    static void print(LawSummary summary, PrintWriter out) {
        new TextReport(summary).print(out);
    }

    private void print(PrintWriter out) {
        String header = s.file() + ": valid (" + count(s.laws().size(), "law") + ", "
                + count(s.equations(), "scalar equation") + ", "
                + (s.limits().isEmpty() ? "" : count(s.scalarLimits(), "scalar limit") + ", ")
                + count(s.outputWidth(), "output element")
                + (s.warnings().isEmpty() ? "" : ", " + count(s.warnings().size(), "warning")) + ")";
        out.println(header);
        items(out, "inputs", s.inputs());
        items(out, "outputs", s.outputs());
        items(out, "constants", s.constants());

        out.println();
        if (s.definitions().isEmpty()) {
            out.println(pad("definitions", nameWidth) + GAP + "none");
        } else {
            out.println(row("definitions", "length", "expression"));
            for (LawSummary.Definition d : s.definitions()) {
                out.println(row(INDENT + d.name(), Integer.toString(d.length()), d.expression()).stripTrailing());
            }
        }

        out.println();
        if (s.laws().isEmpty()) {
            out.println(pad("laws", nameWidth) + GAP + "none");
        } else {
            // the outputs column starts after the widest unit, so every law's list begins in one column
            out.println(row("laws", "length", pad("unit", unitWidth) + GAP + "outputs"));
            for (LawSummary.Law l : s.laws()) {
                String prefix = row(INDENT + l.name(), Integer.toString(l.length()), pad(l.unit().display(), unitWidth))
                        + GAP;
                wrap(out, prefix, l.outputs().isEmpty() ? List.of("none") : l.outputs(), "");
            }
        }

        limits(out);

        out.println();
        String completed = pad("completed", nameWidth) + GAP;
        if (s.tier() == null) {
            out.println(completed + "none: the file has no laws");
            return;
        }
        wrap(out, completed, s.completed(), GAP + "(" + s.completed().size() + " of "
                + count(s.outputWidth(), "output element")
                + (s.hasCompletion() ? "" : ", chosen automatically: the file has no complete statement") + ")");
        String free = pad("free", nameWidth) + GAP;
        if (s.free().isEmpty()) {
            out.println(free + "none");
        } else {
            wrap(out, free, s.free(), "");
        }
        out.println(pad("tier", nameWidth) + GAP + s.tier() + ", condition number "
                + LawSummary.threeDigits(s.condition()) + " (equilibrated)");
    }

    /** A file without limits shows no limits section, so reports of law-only files stay as they were. */
    private void limits(PrintWriter out) {
        if (s.limits().isEmpty()) {
            return;
        }
        out.println();
        out.println(row("limits", "length", pad("unit", unitWidth) + GAP + "outputs"));
        for (LawSummary.Limit l : s.limits()) {
            String prefix = row(INDENT + l.name(), Integer.toString(l.length()), pad(l.unit().display(), unitWidth))
                    + GAP;
            wrap(out, prefix, l.outputs(), "");
        }
    }

    private void items(PrintWriter out, String title, List<LawSummary.Item> items) {
        out.println();
        if (items.isEmpty()) {
            out.println(pad(title, nameWidth) + GAP + "none");
            return;
        }
        out.println(row(title, "length", "unit"));
        for (LawSummary.Item i : items) {
            out.println(row(INDENT + i.name(), Integer.toString(i.length()), i.unit().display()).stripTrailing());
        }
    }

    /**
     * One line of the grid: name left-aligned, length right-aligned, then the rest as it is (trailing spaces kept,
     * so the line can serve as the prefix of a further column).
     */
    private String row(String name, String length, String rest) {
        return pad(name, nameWidth) + GAP + " ".repeat(lengthWidth - width(length)) + length + GAP + rest;
    }

    /**
     * Prints {@code prefix} followed by the comma-separated {@code elements} and {@code suffix}, continuing on
     * further lines indented to the width of the prefix when they do not fit in {@link #WIDTH}.
     */
    private static void wrap(PrintWriter out, String prefix, List<String> elements, String suffix) {
        String indent = " ".repeat(width(prefix));
        StringBuilder line = new StringBuilder(prefix);
        int start = line.length();
        for (int i = 0; i < elements.size(); i++) {
            String piece = elements.get(i) + (i + 1 < elements.size() ? "," : "");
            if (line.length() > start && width(line.toString()) + 1 + width(piece) > WIDTH) {
                out.println(line.toString().stripTrailing());
                line.setLength(0);
                line.append(indent);
                start = line.length();
            } else if (line.length() > start) {
                line.append(' ');
            }
            line.append(piece);
        }
        out.println((line + suffix).stripTrailing());
    }

    private static String pad(String s, int width) {
        return s + " ".repeat(Math.max(0, width - width(s)));
    }

    /** @return the number of characters a terminal shows for {@code s} (code points; no wide characters here) */
    private static int width(String s) {
        return s.codePointCount(0, s.length());
    }

    private static String count(int n, String noun) {
        return n + " " + noun + (n == 1 ? "" : "s");
    }
}
