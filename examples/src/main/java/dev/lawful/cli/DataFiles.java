package dev.lawful.cli;

import dev.lawful.algebra.Diagnostic;
import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * The steps {@code verify} and {@code complete} share: reading the law file, and matching a data file's columns to
 * the elements a command needs, with messages that name the place, the column and the nearest known name.
 *
 * <p>Column rules: the header must name every element the command needs (any order). A column that the law file
 * does not know is ignored with a note on standard error (so an id, a time stamp or the status column of
 * {@code complete --keep-going} can stay in the file); but when a needed column is missing, a near unknown column
 * is reported as misnamed (also without brackets or case, {@code out3} for {@code out[3]}, or as the only unknown
 * column when one element is missing). An element no law or limit involves may be absent (a note says so).
 * Every failure is a {@link CommandFailure} with exit status {@link Lawful#EXIT_USAGE},
 * except a law file with errors ({@link Lawful#EXIT_INVALID}).
 */
final class DataFiles {
    /** Problems with the header named one per line before the rest are only counted. */
    static final int MAX_NAMED = 20;
    /** Pairs of unknown columns and missing elements compared for a spelling suggestion, at most. */
    private static final long MAX_PAIRS = 100_000;

    private DataFiles() {
    }

    /**
     * The columns a command reads from a data file.
     *
     * @param columnOf for each wanted element, its column in the file, or -1 when the file does not have it (only an
     *                 element no law or limit involves may be absent; it is read as 0)
     * @param names    the wanted elements, in the order asked for
     * @param notes    what was ignored or is absent and why, one line each, for standard error
     * @param extra    the file's columns that are not read, in file order
     * @param absent   the wanted elements the file does not have (each one no law or limit involves)
     */
    record Selection(int[] columnOf, List<String> names, List<String> notes, List<String> extra,
                     List<String> absent) {
        /** @return whether element {@code name} is in the file */
        boolean has(String name) {
            return !absent.contains(name);
        }
    }

    /**
     * Reads and checks a law file, printing its warnings to {@code err}.
     *
     * @param command the command name for messages, such as {@code verify}
     * @param file    the law file
     * @param err     receives the warnings
     * @return the law set
     * @throws CommandFailure when the file cannot be read (exit 2) or has errors (exit 1, with every error)
     */
    static LawSet readLaws(String command, Path file, PrintWriter err) throws CommandFailure {
        String name = file.toString();
        LawSet set;
        try {
            if (Files.isDirectory(file)) {
                throw new CommandFailure(Lawful.EXIT_USAGE, "lawful " + command + ": cannot read " + name
                        + ": it is a directory");
            }
            set = LawSet.read(file);
        } catch (IOException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "lawful " + command + ": cannot read " + name + ": "
                    + CheckCommand.reason(e));
        } catch (LawException e) {
            throw new CommandFailure(Lawful.EXIT_INVALID, e.getMessage());
        }
        for (Diagnostic w : set.warnings()) {
            err.println(w.format());
        }
        return set;
    }

    /**
     * @param laws       the law set
     * @param outputs    the output elements the command reads
     * @param outputRole what each of them is, such as {@code "a free output"}
     * @return every input element ("an input") then each of {@code outputs}, with what it is, in that order: the
     *         {@code needed} argument of {@link #readColumns}
     */
    static Map<String, String> needed(LawSet laws, List<String> outputs, String outputRole) {
        Map<String, String> needed = new LinkedHashMap<>();
        for (String n : laws.inputNames()) {
            needed.put(n, "an input");
        }
        for (String n : outputs) {
            needed.put(n, outputRole);
        }
        return needed;
    }

    /**
     * The elements of a law set that no law and no limit involves: inputs and outputs whose value changes nothing a
     * command computes, so a data file may leave them out.
     *
     * @param laws the law set
     * @return their names, {@code name} or {@code name[i]}
     */
    static Set<String> unused(LawSet laws) {
        dev.lawful.algebra.ExpandedLaws e = laws.expand();
        boolean[] usedIn = new boolean[laws.inputWidth()];
        boolean[] usedOut = new boolean[laws.outputWidth()];
        for (int i = 0; i < e.size(); i++) {
            for (int k : e.inputs(i)) {
                usedIn[k] = true;
            }
            for (int k : e.outputs(i)) {
                usedOut[k] = true;
            }
        }
        dev.lawful.algebra.LawEvaluator limits = e.limitEvaluator();
        for (int j = 0; j < limits.lawCount(); j++) {
            for (int k : limits.inputColumns(j)) {
                usedIn[k] = true;
            }
            for (int k : limits.outputColumns(j)) {
                usedOut[k] = true;
            }
        }
        Set<String> unused = new LinkedHashSet<>();
        for (int k = 0; k < usedIn.length; k++) {
            if (!usedIn[k]) {
                unused.add(laws.inputNames().get(k));
            }
        }
        for (int k = 0; k < usedOut.length; k++) {
            if (!usedOut[k]) {
                unused.add(laws.outputNames().get(k));
            }
        }
        return unused;
    }

    /**
     * Matches a data file's columns to the elements a command needs.
     *
     * @param command  the command name for messages
     * @param source   the data file, its header read
     * @param lawFile  the law file's name, for messages
     * @param needed   each needed element name (the header spelling, {@code name} or {@code name[i]}) with what it
     *                 is, such as {@code "an input"}, in the order the command wants them
     * @param computed elements the law file knows but the command computes itself: ignored with a note saying so
     * @param optional needed elements that no law involves: their absence is a note, not an error
     * @return the selection
     * @throws CommandFailure (exit 2) when a needed column is missing or misnamed
     */
    static Selection select(String command, RowSource source, String lawFile, Map<String, String> needed,
                            Set<String> computed, Set<String> optional) throws CommandFailure {
        String prefix = "lawful " + command + ": ";
        String name = source.name();
        List<String> header = source.columns();
        Map<String, Integer> at = new HashMap<>();
        for (int c = 0; c < header.size(); c++) {
            at.put(header.get(c), c);
        }
        List<String> unknown = new ArrayList<>();
        List<String> skipped = new ArrayList<>();
        for (String column : header) {
            if (computed.contains(column)) {
                skipped.add(column);
            } else if (!needed.containsKey(column)) {
                unknown.add(column);
            }
        }
        List<String> missing = new ArrayList<>();
        List<String> absent = new ArrayList<>();
        for (String element : needed.keySet()) {
            if (!at.containsKey(element)) {
                (optional.contains(element) ? absent : missing).add(element);
            }
        }
        if (!missing.isEmpty()) {
            throw new CommandFailure(Lawful.EXIT_USAGE, missingMessage(prefix, name, source.headerPlace(), lawFile,
                    needed, missing, unknown));
        }
        List<String> notes = new ArrayList<>();
        if (!skipped.isEmpty()) {
            notes.add(prefix + "note: " + name + ": ignoring " + columns(skipped) + " " + String.join(", ", skipped)
                    + ": completed outputs are computed from the laws");
        }
        if (!unknown.isEmpty()) {
            notes.add(prefix + "note: " + name + ": ignoring " + columns(unknown) + " not in " + lawFile + ": "
                    + String.join(", ", unknown));
        }
        if (!absent.isEmpty()) {
            notes.add(prefix + "note: " + name + ": no " + columns(absent) + " " + String.join(", ", absent)
                    + ", not needed: no law or limit of " + lawFile + " involves " + (absent.size() == 1 ? "it"
                    : "them") + renaming(unknown, absent));
        }
        List<String> names = new ArrayList<>(needed.keySet());
        int[] columnOf = new int[names.size()];
        for (int j = 0; j < columnOf.length; j++) {
            columnOf[j] = at.getOrDefault(names.get(j), -1);
        }
        List<String> inFileOrder = new ArrayList<>();
        for (String column : header) {
            if (skipped.contains(column) || unknown.contains(column)) {
                inFileOrder.add(column);
            }
        }
        return new Selection(columnOf, List.copyOf(names), notes, inFileOrder, List.copyOf(absent));
    }

    /**
     * One line per problem: an unknown column near a missing element is named as misspelt; every other missing
     * element is named with what it is.
     */
    private static String missingMessage(String prefix, String file, String line, String lawFile,
                                         Map<String, String> needed, List<String> missing, List<String> unknown) {
        List<String> lines = new ArrayList<>();
        Set<String> explained = new LinkedHashSet<>();
        Set<String> unmatched = new LinkedHashSet<>(missing);
        // a huge header of unknown names gets no suggestions rather than a quadratic search
        List<String> compared = (long) unknown.size() * missing.size() <= MAX_PAIRS ? unknown : List.of();
        List<String> left = new ArrayList<>();
        for (String column : compared) {
            String near = nearestElement(column, unmatched);
            if (near == null) {
                left.add(column);
            } else {
                lines.add(prefix + file + ": " + line + ", column '" + column + "': not an element of "
                        + lawFile + "; did you mean '" + near + "' (" + needed.get(near) + ")?");
                explained.add(near);
                unmatched.remove(near);
            }
        }
        if (left.size() == 1 && unmatched.size() == 1) {
            // one unknown column and one missing element: the column is that element under another name
            String near = unmatched.iterator().next();
            lines.add(prefix + file + ": " + line + ", column '" + left.get(0) + "': not an element of "
                    + lawFile + "; did you mean '" + near + "' (" + needed.get(near) + ", the only one missing)?");
            explained.add(near);
        }
        for (String element : missing) {
            if (!explained.contains(element)) {
                lines.add(prefix + file + ": " + line + ": no column '" + element + "' (" + needed.get(element)
                        + " of " + lawFile + ")");
            }
        }
        if (lines.size() > MAX_NAMED) {
            int more = lines.size() - MAX_NAMED;
            lines = new ArrayList<>(lines.subList(0, MAX_NAMED));
            lines.add(prefix + file + ": " + line + ": and " + more + " more missing "
                    + (more == 1 ? "column" : "columns"));
        }
        return String.join("\n", lines);
    }

    /**
     * @return for unknown columns that look like absent elements (by {@link #nearestElement}, or the only unknown
     *         column and the only absent element), a hint to rename them; empty when none does
     */
    private static String renaming(List<String> unknown, List<String> absent) {
        List<String> hints = new ArrayList<>();
        Set<String> left = new LinkedHashSet<>(absent);
        for (String column : unknown) {
            String near = nearestElement(column, left);
            if (near != null) {
                hints.add("'" + column + "' as '" + near + "'");
                left.remove(near);
            }
        }
        if (hints.isEmpty() && unknown.size() == 1 && absent.size() == 1) {
            hints.add("'" + unknown.get(0) + "' as '" + absent.get(0) + "'");
        }
        return hints.isEmpty() ? "" : " (if the file has it under another name, rename " + String.join(", ", hints)
                + ")";
    }

    /**
     * @return the missing element a column name is a misspelling of: the same up to brackets, underscores, spaces and
     *         case ({@code out3}, {@code OUT_3} for {@code out[3]}), or else the nearest by {@code Names.nearest};
     *         null when none is near
     */
    static String nearestElement(String column, Set<String> missing) {
        String bare = bare(column);
        for (String element : missing) {
            if (bare(element).equals(bare)) {
                return element;
            }
        }
        return dev.lawful.algebra.Names.nearest(column, missing);
    }

    private static String bare(String name) {
        return name.replaceAll("[\\[\\]_ ]", "").toLowerCase(java.util.Locale.ROOT);
    }

    private static String columns(List<String> names) {
        return names.size() == 1 ? "column" : names.size() + " columns";
    }
}
