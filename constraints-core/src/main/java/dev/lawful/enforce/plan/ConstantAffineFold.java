package dev.lawful.enforce.plan;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.linear.DenseLu;

/** The build-time fold of a constant-affine law set into y_c = M z + N x + k. */
final class ConstantAffineFold {
    private final int n;
    private final int nIn;
    private final int nOut;
    private final int nFree;
    private final int[] free;
    private final int[] completed;
    /** dC/dy (n×p, row-major), dC/dx (n×nIn) and C(0, 0): constants for this tier. */
    private final double[] jacobian;
    private final double[] ax;
    private final double[] c0;

    private ConstantAffineFold(LawEvaluator evaluator, Roles roles, EntryMaps entries, double[] jacobian) {
        this.n = evaluator.lawCount();
        this.nIn = evaluator.inputWidth();
        this.nOut = evaluator.outputWidth();
        this.free = roles.free();
        this.completed = roles.completed();
        this.nFree = free.length;
        this.jacobian = jacobian;
        double[] jx = new double[evaluator.inputNonzeros()];
        this.c0 = new double[n];
        evaluator.evaluate(new double[nIn], new double[nOut], 1, c0, null, null, jx);
        this.ax = new double[n * nIn];
        for (int e = 0; e < jx.length; e++) {
            ax[entries.inEntryLaw()[e] * nIn + entries.inEntryColumn()[e]] = jx[e];
        }
    }

    /**
     * @param evaluator the laws' evaluator
     * @param roles     completed and free outputs
     * @param entries   the evaluator's entry maps
     * @param stages    the solve order
     * @param blocks    the stage blocks' factors
     * @param jacobian  dC/dy at the reference point, n×p row-major (constant for this tier); read only
     * @return M, N and k with y_c = M z + N x + k, from C = A y_c + A_f z + A_x x + c0, solved stage by stage in the
     *         triangular order so that coefficients that are structurally zero come out exactly zero
     */
    static Fold fold(LawEvaluator evaluator, Roles roles, EntryMaps entries, Stages stages, ConstantBlocks blocks,
            double[] jacobian) {
        return new ConstantAffineFold(evaluator, roles, entries, jacobian).fold(stages, blocks);
    }

    private Fold fold(Stages stages, ConstantBlocks blocks) {
        double[] m = new double[n * nFree];
        double[] nn = new double[n * nIn];
        double[] k = new double[n];
        int width = nFree + nIn + 1;
        for (int g = 0; g < stages.count(); g++) {
            Stages.Stage st = stages.get(g);
            int size = st.size();
            double[] rhs = new double[size * width];
            for (int j = 0; j < size; j++) {
                double[] row = rightHandSide(st.laws()[j], m, nn, k, stages, g);
                for (int c = 0; c < width; c++) {
                    rhs[c * size + j] = -row[c];
                }
            }
            for (int c = 0; c < width; c++) {
                DenseLu.solve(blocks.stageLu()[g], size, blocks.stagePivot()[g], rhs, c * size);
            }
            for (int j = 0; j < size; j++) {
                int q = st.vars()[j];
                for (int f = 0; f < nFree; f++) {
                    m[q * nFree + f] = rhs[f * size + j];
                }
                for (int x = 0; x < nIn; x++) {
                    nn[q * nIn + x] = rhs[(nFree + x) * size + j];
                }
                k[q] = rhs[(width - 1) * size + j];
            }
        }
        return new Fold(m, nn, k);
    }

    /**
     * @return (A_f, A_x, c0) of one law plus what the outputs of stages before {@code g} contribute through their
     *         folds (the negated right-hand side of the stage's system)
     */
    private double[] rightHandSide(int law, double[] m, double[] nn, double[] k, Stages stages, int g) {
        int width = nFree + nIn + 1;
        double[] row = new double[width];
        for (int f = 0; f < nFree; f++) {
            row[f] = jacobian[law * nOut + free[f]];
        }
        for (int x = 0; x < nIn; x++) {
            row[nFree + x] = ax[law * nIn + x];
        }
        row[width - 1] = c0[law];
        boolean[] known = solvedBefore(stages, g);
        for (int q = 0; q < n; q++) {
            double a = jacobian[law * nOut + completed[q]];
            if (a == 0 || !known[q]) {
                continue;
            }
            for (int f = 0; f < nFree; f++) {
                row[f] += a * m[q * nFree + f];
            }
            for (int x = 0; x < nIn; x++) {
                row[nFree + x] += a * nn[q * nIn + x];
            }
            row[width - 1] += a * k[q];
        }
        return row;
    }

    private boolean[] solvedBefore(Stages stages, int g) {
        boolean[] known = new boolean[n];
        for (int h = 0; h < g; h++) {
            for (int q : stages.get(h).vars()) {
                known[q] = true;
            }
        }
        return known;
    }
}
