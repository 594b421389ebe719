package dev.lawful.enforce.plan;

/**
 * LU factors (partial pivoting, {@link dev.lawful.enforce.linear.DenseLu}) of the Jacobian blocks that do not
 * depend on the sample: every stage's block and the whole block A = ∂C/∂y_c. Present for the constant-affine tier
 * and for affine law sets whose output coefficients are constants. Shared arrays, never modified.
 *
 * @param stageLu    per stage, its m×m factors
 * @param stagePivot per stage, its pivots
 * @param wholeLu    factors of A (n×n), for the gradients
 * @param wholePivot pivots of A
 */
public record ConstantBlocks(double[][] stageLu, int[][] stagePivot, double[] wholeLu, int[] wholePivot) {
}
