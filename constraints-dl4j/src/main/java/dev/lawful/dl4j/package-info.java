/**
 * Deeplearning4j adapter: exact-law layers and vertices that complete a network's free outputs so that every law
 * of a {@link dev.lawful.algebra.LawSet} holds, and the soft-penalty loss for comparison. The adapter converts
 * arrays and calls {@code constraints-core}; it does not re-implement the mathematics.
 *
 * <ul>
 *   <li>{@link dev.lawful.dl4j.LawLayer}: for a MultiLayerNetwork, after a head that predicts the free outputs;
 *       law sets that need no network inputs.</li>
 *   <li>{@link dev.lawful.dl4j.LawVertex}: for a ComputationGraph, with the network inputs x and the head's free
 *       outputs z as its two inputs; {@link dev.lawful.dl4j.ConstrainedGraph} wires input, hidden layers, head,
 *       law vertex and loss.</li>
 *   <li>{@link dev.lawful.dl4j.LawPenaltyLoss}: MSE plus weighted squared law residuals, the soft baseline.</li>
 *   <li>{@link dev.lawful.dl4j.LawSpec}: the law text, stored readably in the saved configuration.</li>
 *   <li>{@link dev.lawful.dl4j.LawDeployment}: finds the law specs of a network or saved model, so a JVM host
 *       can run the completion with the core alone.</li>
 * </ul>
 */
package dev.lawful.dl4j;
