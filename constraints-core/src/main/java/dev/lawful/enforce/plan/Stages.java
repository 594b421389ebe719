package dev.lawful.enforce.plan;

import dev.lawful.algebra.ExpandedLaws;
import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;

/**
 * The order in which the completed outputs are solved: first, level by level, every law that involves exactly one
 * completed output not yet solved (it is solved for that output alone, by division or a scalar Newton), then the
 * coupled rest as one block. Most law sets of practice are triangular this way (each balance has "its" output),
 * and solving them so keeps structural zeros exact: an output whose law has all terms zero comes out exactly 0,
 * so that law holds exactly, not merely to rounding of its neighbours. Immutable.
 */
public final class Stages {
    /**
     * One block of the solve: scalar laws and the completed indices they determine, matched by position, and the
     * evaluator's dC/dy entries that fall inside the block (entry index, row and column within the block).
     */
    public record Stage(int[] laws, int[] vars, int[] entries, int[] rows, int[] cols) {
        /** @return the number of laws (and completed outputs) of the block */
        public int size() {
            return laws.length;
        }
    }

    private final List<Stage> stages;
    /** Where each stage's per-sample block factors start within a sample's n² work area (Σ m² ≤ n²). */
    private final int[] offsets;
    /** Where each stage's pivots start within a sample's n pivot slots (the stages' sizes add up to n). */
    private final int[] pivotOffsets;

    private Stages(List<Stage> stages) {
        this.stages = List.copyOf(stages);
        this.offsets = new int[stages.size()];
        this.pivotOffsets = new int[stages.size()];
        int at = 0;
        int pivots = 0;
        for (int g = 0; g < stages.size(); g++) {
            offsets[g] = at;
            pivotOffsets[g] = pivots;
            at += stages.get(g).size() * stages.get(g).size();
            pivots += stages.get(g).size();
        }
    }

    /** @return the stages in solve order */
    public List<Stage> stages() {
        return stages;
    }

    /** @return the number of stages */
    public int count() {
        return stages.size();
    }

    /** @return stage {@code g} */
    public Stage get(int g) {
        return stages.get(g);
    }

    /** @return where stage {@code g}'s block factors start within a sample's n² work area */
    public int offset(int g) {
        return offsets[g];
    }

    /** @return where stage {@code g}'s pivots start within a sample's n pivot slots */
    public int pivotOffset(int g) {
        return pivotOffsets[g];
    }

    /**
     * @param expanded  the scalar laws
     * @param role      per output: completed index k ≥ 0, or negative for a free output
     * @param entryLaw  per output-Jacobian entry of the evaluator: its law
     * @param entryRole per entry: the role of its output
     * @return the solve order
     */
    static Stages of(ExpandedLaws expanded, int[] role, int[] entryLaw, int[] entryRole) {
        int n = expanded.size();
        List<Set<Integer>> involves = involvement(expanded, role);
        boolean[] lawDone = new boolean[n];
        boolean[] varDone = new boolean[n];
        List<Stage> stages = new ArrayList<>();
        while (true) {
            List<Integer> laws = new ArrayList<>();
            List<Integer> vars = new ArrayList<>();
            nextLevel(involves, lawDone, varDone, laws, vars);
            if (laws.isEmpty()) {
                break;
            }
            for (int j = 0; j < laws.size(); j++) {
                lawDone[laws.get(j)] = true;
                varDone[vars.get(j)] = true;
            }
            stages.add(stage(laws, vars, entryLaw, entryRole));
        }
        List<Integer> laws = new ArrayList<>();
        List<Integer> vars = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            if (!lawDone[i]) {
                laws.add(i);
            }
            if (!varDone[i]) {
                vars.add(i);
            }
        }
        if (laws.size() != vars.size()) {
            throw new AssertionError("structurally singular block passed the condition check");
        }
        if (!laws.isEmpty()) {
            stages.add(stage(laws, vars, entryLaw, entryRole));
        }
        return new Stages(stages);
    }

    /** @return per law, the completed indices it involves */
    private static List<Set<Integer>> involvement(ExpandedLaws expanded, int[] role) {
        List<Set<Integer>> involves = new ArrayList<>();
        for (int i = 0; i < expanded.size(); i++) {
            Set<Integer> s = new LinkedHashSet<>();
            for (int o : expanded.outputs(i)) {
                if (role[o] >= 0) {
                    s.add(role[o]);
                }
            }
            involves.add(s);
        }
        return involves;
    }

    /** Adds to {@code laws} and {@code vars} every open law with exactly one unsolved output (one law per output). */
    private static void nextLevel(List<Set<Integer>> involves, boolean[] lawDone, boolean[] varDone,
            List<Integer> laws, List<Integer> vars) {
        for (int i = 0; i < involves.size(); i++) {
            if (lawDone[i]) {
                continue;
            }
            int only = -1;
            int open = 0;
            for (int k : involves.get(i)) {
                if (!varDone[k]) {
                    open++;
                    only = k;
                }
            }
            if (open == 1 && !vars.contains(only)) {
                laws.add(i);
                vars.add(only);
            }
        }
    }

    private static Stage stage(List<Integer> laws, List<Integer> vars, int[] entryLaw, int[] entryRole) {
        int[] l = laws.stream().mapToInt(Integer::intValue).toArray();
        int[] v = vars.stream().mapToInt(Integer::intValue).toArray();
        List<int[]> picked = new ArrayList<>();
        for (int e = 0; e < entryLaw.length; e++) {
            int row = laws.indexOf(entryLaw[e]);
            int col = entryRole[e] >= 0 ? vars.indexOf(entryRole[e]) : -1;
            if (row >= 0 && col >= 0) {
                picked.add(new int[] {e, row, col});
            }
        }
        int[] entries = new int[picked.size()];
        int[] rows = new int[picked.size()];
        int[] cols = new int[picked.size()];
        for (int k = 0; k < picked.size(); k++) {
            entries[k] = picked.get(k)[0];
            rows[k] = picked.get(k)[1];
            cols[k] = picked.get(k)[2];
        }
        return new Stage(l, v, entries, rows, cols);
    }
}
