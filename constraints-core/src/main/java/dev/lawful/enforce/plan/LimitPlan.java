package dev.lawful.enforce.plan;

import dev.lawful.algebra.LawEvaluator;
import java.util.List;

/**
 * The limits of a completion, decided once: each scalar limit g_j(x, y) ≥ 0 compiled with its Jacobian, which
 * limits bound one output by a constant (those hold exactly, bit for bit), and the metric in which the free outputs
 * are moved the least. Shared arrays, never modified.
 *
 * @param evaluator      values g, natural scales and dg/dy, dg/dx of every scalar limit
 * @param names          the scalar limits' names
 * @param singleOutput   per limit: the declared output it bounds by a constant, or −1
 * @param bound          per limit: that constant in the output's declared unit (NaN when there is none)
 * @param lower          per limit: whether the constant is a lower limit (y ≥ bound) or an upper one
 * @param scales         per declared output: its typical size in its declared unit; the metric is
 *                       Σ_o ((y*_o − y_o)/scale_o)² over all outputs, free and completed
 * @param maxIterations  cap on linearise-and-project steps per sample (one suffices when the completed outputs are
 *                       affine in the free ones)
 */
public record LimitPlan(LawEvaluator evaluator, List<String> names, int[] singleOutput, double[] bound,
        boolean[] lower, double[] scales, int maxIterations) {
    /** @return the number of scalar limits */
    public int count() {
        return singleOutput.length;
    }
}
