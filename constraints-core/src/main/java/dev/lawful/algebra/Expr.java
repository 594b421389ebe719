package dev.lawful.algebra;

import java.util.List;
import java.util.Objects;

/**
 * An expression of the law language, as written (vectors are not yet expanded into elements). Values carry no
 * source positions, so two expressions that print alike are equal; the parser keeps positions on the side.
 */
public sealed interface Expr {

    /** A non-negative numeric literal (a leading minus is a {@link Neg}). */
    record Num(double value) implements Expr {
        /** @throws IllegalArgumentException when the value is not finite */
        public Num {
            if (!Double.isFinite(value)) {
                throw new IllegalArgumentException("a literal must be finite, found " + value);
            }
        }
    }

    /** A reference to a declared input, output, constant or definition, the whole of it. */
    record Name(String name) implements Expr {
        /** @throws NullPointerException when the name is null */
        public Name {
            Objects.requireNonNull(name, "name");
        }
    }

    /** One element {@code name[index]} of a declared vector, zero-based. */
    record Index(String name, int index) implements Expr {
        /** @throws NullPointerException when the name is null */
        public Index {
            Objects.requireNonNull(name, "name");
        }
    }

    /** The elements {@code name[from:to]} of a declared vector, half-open and zero-based. */
    record Slice(String name, int from, int to) implements Expr {
        /** @throws NullPointerException when the name is null */
        public Slice {
            Objects.requireNonNull(name, "name");
        }
    }

    /** Negation {@code -operand}. */
    record Neg(Expr operand) implements Expr {
        /** @throws NullPointerException when the operand is null */
        public Neg {
            Objects.requireNonNull(operand, "operand");
        }
    }

    /** A binary operation, element-wise on vectors with scalar broadcasting. */
    record Binary(Op op, Expr left, Expr right) implements Expr {
        /** @throws NullPointerException when the operator or an operand is null */
        public Binary {
            Objects.requireNonNull(op, "op");
            Objects.requireNonNull(left, "left");
            Objects.requireNonNull(right, "right");
        }
    }

    /** A call of a built-in function or reduction, such as {@code exp(x)} or {@code dot(a, b)}. */
    record Call(String function, List<Expr> args) implements Expr {
        /**
         * Keeps an unmodifiable copy of the arguments.
         *
         * @throws NullPointerException when the function name, the list or an argument is null
         */
        public Call {
            Objects.requireNonNull(function, "function");
            args = List.copyOf(args);
        }
    }

    /** A vector literal {@code [e0, e1, ...]} of scalar expressions. */
    record Vector(List<Expr> elements) implements Expr {
        /**
         * Keeps an unmodifiable copy of the elements.
         *
         * @throws NullPointerException when the list or an element is null
         */
        public Vector {
            elements = List.copyOf(elements);
        }
    }

    /** Binary operators, with their symbol and precedence (higher binds tighter). */
    enum Op {
        ADD("+", 1), SUB("-", 1), MUL("*", 2), DIV("/", 2), POW("^", 4);

        private final String symbol;
        private final int precedence;

        Op(String symbol, int precedence) {
            this.symbol = symbol;
            this.precedence = precedence;
        }

        /** @return the operator as written */
        public String symbol() {
            return symbol;
        }

        /** @return the binding strength: 1 for + -, 2 for * /, 4 for ^ (unary minus is 3) */
        public int precedence() {
            return precedence;
        }
    }
}
