package dev.lawful.enforce;

/**
 * Whether a {@link Completion} forward call certifies its result against the documented rounding bound.
 *
 * <p>The solve is the same either way; what differs is the last step. {@link #EVERY_SAMPLE} (the default of every
 * entry point) evaluates every law of every sample once more with compensated sums, refines a sample that misses
 * the bound and reports it as not converged if it still does, so a result that comes back OK is certified.
 * {@link #SKIP} returns the solve's result without that evaluation: the residuals are still at rounding level by
 * construction (the constant-affine fold, the staged LU solve, or Newton, which stops only once each stage's laws
 * are within the bound), but a sample whose rounding is unlucky by a few ulps is not refined and nothing certifies
 * it. Non-finite inputs, singular systems, Newton that does not converge and non-finite results are reported under
 * both.
 *
 * <p>{@code SKIP} is meant for training, where the outputs only feed a loss and its gradient: it removes one full
 * evaluation of the laws per sample, which in the constant-affine tier is most of the forward cost. Deployment
 * and any result that is checked, reported or handed to a simulator should use {@code EVERY_SAMPLE}.
 */
public enum BoundCheck {
    /** Check every sample against the documented bound, refining where needed (the default). */
    EVERY_SAMPLE,
    /** Return the solve's result without the final certifying evaluation (training). */
    SKIP
}
