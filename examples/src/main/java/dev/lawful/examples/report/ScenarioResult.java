package dev.lawful.examples.report;

import dev.lawful.examples.TruthModel.ColumnGroup;
import dev.lawful.examples.TruthModel.LawMark;
import java.util.Arrays;
import java.util.List;
import java.util.Objects;

/**
 * Everything a report needs about one worked scenario: the test rows' true outputs, the scenario's laws and output
 * groups, and one {@link NetworkRun} per trained network. {@link ReportWriter} turns it into a table, JSON, CSV and
 * plots.
 *
 * <p>With p = {@code outputNames.size()} output columns and m = {@code lawNames.size()} laws, every run's
 * {@code predicted} holds rows × p values and its {@code residuals} rows × m, both row-major, like {@code truth}.
 * The constructor checks all of that, so a result that exists can be reported; lists are copied unmodifiable and
 * arrays are copied (the accessors of the arrays return copies).
 *
 * @param scenario         a short identifier of the scenario, for example {@code "reformer"}; not blank
 * @param title            a one-line title for the table and the plots, for example "Steam reformer outlet"
 * @param outputNames      the p output column names in the law file's order, for example {@code out[0]}; distinct
 * @param groups           the output columns grouped by physical quantity, at least one; test error is reported
 *                         per group; names distinct; each inside 0 .. p − 1 (groups may leave columns out)
 * @param lawNames         the m law names in declaration order (one per scalar residual), distinct, none named
 *                         {@code sample} or {@code network} (the fixed columns of {@code residuals.csv})
 * @param lawUnits         for each law, its SI unit as text ({@code "mol/s"}); {@code ""} for a pure number
 * @param marks            for each law, in the same order and with {@code marks.get(i).law()} equal to
 *                         {@code lawNames.get(i)}, the residual size that matters to a user (finite, &gt; 0)
 * @param truth            the true outputs of the test rows, rows × p, row-major, physical units; finite
 * @param rows             the number of test rows, at least 1
 * @param completedOutputs the indices (0 .. p − 1, distinct, at least one) of the outputs the law layer computes;
 *                         they get the predicted-versus-true plot
 * @param runs             the networks, at least one, labels distinct; their order is the column order of the table
 *                         and the colour order of the plots
 * @param caution          a note printed under the table and stored in the JSON (for example how the data were made
 *                         or what limits the comparison); null or empty for none (stored as {@code ""})
 */
public record ScenarioResult(String scenario, String title, List<String> outputNames, List<ColumnGroup> groups,
                             List<String> lawNames, List<String> lawUnits, List<LawMark> marks, double[] truth,
                             int rows, int[] completedOutputs, List<NetworkRun> runs, String caution) {

    /**
     * Checks and copies the arguments.
     *
     * @param scenario see the class comment
     * @param title see the class comment
     * @param outputNames see the class comment
     * @param groups see the class comment
     * @param lawNames see the class comment
     * @param lawUnits see the class comment
     * @param marks see the class comment
     * @param truth see the class comment
     * @param rows see the class comment
     * @param completedOutputs see the class comment
     * @param runs see the class comment
     * @param caution see the class comment
     * @throws IllegalArgumentException naming the first argument that is inconsistent (a list of the wrong size, an
     *                                  array of the wrong length, an index out of range, a repeated name, a value
     *                                  that is not finite: NaN predictions come from a diverged network) and how to
     *                                  fix it
     */
    public ScenarioResult {
        ResultChecks.text("scenario", scenario);
        ResultChecks.text("title", title);
        outputNames = ResultChecks.names("outputNames", outputNames, List.of());
        lawNames = ResultChecks.names("lawNames", lawNames, List.of("sample", "network"));
        groups = ResultChecks.groups(groups, outputNames.size());
        lawUnits = ResultChecks.units(lawUnits, lawNames);
        marks = ResultChecks.marks(marks, lawNames);
        truth = ResultChecks.truth(truth, rows, outputNames);
        completedOutputs = ResultChecks.completed(completedOutputs, outputNames.size());
        runs = ResultChecks.runs(runs, rows, outputNames, lawNames);
        caution = caution == null ? "" : caution;
    }

    /** @return a copy of the true outputs, rows × p, row-major */
    @Override
    public double[] truth() {
        return truth.clone();
    }

    /** @return a copy of the indices of the completed outputs */
    @Override
    public int[] completedOutputs() {
        return completedOutputs.clone();
    }

    /** @return p, the number of output columns */
    public int outputCount() {
        return outputNames.size();
    }

    /** @return m, the number of laws */
    public int lawCount() {
        return lawNames.size();
    }

    /**
     * @param output an output index, 0 .. p − 1
     * @return the unit of the first group that holds the output, or {@code ""} when no group does
     */
    public String unitOf(int output) {
        Objects.checkIndex(output, outputNames.size());
        for (ColumnGroup g : groups) {
            if (output >= g.first() && output < g.first() + g.count()) {
                return g.unit();
            }
        }
        return "";
    }

    /** Two results are equal when every component is, arrays compared by content. */
    @Override
    public boolean equals(Object o) {
        return o instanceof ScenarioResult r && scenario.equals(r.scenario) && title.equals(r.title)
                && outputNames.equals(r.outputNames) && groups.equals(r.groups) && lawNames.equals(r.lawNames)
                && lawUnits.equals(r.lawUnits) && marks.equals(r.marks) && Arrays.equals(truth, r.truth)
                && rows == r.rows && Arrays.equals(completedOutputs, r.completedOutputs) && runs.equals(r.runs)
                && caution.equals(r.caution);
    }

    /** @return a hash of every component, arrays by content */
    @Override
    public int hashCode() {
        return Objects.hash(scenario, title, outputNames, groups, lawNames, lawUnits, marks, Arrays.hashCode(truth),
                rows, Arrays.hashCode(completedOutputs), runs, caution);
    }

    /** @return the scenario, sizes and run labels (not the values) */
    @Override
    public String toString() {
        return "ScenarioResult[" + scenario + ", " + rows + " rows, " + outputNames.size() + " outputs, "
                + lawNames.size() + " laws, runs " + runs.stream().map(NetworkRun::label).toList() + "]";
    }
}
