package dev.lawful.enforce;

/**
 * What an enforcer does with a sample it cannot enforce: a NaN or infinite input, a singular system, a Newton
 * iteration that does not converge. Never silently wrong numbers: either the call fails, or the bad rows are NaN
 * and flagged in a status mask.
 */
public enum OnBadSample {
    /** Fail with an {@link EnforcementException} naming the first bad sample and the laws involved (the default). */
    THROW,
    /** Fill the bad sample's outputs (and gradients) with NaN and mark it in the caller's status mask. */
    MASK
}
