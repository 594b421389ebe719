package dev.lawful.enforce;

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
 * so that law holds exactly, not merely to rounding of its neighbours.
 */
final class Stages {
    /** One block of the solve: scalar laws and the completed indices they determine, matched by position. */
    record Stage(int[] laws, int[] vars, int[] entries, int[] rows, int[] cols) {
        int size() {
            return laws.length;
        }
    }

    final List<Stage> stages;
    /** Where each stage's per-sample block factors start within a sample's n² work area (Σ m² ≤ n²). */
    final int[] offsets;

    private Stages(List<Stage> stages) {
        this.stages = List.copyOf(stages);
        this.offsets = new int[stages.size()];
        int at = 0;
        for (int g = 0; g < stages.size(); g++) {
            offsets[g] = at;
            at += stages.get(g).size() * stages.get(g).size();
        }
    }

    /**
     * @param expanded  the scalar laws
     * @param role      per output: completed index k ≥ 0, or negative for a free output
     * @param entryLaw  per output-Jacobian entry of the evaluator: its law
     * @param entryRole per entry: the role of its output
     */
    static Stages of(ExpandedLaws expanded, int[] role, int[] entryLaw, int[] entryRole) {
        int n = expanded.size();
        List<Set<Integer>> involves = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            Set<Integer> s = new LinkedHashSet<>();
            for (int o : expanded.outputs(i)) {
                if (role[o] >= 0) {
                    s.add(role[o]);
                }
            }
            involves.add(s);
        }
        boolean[] lawDone = new boolean[n];
        boolean[] varDone = new boolean[n];
        List<Stage> stages = new ArrayList<>();
        while (true) {
            List<Integer> laws = new ArrayList<>();
            List<Integer> vars = new ArrayList<>();
            for (int i = 0; i < n; i++) {
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
