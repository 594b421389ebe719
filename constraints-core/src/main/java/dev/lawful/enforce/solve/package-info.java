/**
 * The per-batch solving behind {@link dev.lawful.enforce.Completion}, one solver per tier behind
 * {@link dev.lawful.enforce.solve.TierSolver} (the constant-affine fold, the staged LU solve, damped Newton), and
 * the pieces they share: the certifying check of the rounding bound, the stage blocks, the implicit-function
 * gradient, the column layout and the failure messages. Each solver instance holds the work arrays of one thread;
 * everything it reads from the {@link dev.lawful.enforce.plan.CompletionPlan} is immutable.
 *
 * <p>Internal: public only so that {@code dev.lawful.enforce} can use it; not part of the supported API, and it may
 * change in any release. Use {@link dev.lawful.enforce.Completion}.
 */
package dev.lawful.enforce.solve;
