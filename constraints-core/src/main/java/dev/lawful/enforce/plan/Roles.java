package dev.lawful.enforce.plan;

import java.util.Arrays;

/**
 * Which outputs are completed and which are free, and the maps between the three numberings: declared output
 * index o, completed index k (solve order) and free index f. The arrays are shared, never modified after
 * construction; callers must not modify them either.
 *
 * @param completed declared index of each completed output, in solve order
 * @param free      declared index of each free output, in declared order
 * @param role      per declared output: its completed index k ≥ 0, or −(f+1) for free index f
 */
public record Roles(int[] completed, int[] free, int[] role) {
    /**
     * @param completed declared indices of the completed outputs, in solve order (not modified)
     * @param outputs   number of declared outputs
     * @return the roles of every output
     */
    static Roles of(int[] completed, int outputs) {
        int[] role = new int[outputs];
        Arrays.fill(role, Integer.MIN_VALUE);
        for (int k = 0; k < completed.length; k++) {
            role[completed[k]] = k;
        }
        int[] free = new int[outputs - completed.length];
        for (int o = 0, f = 0; o < outputs; o++) {
            if (role[o] == Integer.MIN_VALUE) {
                free[f] = o;
                role[o] = -(f + 1);
                f++;
            }
        }
        return new Roles(completed.clone(), free, role);
    }
}
