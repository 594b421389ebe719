package dev.lawful.algebra;

import java.util.List;
import java.util.Objects;
import java.util.stream.Collectors;

/**
 * One statement of a law set. Each prints as one line of law text that parses back to an equal declaration.
 */
public sealed interface Declaration {

    /** @return the declaration as one line of law text */
    String text();

    /** Whether a variable is given to the layer (input) or produced by it (output). */
    enum Role {
        INPUT("input"), OUTPUT("output");

        private final String keyword;

        Role(String keyword) {
            this.keyword = keyword;
        }

        /** @return the keyword that declares it */
        public String keyword() {
            return keyword;
        }
    }

    /**
     * An input or output: a scalar, or a vector of {@code size} elements.
     *
     * @param role   input or output
     * @param name   its name
     * @param vector whether it was declared with a length ({@code x[1]} is a vector of one element)
     * @param size   number of elements (1 for a scalar)
     * @param unit   unit of every element
     */
    record Variable(Role role, String name, boolean vector, int size, Unit unit) implements Declaration {
        /** @throws NullPointerException when the role, name or unit is null */
        public Variable {
            Objects.requireNonNull(role, "role");
            Objects.requireNonNull(name, "name");
            Objects.requireNonNull(unit, "unit");
        }

        @Override
        public String text() {
            return role.keyword() + " " + name + (vector ? "[" + size + "]" : "") + unitSuffix(unit);
        }
    }

    /**
     * A named constant: a scalar or a vector of finite numbers, in {@code unit}.
     *
     * @param name   its name
     * @param vector whether it was written as a vector literal
     * @param values the numbers as written (in {@code unit}, not yet converted to SI)
     * @param unit   the unit of every element
     */
    record Constant(String name, boolean vector, List<Double> values, Unit unit) implements Declaration {
        /**
         * Keeps an unmodifiable copy of the values.
         *
         * @throws NullPointerException when the name, unit, values or a value is null
         */
        public Constant {
            Objects.requireNonNull(name, "name");
            Objects.requireNonNull(unit, "unit");
            values = List.copyOf(values);
        }

        /** @return number of elements (1 for a scalar) */
        public int size() {
            return values.size();
        }

        @Override
        public String text() {
            String v = vector
                    ? values.stream().map(ExprPrinter::number).collect(Collectors.joining(", ", "[", "]"))
                    : ExprPrinter.number(values.get(0));
            return "const " + name + " = " + v + unitSuffix(unit);
        }
    }

    /**
     * A named intermediate expression; its unit and shape follow from the expression.
     *
     * @param name its name
     * @param expr its value
     */
    record Definition(String name, Expr expr) implements Declaration {
        /** @throws NullPointerException when the name or expression is null */
        public Definition {
            Objects.requireNonNull(name, "name");
            Objects.requireNonNull(expr, "expr");
        }

        @Override
        public String text() {
            return "let " + name + " = " + ExprPrinter.print(expr);
        }
    }

    /**
     * A named law {@code lhs = rhs}; a vector law stands for one law per element, named {@code name[i]}.
     *
     * @param name its name
     * @param lhs  left-hand side
     * @param rhs  right-hand side
     */
    record Law(String name, Expr lhs, Expr rhs) implements Declaration {
        /** @throws NullPointerException when the name or a side is null */
        public Law {
            Objects.requireNonNull(name, "name");
            Objects.requireNonNull(lhs, "lhs");
            Objects.requireNonNull(rhs, "rhs");
        }

        @Override
        public String text() {
            return "law " + name + ": " + ExprPrinter.print(lhs) + " = " + ExprPrinter.print(rhs);
        }
    }

    /** The relation between two neighbouring parts of a limit. */
    enum Relation {
        /** {@code <=}: the left part is at most the right one */
        AT_MOST("<="),
        /** {@code >=}: the left part is at least the right one */
        AT_LEAST(">=");

        private final String symbol;

        Relation(String symbol) {
            this.symbol = symbol;
        }

        /** @return how the relation is written */
        public String symbol() {
            return symbol;
        }
    }

    /**
     * A named limit: an inequality that must hold together with the laws, {@code a >= b}, {@code a <= b}, or a
     * two-sided chain {@code lo <= e <= hi} (or {@code hi >= e >= lo}). A vector limit stands for one scalar limit
     * per element, like a vector law.
     *
     * @param name      its name (laws and limits share one namespace)
     * @param parts     the two or three expressions, as written from left to right
     * @param relations the relation between each part and the next: one fewer than the parts, all the same
     */
    record Limit(String name, List<Expr> parts, List<Relation> relations) implements Declaration {
        /**
         * Keeps unmodifiable copies of the parts and relations.
         *
         * @throws IllegalArgumentException when there are not two or three parts, not one relation fewer, or a
         *                                  chain mixes {@code <=} and {@code >=} (which would bound nothing)
         * @throws NullPointerException     when the name, a list or an element is null
         */
        public Limit {
            Objects.requireNonNull(name, "name");
            parts = List.copyOf(parts);
            relations = List.copyOf(relations);
            if (parts.size() < 2 || parts.size() > 3 || relations.size() != parts.size() - 1) {
                throw new IllegalArgumentException("a limit has two or three parts and one relation fewer, found "
                        + parts.size() + " parts and " + relations.size() + " relations");
            }
            if (relations.size() == 2 && relations.get(0) != relations.get(1)) {
                throw new IllegalArgumentException("a two-sided limit uses one relation twice ('lo <= e <= hi' or"
                        + " 'hi >= e >= lo')");
            }
        }

        /** @return whether it bounds its middle part from both sides ({@code lo <= e <= hi}) */
        public boolean twoSided() {
            return parts.size() == 3;
        }

        @Override
        public String text() {
            StringBuilder sb = new StringBuilder("limit ").append(name).append(": ")
                    .append(ExprPrinter.print(parts.get(0)));
            for (int i = 0; i < relations.size(); i++) {
                sb.append(' ').append(relations.get(i).symbol()).append(' ').append(ExprPrinter.print(parts.get(i + 1)));
            }
            return sb.toString();
        }
    }

    /**
     * Which outputs the layer computes from the laws (the others are predicted by the network).
     *
     * @param targets output references: a whole output ({@link Expr.Name}), one element ({@link Expr.Index}) or a
     *                slice ({@link Expr.Slice})
     */
    record Completion(List<Expr> targets) implements Declaration {
        /**
         * Keeps an unmodifiable copy of the targets.
         *
         * @throws IllegalArgumentException when a target is not a name, an element or a slice
         * @throws NullPointerException     when the list or a target is null
         */
        public Completion {
            targets = List.copyOf(targets);
            for (Expr t : targets) {
                if (!(t instanceof Expr.Name || t instanceof Expr.Index || t instanceof Expr.Slice)) {
                    throw new IllegalArgumentException("a completed output is a name, an element or a slice, found "
                            + ExprPrinter.print(t));
                }
            }
        }

        @Override
        public String text() {
            return "complete " + targets.stream().map(ExprPrinter::print).collect(Collectors.joining(", "));
        }
    }

    /**
     * A starting value for completed outputs of a nonlinear law set, which picks the root Newton converges to
     * (a quadratic energy law has two). The value may use inputs, constants, definitions and free outputs, never a
     * completed output.
     *
     * @param target the output, element or slice the guess is for
     * @param value  its starting value, in the output's unit (scalar, or a vector of the target's length)
     */
    record Guess(Expr target, Expr value) implements Declaration {
        /**
         * @throws IllegalArgumentException when the target is not a name, an element or a slice
         * @throws NullPointerException     when the value is null
         */
        public Guess {
            Objects.requireNonNull(value, "value");
            if (!(target instanceof Expr.Name || target instanceof Expr.Index || target instanceof Expr.Slice)) {
                throw new IllegalArgumentException("a guess is for a name, an element or a slice, found "
                        + (target == null ? "null" : ExprPrinter.print(target)));
            }
        }

        @Override
        public String text() {
            return "guess " + ExprPrinter.print(target) + " = " + ExprPrinter.print(value);
        }
    }

    private static String unitSuffix(Unit unit) {
        return unit.text().isEmpty() ? "" : " " + unit.text();
    }
}
