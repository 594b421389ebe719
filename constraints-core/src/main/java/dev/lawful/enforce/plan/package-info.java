/**
 * Build-time decisions of a completion, made once and kept in an immutable
 * {@link dev.lawful.enforce.plan.CompletionPlan}: the reference point, the rank check and the choice of completed
 * outputs ({@code OutputChoice}), the tier, the solve order ({@link dev.lawful.enforce.plan.Stages}), the factors of
 * constant blocks and the constant-affine fold.
 *
 * <p>Internal: public only so that {@code dev.lawful.enforce} and the solvers can use it; not part of the supported
 * API, and it may change in any release. Use {@link dev.lawful.enforce.Completion}.
 */
package dev.lawful.enforce.plan;
