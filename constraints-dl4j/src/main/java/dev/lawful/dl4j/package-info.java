/**
 * Deeplearning4j adapter: layers and vertices that complete a network's free outputs so that every law of a
 * {@code LawSet} holds exactly. The adapter converts arrays and calls {@code constraints-core}; it does not
 * re-implement the mathematics. (Under construction: the layers arrive with the enforcement engine.)
 */
package dev.lawful.dl4j;
