package dev.lawful.enforce;

import dev.lawful.algebra.LawEvaluator;

/** The build-time fold of a constant-affine law set into y_c = M z + N x + k. */
final class ConstantAffineFold {
    private ConstantAffineFold() {
    }

    /**
     * @param completion the completion being built (its stages, block factors and entry maps are set)
     * @param jacobian   dC/dy at the reference point, n×p row-major (constant for this tier)
     * @return {M, N, k} with y_c = M z + N x + k, from C = A y_c + A_f z + A_x x + c0, solved stage by stage in the
     *         triangular order so that coefficients that are structurally zero come out exactly zero
     */
    static double[][] fold(Completion completion, double[] jacobian) {
        int n = completion.n;
        int nIn = completion.nIn;
        int nOut = completion.nOut;
        int nFree = completion.nFree;
        int[] free = completion.free;
        int[] completed = completion.completed;
        LawEvaluator evaluator = completion.evaluator;
        int[] inEntryLaw = completion.inEntryLaw;
        int[] inEntryColumn = completion.inEntryColumn;
        Stages stages = completion.stages;
        double[][] stageLu = completion.stageLu;
        int[][] stagePivot = completion.stagePivot;
        double[] jx = new double[evaluator.inputNonzeros()];
        double[] c0 = new double[n];
        evaluator.evaluate(new double[nIn], new double[nOut], 1, c0, null, null, jx);
        double[] ax = new double[n * nIn];
        for (int e = 0; e < jx.length; e++) {
            ax[inEntryLaw[e] * nIn + inEntryColumn[e]] = jx[e];
        }
        double[] m = new double[n * nFree];
        double[] nn = new double[n * nIn];
        double[] k = new double[n];
        boolean[] known = new boolean[n];
        int width = nFree + nIn + 1;
        for (int g = 0; g < stages.stages.size(); g++) {
            Stages.Stage st = stages.stages.get(g);
            int size = st.size();
            // right-hand sides: −(A_f, A_x, c0) of the stage's laws minus what earlier stages contribute
            double[] rhs = new double[size * width];
            for (int j = 0; j < size; j++) {
                int law = st.laws()[j];
                double[] row = new double[width];
                for (int f = 0; f < nFree; f++) {
                    row[f] = jacobian[law * nOut + free[f]];
                }
                for (int x = 0; x < nIn; x++) {
                    row[nFree + x] = ax[law * nIn + x];
                }
                row[width - 1] = c0[law];
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
                for (int c = 0; c < width; c++) {
                    rhs[c * size + j] = -row[c];
                }
            }
            for (int c = 0; c < width; c++) {
                DenseLu.solve(stageLu[g], size, stagePivot[g], rhs, c * size);
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
            for (int j = 0; j < size; j++) {
                known[st.vars()[j]] = true;
            }
        }
        return new double[][] {m, nn, k};
    }
}
