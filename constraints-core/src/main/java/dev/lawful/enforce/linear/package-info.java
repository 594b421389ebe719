/**
 * Small dense linear algebra on caller-owned arrays, for per-sample solves that allocate nothing: LU with partial
 * pivoting ({@link dev.lawful.enforce.linear.DenseLu}), and the dual active-set method of Goldfarb and Idnani for
 * strictly convex quadratic programmes with linear inequalities ({@link dev.lawful.enforce.linear.DenseQp}, with its
 * KKT certificate {@link dev.lawful.enforce.linear.KktCheck}), the step that will keep outputs inside their limits.
 *
 * <p>Internal: public only so that the planning and solving packages can share it; not part of the supported API.
 */
package dev.lawful.enforce.linear;
