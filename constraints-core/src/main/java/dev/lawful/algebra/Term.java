package dev.lawful.algebra;

import java.util.Arrays;
import java.util.Map;

/**
 * A scalar expression node after vectors are expanded into elements: constants, variables (an input or output
 * element), n-ary sums, negation, products, quotients, powers and elementary functions. Nodes are hash-consed by
 * their {@link TermPool}, so equal sub-expressions are one node (common sub-expressions are shared, and an
 * expression is a DAG, never an exponentially large tree). Ids grow children-first, so every algorithm here runs
 * over id order with no recursion and no risk to the stack.
 *
 * <p>Variables are numbered in one space: inputs {@code 0 .. inputWidth-1}, then outputs. A variable holds a value
 * in its declared unit; the expansion multiplies it by the unit's SI factor, so every expression above the
 * variables computes in coherent SI units.
 */
public final class Term {
    /** Node kinds. */
    public enum Kind { CONST, VAR, SUM, NEG, MUL, DIV, POW, FN }

    final int id;
    final Kind kind;
    final double value;
    final int variable;
    final Function function;
    final Term[] args;
    final TermPool pool;

    Term(TermPool pool, int id, Kind kind, double value, int variable, Function function, Term[] args) {
        this.pool = pool;
        this.id = id;
        this.kind = kind;
        this.value = value;
        this.variable = variable;
        this.function = function;
        this.args = args;
    }

    /** @return the node kind */
    public Kind kind() {
        return kind;
    }

    /** @return the value of a {@link Kind#CONST} node */
    public double constant() {
        return value;
    }

    /** @return the variable index of a {@link Kind#VAR} node */
    public int variable() {
        return variable;
    }

    /** @return the function of a {@link Kind#FN} node */
    public Function function() {
        return function;
    }

    /** @return the operands (a copy) */
    public Term[] args() {
        return args.clone();
    }

    /** @return whether this is the constant {@code v} */
    public boolean isConstant(double v) {
        return kind == Kind.CONST && value == v;
    }

    /**
     * Evaluates this expression in double precision with the same arithmetic as the compiled evaluator (sums are
     * Neumaier-compensated, functions come from {@link StrictMath}).
     *
     * @param variables the value of every variable, inputs then outputs, in their declared units (the expansion
     *                  multiplies each by its unit's SI factor)
     * @return the value, in coherent SI units
     */
    public double evaluate(double[] variables) {
        return pool.evaluate(this, variables);
    }

    /**
     * @param variable a variable index (inputs first, then outputs)
     * @return the exact symbolic partial derivative, simplified (constant folding, 0 and 1 identities)
     */
    public Term derivative(int variable) {
        return pool.derivative(this, variable);
    }

    /** @return every variable's nonzero partial derivative, keyed by variable index in ascending order */
    public Map<Integer, Term> gradient() {
        return pool.gradient(this);
    }

    /** @return the sorted indices of the variables this expression depends on */
    public int[] variables() {
        return pool.variables(this);
    }

    /** @return the expression in law-language syntax, with variables named as {@code name} or {@code name[i]} */
    @Override
    public String toString() {
        return pool.print(this);
    }

    @Override
    public boolean equals(Object o) {
        return this == o;
    }

    @Override
    public int hashCode() {
        return id;
    }

    /** Structural key for hash-consing: the node's own data plus its operands' ids. */
    static final class Key {
        private final Kind kind;
        private final long bits;
        private final int variable;
        private final Function function;
        private final int[] argIds;
        private final int hash;

        Key(Kind kind, double value, int variable, Function function, Term[] args) {
            this.kind = kind;
            this.bits = Double.doubleToLongBits(value);
            this.variable = variable;
            this.function = function;
            this.argIds = new int[args.length];
            for (int i = 0; i < args.length; i++) {
                argIds[i] = args[i].id;
            }
            int h = kind.hashCode();
            h = 31 * h + Long.hashCode(bits);
            h = 31 * h + variable;
            h = 31 * h + (function == null ? 0 : function.hashCode());
            h = 31 * h + Arrays.hashCode(argIds);
            this.hash = h;
        }

        @Override
        public boolean equals(Object o) {
            return o instanceof Key k && k.kind == kind && k.bits == bits && k.variable == variable
                    && k.function == function && Arrays.equals(k.argIds, argIds);
        }

        @Override
        public int hashCode() {
            return hash;
        }
    }
}
