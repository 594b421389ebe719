package dev.lawful.examples.report;

import dev.lawful.examples.TruthModel.ColumnGroup;
import dev.lawful.examples.TruthModel.LawMark;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * The checks of {@link ScenarioResult}'s constructor, one method per argument. Every failure is an
 * {@link IllegalArgumentException} that names the argument, says what was expected and what was found, and how
 * to fix it.
 */
final class ResultChecks {
    private ResultChecks() {
    }

    static void text(String what, String s) {
        if (s == null || s.isBlank() || s.indexOf('\n') >= 0 || s.indexOf('\r') >= 0) {
            throw new IllegalArgumentException(what + " must be one line of text that is not blank, found "
                    + (s == null ? "null" : "'" + s + "'"));
        }
    }

    static List<String> names(String what, List<String> names, List<String> reserved) {
        if (names == null || names.isEmpty()) {
            throw new IllegalArgumentException(what + " is " + (names == null ? "null" : "empty")
                    + "; give one name per " + ("lawNames".equals(what) ? "law" : "output column"));
        }
        Set<String> seen = new HashSet<>();
        for (int i = 0; i < names.size(); i++) {
            String n = names.get(i);
            text(what + "[" + i + "]", n);
            if (!seen.add(n)) {
                throw new IllegalArgumentException(what + " holds '" + n + "' twice (the second at index " + i
                        + "); every name must be distinct, because files and legends key on it");
            }
            if (reserved.contains(n)) {
                throw new IllegalArgumentException(what + "[" + i + "] is '" + n + "', a name residuals.csv uses for"
                        + " one of its own columns (" + String.join(", ", reserved) + "); rename it");
            }
        }
        return List.copyOf(names);
    }

    static List<ColumnGroup> groups(List<ColumnGroup> groups, int p) {
        if (groups == null || groups.isEmpty()) {
            throw new IllegalArgumentException("groups is " + (groups == null ? "null" : "empty") + "; give at least"
                    + " one ColumnGroup (a scenario's TruthModel.outputGroups()), test error is reported per group");
        }
        Set<String> seen = new HashSet<>();
        for (int i = 0; i < groups.size(); i++) {
            ColumnGroup g = groups.get(i);
            if (g == null) {
                throw new IllegalArgumentException("groups[" + i + "] is null");
            }
            text("groups[" + i + "].name", g.name());
            if (g.unit() == null) {
                throw new IllegalArgumentException("group '" + g.name() + "' has a null unit; use \"\" for a pure"
                        + " number");
            }
            if (g.first() < 0 || g.count() < 1 || (long) g.first() + g.count() > p) {
                throw new IllegalArgumentException("group '" + g.name() + "' covers columns " + g.first() + " .. "
                        + ((long) g.first() + g.count() - 1) + " (first " + g.first() + ", count " + g.count()
                        + "), but the outputs are columns 0 .. " + (p - 1) + "; a group needs count >= 1 and must"
                        + " lie inside the outputs");
            }
            if (!seen.add(g.name())) {
                throw new IllegalArgumentException("two groups are named '" + g.name() + "'; give each its own name");
            }
        }
        return List.copyOf(groups);
    }

    static List<String> units(List<String> units, List<String> laws) {
        if (units == null || units.size() != laws.size()) {
            throw new IllegalArgumentException("lawUnits has " + (units == null ? "no" : units.size()) + " entries,"
                    + " expected one SI unit per law (" + laws.size() + "), in the order of lawNames");
        }
        for (int i = 0; i < units.size(); i++) {
            if (units.get(i) == null) {
                throw new IllegalArgumentException("lawUnits[" + i + "] (law '" + laws.get(i) + "') is null; use"
                        + " \"\" for a pure number");
            }
        }
        return List.copyOf(units);
    }

    static List<LawMark> marks(List<LawMark> marks, List<String> laws) {
        if (marks == null || marks.size() != laws.size()) {
            throw new IllegalArgumentException("marks has " + (marks == null ? "no" : marks.size()) + " entries,"
                    + " expected one LawMark per law (" + laws.size() + "), in the order of lawNames");
        }
        for (int i = 0; i < marks.size(); i++) {
            LawMark k = marks.get(i);
            if (k == null || !laws.get(i).equals(k.law())) {
                throw new IllegalArgumentException("marks[" + i + "] is " + (k == null ? "null" : "for law '"
                        + k.law() + "'") + " but law " + i + " is '" + laws.get(i) + "'; give one LawMark per law,"
                        + " in the order of lawNames");
            }
            if (!(k.value() > 0) || Double.isInfinite(k.value())) {
                throw new IllegalArgumentException("the mark of law '" + k.law() + "' is " + k.value()
                        + "; expected a finite residual size > 0 in the law's SI unit");
            }
            if (k.label() == null || k.label().indexOf('\n') >= 0) {
                throw new IllegalArgumentException("the mark of law '" + k.law() + "' needs a one-line label");
            }
        }
        return List.copyOf(marks);
    }

    static double[] truth(double[] truth, int rows, List<String> outputs) {
        if (rows < 1) {
            throw new IllegalArgumentException("rows is " + rows + "; a report needs at least one test row");
        }
        if (truth == null) {
            throw new IllegalArgumentException("truth is null; pass the true outputs of the test rows, row-major");
        }
        long expected = (long) rows * outputs.size();
        if (truth.length != expected) {
            throw new IllegalArgumentException("truth has " + truth.length + " values, expected rows x outputs = "
                    + rows + " x " + outputs.size() + " = " + expected + " (row-major, physical units)");
        }
        finite("truth", truth, outputs, "", "the data generator produced a value that is not finite");
        return truth.clone();
    }

    static int[] completed(int[] completed, int p) {
        if (completed == null || completed.length == 0) {
            throw new IllegalArgumentException("completedOutputs is " + (completed == null ? "null" : "empty")
                    + "; give the indices of the outputs the law layer computes (the law file's complete statement)");
        }
        Set<Integer> seen = new HashSet<>();
        for (int i = 0; i < completed.length; i++) {
            int c = completed[i];
            if (c < 0 || c >= p) {
                throw new IllegalArgumentException("completedOutputs[" + i + "] is " + c + ", outside the output"
                        + " columns 0 .. " + (p - 1));
            }
            if (!seen.add(c)) {
                throw new IllegalArgumentException("completedOutputs holds " + c + " twice; list each completed"
                        + " output once");
            }
        }
        return completed.clone();
    }

    static List<NetworkRun> runs(List<NetworkRun> runs, int rows, List<String> outputs, List<String> laws) {
        if (runs == null || runs.isEmpty()) {
            throw new IllegalArgumentException("runs is " + (runs == null ? "null" : "empty") + "; pass at least"
                    + " one NetworkRun (normally unconstrained, penalty and exact)");
        }
        Set<String> seen = new HashSet<>();
        for (int i = 0; i < runs.size(); i++) {
            NetworkRun r = runs.get(i);
            if (r == null) {
                throw new IllegalArgumentException("runs[" + i + "] is null");
            }
            if (!seen.add(r.label())) {
                throw new IllegalArgumentException("two runs are labelled '" + r.label() + "'; give every run its"
                        + " own label");
            }
            String who = "run '" + r.label() + "': ";
            double[] predicted = r.predicted();
            long p = (long) rows * outputs.size();
            if (predicted.length != p) {
                throw new IllegalArgumentException(who + "predicted has " + predicted.length + " values, expected"
                        + " rows x outputs = " + rows + " x " + outputs.size() + " = " + p
                        + " (row-major, physical units)");
            }
            double[] residuals = r.residuals();
            long m = (long) rows * laws.size();
            if (residuals.length != m) {
                throw new IllegalArgumentException(who + "residuals has " + residuals.length + " values, expected"
                        + " rows x laws = " + rows + " x " + laws.size() + " = " + m
                        + " (row-major, one signed residual per law per test row)");
            }
            finite("predicted", predicted, outputs, who, "a network that predicts non-finite values has diverged"
                    + " or was given non-finite inputs; report that instead, or leave the run out");
            finite("residuals", residuals, laws, who, "a residual that is not finite comes from a non-finite"
                    + " prediction or an overflow while evaluating the law; check that row's predictions");
        }
        return List.copyOf(runs);
    }

    private static void finite(String what, double[] values, List<String> columns, String who, String hint) {
        int w = columns.size();
        for (int i = 0; i < values.length; i++) {
            if (!Double.isFinite(values[i])) {
                throw new IllegalArgumentException(who + what + " at row " + i / w + ", column '"
                        + columns.get(i % w) + "' is " + values[i] + "; every value must be finite: " + hint);
            }
        }
    }
}
