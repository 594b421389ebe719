package dev.lawful.enforce.plan;

import dev.lawful.algebra.LawEvaluator;

/**
 * Where each structurally nonzero Jacobian entry of the evaluator belongs: for dC/dy entries, the law and the
 * role of the output (completed index k ≥ 0 or −(f+1) for free index f); for dC/dx entries, the law and the input
 * column. Shared arrays, never modified.
 *
 * @param entryLaw      per dC/dy entry: its scalar law
 * @param entryRole     per dC/dy entry: the role of its output
 * @param inEntryLaw    per dC/dx entry: its scalar law
 * @param inEntryColumn per dC/dx entry: its input column
 */
public record EntryMaps(int[] entryLaw, int[] entryRole, int[] inEntryLaw, int[] inEntryColumn) {
    /**
     * @param evaluator the laws' evaluator (its entry layout)
     * @param role      per declared output: completed index or −(f+1)
     * @return the maps of every entry
     */
    static EntryMaps of(LawEvaluator evaluator, int[] role) {
        int n = evaluator.lawCount();
        int[] entryLaw = new int[evaluator.outputNonzeros()];
        int[] entryRole = new int[entryLaw.length];
        for (int i = 0; i < n; i++) {
            int[] cols = evaluator.outputColumns(i);
            for (int k = 0; k < cols.length; k++) {
                entryLaw[evaluator.outputOffset(i) + k] = i;
                entryRole[evaluator.outputOffset(i) + k] = role[cols[k]];
            }
        }
        int[] inEntryLaw = new int[evaluator.inputNonzeros()];
        int[] inEntryColumn = new int[inEntryLaw.length];
        for (int i = 0; i < n; i++) {
            int[] cols = evaluator.inputColumns(i);
            for (int k = 0; k < cols.length; k++) {
                inEntryLaw[evaluator.inputOffset(i) + k] = i;
                inEntryColumn[evaluator.inputOffset(i) + k] = cols[k];
            }
        }
        return new EntryMaps(entryLaw, entryRole, inEntryLaw, inEntryColumn);
    }
}
