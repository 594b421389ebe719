package dev.lawful.enforce.plan;

/**
 * The constant-affine fold y_c = M z + N x + k, made once at build time. Shared arrays, never modified.
 *
 * @param m n×freeWidth row-major, row k for completed output k
 * @param n n×inputWidth row-major
 * @param k n constants
 */
public record Fold(double[] m, double[] n, double[] k) {
}
