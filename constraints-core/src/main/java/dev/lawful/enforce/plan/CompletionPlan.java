package dev.lawful.enforce.plan;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Tier;
import java.util.List;

/**
 * Everything a completion decides once, at build time: which outputs are completed, the tier, the solve order,
 * the factors of constant blocks, the constant-affine fold, Newton's starting values, the bound factors, the
 * condition number and the notes for the user. Made by {@link CompletionPlanner}; read by the solvers of
 * {@code dev.lawful.enforce.solve}. Immutable: its arrays are shared and must not be modified.
 *
 * @param laws          the law set
 * @param expanded      its scalar laws
 * @param evaluator     the compiled laws (residuals, scales, Jacobians)
 * @param roles         completed and free outputs
 * @param tier          how the laws are solved
 * @param condition     condition number of the completed block at the reference point (see {@link OutputChoice})
 * @param warnings      notes from the build
 * @param boundFactor   per scalar law, d_i + 3 of its rounding bound (d_i its rounding depth)
 * @param entries       where each Jacobian entry of the evaluator belongs
 * @param stages        the solve order
 * @param blocks        factors of the constant blocks, or null when the blocks depend on the sample
 * @param fold          the constant-affine fold, or null for the other tiers
 * @param start         Newton's starting values
 * @param maxIterations Newton's iteration cap
 * @param limits        the limits, or null when the law set has none
 */
public record CompletionPlan(LawSet laws, ExpandedLaws expanded, LawEvaluator evaluator, Roles roles, Tier tier,
        double condition, List<String> warnings, int[] boundFactor, EntryMaps entries, Stages stages,
        ConstantBlocks blocks, Fold fold, NewtonStart start, int maxIterations, LimitPlan limits) {

    /** @return the number of scalar laws, which is the number of completed outputs */
    public int lawCount() {
        return boundFactor.length;
    }

    /** @return input elements per sample */
    public int inputWidth() {
        return laws.inputWidth();
    }

    /** @return output elements per sample */
    public int outputWidth() {
        return laws.outputWidth();
    }

    /** @return free output elements per sample */
    public int freeWidth() {
        return roles.free().length;
    }

    /** @return declared index of each completed output, in solve order (shared: do not modify) */
    public int[] completed() {
        return roles.completed();
    }

    /** @return declared index of each free output (shared: do not modify) */
    public int[] free() {
        return roles.free();
    }
}
