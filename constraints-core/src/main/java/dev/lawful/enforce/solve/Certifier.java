package dev.lawful.enforce.solve;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.plan.CompletionPlan;

/**
 * The check of the documented bound |C_i| ≤ (d_i + 3)·2⁻⁵³·s_i on every scalar law of a sample (s_i the law's
 * natural scale, d_i its rounding depth): a sample that misses it is not converged, never a silent success.
 * Immutable.
 */
final class Certifier {
    private static final double EPS = 0x1p-53;

    private final LawEvaluator evaluator;
    private final int[] boundFactor;
    private final int[] completed;
    private final int n;
    private final int nOut;

    Certifier(CompletionPlan plan) {
        this.evaluator = plan.evaluator();
        this.boundFactor = plan.boundFactor();
        this.completed = plan.completed();
        this.n = plan.lawCount();
        this.nOut = plan.outputWidth();
    }

    /**
     * Evaluates every law of every sample and marks as NOT_CONVERGED each OK sample outside the bound.
     *
     * @param st modified: statuses
     * @param w  modified: residuals and scales
     */
    void verify(double[] x, int batch, double[] full, byte[] st, SolveWork w) {
        evaluator.residuals(x, full, batch, w.residual, w.scale, w.evaluation);
        for (int s = 0; s < batch; s++) {
            if (st[s] == SampleStatus.OK && !converged(s, w, null)) {
                st[s] = SampleStatus.NOT_CONVERGED;
            }
        }
    }

    /** @return whether the given laws (all when null) of sample s are within the bound, by {@code w}'s residuals */
    boolean converged(int s, SolveWork w, int[] subset) {
        return within(s, w, subset, 1);
    }

    /**
     * @param factor how many times the bound a residual may be
     * @return whether the given laws (all when null) of sample s are within {@code factor} times the bound, by
     *         {@code w}'s residuals
     */
    boolean within(int s, SolveWork w, int[] subset, double factor) {
        int count = subset == null ? n : subset.length;
        for (int j = 0; j < count; j++) {
            int i = subset == null ? j : subset[j];
            double r = w.residual[s * n + i];
            double scale = w.scale[s * n + i];
            // an infinite scale would admit any residual: an output that overflowed is never within the bound
            if (!(Math.abs(r) <= factor * boundFactor[i] * EPS * scale) || scale == Double.POSITIVE_INFINITY) {
                return false;
            }
        }
        return true;
    }

    /**
     * Marks as not converged every sample still OK whose completed outputs are not all finite (what the certifying
     * evaluation would have caught, for a forward that skips it).
     *
     * @param st modified: statuses
     */
    void markNonFiniteResults(int batch, double[] full, byte[] st) {
        for (int s = 0; s < batch; s++) {
            if (st[s] != SampleStatus.OK) {
                continue;
            }
            for (int k = 0; k < n; k++) {
                if (!Double.isFinite(full[s * nOut + completed[k]])) {
                    st[s] = SampleStatus.NOT_CONVERGED;
                    break;
                }
            }
        }
    }
}
