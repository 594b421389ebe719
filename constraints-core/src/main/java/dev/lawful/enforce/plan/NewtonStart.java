package dev.lawful.enforce.plan;

import dev.lawful.algebra.LawEvaluator;

/**
 * Where Newton starts each completed output: the law text's {@code guess} expressions where given (evaluated per
 * sample from inputs and free outputs), fixed generic values elsewhere. Shared arrays, never modified.
 *
 * @param guesses evaluator of the guess expressions (one "law" per guess), or null when there are none
 * @param target  per guess: the completed index it starts
 * @param start   per completed index: the value used without a guess (or when the guess is not finite)
 */
public record NewtonStart(LawEvaluator guesses, int[] target, double[] start) {
}
