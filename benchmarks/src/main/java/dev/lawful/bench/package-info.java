/**
 * JMH suites that measure what exactness costs: enforcement kernels, training steps, inference and the law
 * language, each against a hand-written baseline of the same mathematics.
 */
package dev.lawful.bench;
