package dev.lawful.cli;

import dev.lawful.algebra.Diagnostic;
import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.io.CsvException;
import dev.lawful.io.CsvReader;
import dev.lawful.io.CsvTable;
import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * The steps {@code verify} and {@code complete} share: reading the law file, and reading the CSV columns a
 * command needs with messages that name the line, the column and the nearest known name.
 *
 * <p>Column rules: the header must name every element the command needs (any order). A column that the law file
 * does not know is ignored with a note on standard error (so an id, a time stamp or the status column of
 * {@code complete --keep-going} can stay in the file); but when a needed column is missing, a near unknown column
 * is reported as misnamed. Every failure is a {@link CommandFailure} with exit status {@link Lawful#EXIT_USAGE},
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
     * The columns read for a command.
     *
     * @param table the needed columns, in the order asked for, with each row's line number
     * @param notes what was ignored and why, one line each, for standard error
     * @param extra the header's columns that were not read, in file order
     */
    record Data(CsvTable table, List<String> notes, List<String> extra) {
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
     * Reads the needed columns of a CSV file.
     *
     * @param command  the command name for messages
     * @param csv      the CSV file
     * @param lawFile  the law file's name, for messages
     * @param needed   each needed element name (the CSV header spelling, {@code name} or {@code name[i]}) with
     *                 what it is, such as {@code "an input"}, in the order the table's columns should have
     * @param computed elements the law file knows but the command computes itself: ignored with a note saying so
     * @return the table and the notes
     * @throws CommandFailure (exit 2) when the file cannot be read, a needed column is missing or misnamed, a row
     *                        has the wrong length, a value is not a number, or there are no data rows
     */
    static Data readColumns(String command, Path csv, String lawFile, Map<String, String> needed,
                            Set<String> computed) throws CommandFailure {
        String prefix = "lawful " + command + ": ";
        String name = csv.toString();
        CsvReader reader;
        try {
            if (Files.isDirectory(csv)) {
                throw new CommandFailure(Lawful.EXIT_USAGE, prefix + "cannot read " + name + ": it is a directory");
            }
            reader = CsvReader.open(csv);
        } catch (IOException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + "cannot read " + name + ": "
                    + CheckCommand.reason(e));
        } catch (CsvException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + e.getMessage());
        }
        List<String> header = reader.header();
        int line = reader.headerLine();
        Set<String> present = new HashSet<>(header);
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
        for (String element : needed.keySet()) {
            if (!present.contains(element)) {
                missing.add(element);
            }
        }
        if (!missing.isEmpty()) {
            throw new CommandFailure(Lawful.EXIT_USAGE, missingMessage(prefix, name, line, lawFile, needed,
                    missing, unknown));
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
        CsvTable table;
        try {
            table = reader.read(new ArrayList<>(needed.keySet()));
        } catch (CsvException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + e.getMessage());
        }
        if (table.rows() == 0) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + name + ": no data rows after the header (line "
                    + line + ")");
        }
        List<String> extra = new ArrayList<>(skipped);
        extra.addAll(unknown);
        List<String> inFileOrder = new ArrayList<>();
        for (String column : header) {
            if (extra.contains(column)) {
                inFileOrder.add(column);
            }
        }
        return new Data(table, notes, inFileOrder);
    }

    /**
     * One line per problem: an unknown column near a missing element is named as misspelt; every other missing
     * element is named with what it is.
     */
    private static String missingMessage(String prefix, String file, int line, String lawFile,
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
                lines.add(prefix + file + ": line " + line + ", column '" + column + "': not an element of "
                        + lawFile + "; did you mean '" + near + "' (" + needed.get(near) + ")?");
                explained.add(near);
                unmatched.remove(near);
            }
        }
        if (left.size() == 1 && unmatched.size() == 1) {
            // one unknown column and one missing element: the column is that element under another name
            String near = unmatched.iterator().next();
            lines.add(prefix + file + ": line " + line + ", column '" + left.get(0) + "': not an element of "
                    + lawFile + "; did you mean '" + near + "' (" + needed.get(near) + ", the only one missing)?");
            explained.add(near);
        }
        for (String element : missing) {
            if (!explained.contains(element)) {
                lines.add(prefix + file + ": line " + line + ": no column '" + element + "' (" + needed.get(element)
                        + " of " + lawFile + ")");
            }
        }
        if (lines.size() > MAX_NAMED) {
            int more = lines.size() - MAX_NAMED;
            lines = new ArrayList<>(lines.subList(0, MAX_NAMED));
            lines.add(prefix + file + ": line " + line + ": and " + more + " more missing "
                    + (more == 1 ? "column" : "columns"));
        }
        return String.join("\n", lines);
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
