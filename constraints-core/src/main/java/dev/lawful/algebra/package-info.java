/**
 * The law language: text or builder to a checked, immutable {@link dev.lawful.algebra.LawSet}, its expansion into
 * scalar residual {@link dev.lawful.algebra.Term}s with exact symbolic derivatives, and the compiled batch
 * {@link dev.lawful.algebra.LawEvaluator}.
 *
 * <p>Pipeline: {@link dev.lawful.algebra.Scanner} (tokens with offsets) &rarr; {@link dev.lawful.algebra.Parser}
 * (recursive descent, grammar in its Javadoc) &rarr; {@code Checker} (names, shapes, units) &rarr;
 * {@link dev.lawful.algebra.LawSet} &rarr; {@link dev.lawful.algebra.ExpandedLaws} (hash-consed scalar terms in SI
 * units) &rarr; {@link dev.lawful.algebra.LawEvaluator} (register code over blocks of samples). Every error of bad
 * law text is a {@link dev.lawful.algebra.LawException} carrying positioned
 * {@link dev.lawful.algebra.Diagnostic}s.
 *
 * <p>A worked example, the element balances of a reformer outlet:
 * <pre>
 * input  feed[6] mol/s           # CH4 H2O CO CO2 H2 N2
 * output out[6]  mol/s
 * const C = [1, 0, 1, 1, 0, 0]   # carbon atoms per molecule
 * law carbon: dot(C, out) = dot(C, feed)
 * complete out[2]
 * </pre>
 * expands to one scalar law {@code out[0] + out[2] + out[3] - feed[0] - feed[2] - feed[3]} in mol/s, whose
 * Jacobian with respect to the outputs has the three entries 1, 1, 1.
 */
package dev.lawful.algebra;
