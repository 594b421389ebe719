package dev.lawful.enforce.solve;

import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.plan.CompletionPlan;
import java.util.Arrays;

/**
 * The column permutations of a completion: free outputs into and out of full rows in declared order (as runs of
 * consecutive columns, copied in bulk), and the declared order to and from the free-first layout. Immutable.
 */
public final class Columns {
    private final int nIn;
    private final int nOut;
    private final int nFree;
    private final int[] free;
    private final int[] completed;
    /** The free outputs as runs of consecutive columns: z offset, full-row offset and length of each run. */
    private final int[] runFrom;
    private final int[] runTo;
    private final int[] runLength;

    /** @param plan the completion's plan */
    public Columns(CompletionPlan plan) {
        this.nIn = plan.inputWidth();
        this.nOut = plan.outputWidth();
        this.free = plan.free();
        this.completed = plan.completed();
        this.nFree = free.length;
        int runs = 0;
        for (int f = 0; f < nFree; f++) {
            if (f == 0 || free[f] != free[f - 1] + 1) {
                runs++;
            }
        }
        this.runFrom = new int[runs];
        this.runTo = new int[runs];
        this.runLength = new int[runs];
        for (int f = 0, k = -1; f < nFree; f++) {
            if (f == 0 || free[f] != free[f - 1] + 1) {
                k++;
                runFrom[k] = f;
                runTo[k] = free[f];
            }
            runLength[k]++;
        }
    }

    /**
     * Writes the free outputs into their columns of the full rows and, unless {@code st} is null, sets each
     * sample's status: OK, or NOT_FINITE when an input or free output is NaN or infinite.
     *
     * @param full modified: the free columns of {@code batch} rows
     * @param st   optional, modified: statuses
     */
    void scatterFree(double[] x, double[] z, int batch, double[] full, byte[] st) {
        for (int s = 0; s < batch; s++) {
            int zo = s * nFree;
            int yo = s * nOut;
            for (int k = 0; k < runFrom.length; k++) {
                System.arraycopy(z, zo + runFrom[k], full, yo + runTo[k], runLength[k]);
            }
            if (st != null) {
                st[s] = Finite.finite(z, zo, nFree) && Finite.finite(x, s * nIn, nIn) ? SampleStatus.OK
                        : SampleStatus.NOT_FINITE;
            }
        }
    }

    /**
     * Copies sample s's gradients on the free columns of a full row into its row of ḡ_z.
     *
     * @param gz modified: row s
     */
    void gatherFree(double[] g, int s, double[] gz) {
        int zo = s * nFree;
        int go = s * nOut;
        for (int k = 0; k < runFrom.length; k++) {
            System.arraycopy(g, go + runTo[k], gz, zo + runFrom[k], runLength[k]);
        }
    }

    /**
     * Writes full rows (declared order) into the caller's layout; a sample whose status is not OK gets NaN outputs.
     *
     * @param y         modified: {@code batch} rows in the caller's layout (may be {@code full} itself when declared)
     * @param freeFirst whether the caller's layout puts free outputs first
     */
    public void toLayout(int batch, double[] full, byte[] st, double[] y, boolean freeFirst) {
        for (int s = 0; s < batch; s++) {
            boolean bad = st[s] != SampleStatus.OK;
            if (!freeFirst) {
                if (bad) {
                    Arrays.fill(y, s * nOut, (s + 1) * nOut, Double.NaN);
                } else if (full != y) {
                    System.arraycopy(full, s * nOut, y, s * nOut, nOut);
                }
            } else {
                for (int f = 0; f < nFree; f++) {
                    y[s * nOut + f] = bad ? Double.NaN : full[s * nOut + free[f]];
                }
                for (int k = 0; k < completed.length; k++) {
                    y[s * nOut + nFree + k] = bad ? Double.NaN : full[s * nOut + completed[k]];
                }
            }
        }
    }

    /**
     * Reads rows in the free-first layout back into declared order.
     *
     * @param full modified: {@code batch} rows in declared order
     */
    public void fromFreeFirst(int batch, double[] rows, double[] full) {
        for (int s = 0; s < batch; s++) {
            for (int c = 0; c < nOut; c++) {
                full[s * nOut + outputAt(c, true)] = rows[s * nOut + c];
            }
        }
    }

    /** @return the declared output index of column {@code c} in the declared or free-first layout */
    public int outputAt(int c, boolean freeFirst) {
        if (!freeFirst) {
            return c;
        }
        return c < nFree ? free[c] : completed[c - nFree];
    }
}
