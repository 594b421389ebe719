/**
 * Exact enforcement of a {@link dev.lawful.algebra.LawSet} on batches: completion (the layer computes n outputs
 * so every law holds), projection (the nearest outputs on the laws in a chosen metric), the soft penalty for
 * comparison, and residual reports. Everything works on flat row-major {@code double[]} or {@code float[]}
 * batches and computes in double.
 */
package dev.lawful.enforce;
