package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * Creates {@link Term}s, hash-consed and simplified on construction: constants fold, sums flatten and drop zeros,
 * {@code x*1}, {@code x*0}, {@code x/1}, {@code x^1}, {@code x^0} and {@code --x} reduce, and a negated sum
 * becomes a sum of negated terms (so a law's residual is one flat sum whose terms give its natural scale).
 * Differentiation is symbolic reverse accumulation over the DAG. Not thread-safe on its own: its public entry
 * points synchronise on the pool.
 */
final class TermPool {
    /** Thrown when a law set expands beyond {@link Limits#MAX_SCALAR_NODES}. */
    static final class TooLarge extends RuntimeException {
        private static final long serialVersionUID = 1L;

        TooLarge() {
            super("law set expands into more than " + Limits.MAX_SCALAR_NODES + " scalar expression nodes", null,
                    false, false);
        }
    }

    private final Map<Term.Key, Term> interned = new HashMap<>();
    private final List<Term> nodes = new ArrayList<>();
    private final String[] variableNames;
    private final Term zero;
    private final Term one;

    /** @param variableNames names of the variables, inputs then outputs, used when printing */
    TermPool(String[] variableNames) {
        this.variableNames = variableNames.clone();
        this.zero = constant(0.0);
        this.one = constant(1.0);
    }

    int size() {
        return nodes.size();
    }

    /** @return the node with id {@code id} */
    Term node(int id) {
        return nodes.get(id);
    }

    int variableCount() {
        return variableNames.length;
    }

    String variableName(int v) {
        return variableNames[v];
    }

    private Term make(Term.Kind kind, double value, int variable, Function function, Term... args) {
        Term.Key key = new Term.Key(kind, value, variable, function, args);
        Term t = interned.get(key);
        if (t == null) {
            if (nodes.size() >= Limits.MAX_SCALAR_NODES) {
                throw new TooLarge();
            }
            t = new Term(this, nodes.size(), kind, value, variable, function, args);
            interned.put(key, t);
            nodes.add(t);
        }
        return t;
    }

    // ---- construction with simplification --------------------------------------------------------------------

    Term constant(double v) {
        // -0.0 and 0.0 are one constant: the sign of a zero term never matters to a law
        return make(Term.Kind.CONST, v == 0 ? 0.0 : v, -1, null);
    }

    Term variable(int v) {
        if (v < 0 || v >= variableNames.length) {
            throw new IllegalArgumentException("variable " + v + " is outside 0.." + (variableNames.length - 1));
        }
        return make(Term.Kind.VAR, 0, v, null);
    }

    Term sum(List<Term> terms) {
        List<Term> flat = new ArrayList<>(terms.size());
        double constant = 0;
        boolean hasConstant = false;
        for (Term t : terms) {
            if (t.kind == Term.Kind.SUM) {
                for (Term a : t.args) {
                    if (a.kind == Term.Kind.CONST) {
                        constant += a.value;
                        hasConstant = true;
                    } else {
                        flat.add(a);
                    }
                }
            } else if (t.kind == Term.Kind.CONST) {
                constant += t.value;
                hasConstant = true;
            } else {
                flat.add(t);
            }
        }
        if (hasConstant && constant != 0) {
            flat.add(constant(constant));
        }
        if (flat.isEmpty()) {
            return zero;
        }
        if (flat.size() == 1) {
            return flat.get(0);
        }
        return make(Term.Kind.SUM, 0, -1, null, flat.toArray(new Term[0]));
    }

    Term add(Term a, Term b) {
        return sum(List.of(a, b));
    }

    Term sub(Term a, Term b) {
        return sum(List.of(a, neg(b)));
    }

    Term neg(Term a) {
        switch (a.kind) {
            case CONST:
                return constant(-a.value);
            case NEG:
                return a.args[0];
            case SUM: {
                List<Term> negated = new ArrayList<>(a.args.length);
                for (Term t : a.args) {
                    negated.add(neg(t));
                }
                return sum(negated);
            }
            case MUL:
                if (a.args[0].kind == Term.Kind.CONST) {
                    return mul(constant(-a.args[0].value), a.args[1]);
                }
                return make(Term.Kind.NEG, 0, -1, null, a);
            default:
                return make(Term.Kind.NEG, 0, -1, null, a);
        }
    }

    Term mul(Term a, Term b) {
        if (b.kind == Term.Kind.CONST && a.kind != Term.Kind.CONST) {
            Term t = a;
            a = b;
            b = t;
        }
        if (a.kind == Term.Kind.CONST) {
            if (b.kind == Term.Kind.CONST) {
                return constant(a.value * b.value);
            }
            if (a.value == 0) {
                return zero;
            }
            if (a.value == 1) {
                return b;
            }
            if (a.value == -1) {
                return neg(b);
            }
            if (b.kind == Term.Kind.MUL && b.args[0].kind == Term.Kind.CONST) {
                return mul(constant(a.value * b.args[0].value), b.args[1]);
            }
            if (b.kind == Term.Kind.NEG) {
                return mul(constant(-a.value), b.args[0]);
            }
        }
        return make(Term.Kind.MUL, 0, -1, null, a, b);
    }

    Term div(Term a, Term b) {
        if (b.kind == Term.Kind.CONST) {
            if (a.kind == Term.Kind.CONST) {
                return constant(a.value / b.value);
            }
            if (b.value == 1) {
                return a;
            }
            if (b.value == -1) {
                return neg(a);
            }
        }
        if (a.isConstant(0)) {
            return zero;
        }
        return make(Term.Kind.DIV, 0, -1, null, a, b);
    }

    Term pow(Term a, Term b) {
        if (b.kind == Term.Kind.CONST) {
            if (a.kind == Term.Kind.CONST) {
                return constant(Kernels.pow(a.value, b.value));
            }
            if (b.value == 0) {
                return one;
            }
            if (b.value == 1) {
                return a;
            }
        }
        if (a.isConstant(1)) {
            return one;
        }
        return make(Term.Kind.POW, 0, -1, null, a, b);
    }

    Term fn(Function f, Term a) {
        if (a.kind == Term.Kind.CONST) {
            return constant(f.apply(a.value));
        }
        if (f == Function.SIGN && a.kind == Term.Kind.CONST) {
            return constant(Math.signum(a.value));
        }
        return make(Term.Kind.FN, 0, -1, f, a);
    }

    // ---- analysis --------------------------------------------------------------------------------------------

    private int[] marks = new int[1024];
    private int stamp;

    /**
     * @return the nodes reachable from {@code root}, in ascending id order (children before parents); the cost is
     *         proportional to the number of reachable nodes, not to the size of the pool
     */
    synchronized Term[] reachable(Term root) {
        if (marks.length < nodes.size()) {
            marks = Arrays.copyOf(marks, Math.max(nodes.size(), marks.length * 2));
        }
        if (++stamp == Integer.MAX_VALUE) {
            Arrays.fill(marks, 0);
            stamp = 1;
        }
        int[] stack = new int[16];
        int[] found = new int[16];
        int top = 0;
        int count = 0;
        stack[top++] = root.id;
        marks[root.id] = stamp;
        while (top > 0) {
            int id = stack[--top];
            if (count == found.length) {
                found = Arrays.copyOf(found, count * 2);
            }
            found[count++] = id;
            for (Term a : nodes.get(id).args) {
                if (marks[a.id] != stamp) {
                    marks[a.id] = stamp;
                    if (top == stack.length) {
                        stack = Arrays.copyOf(stack, top * 2);
                    }
                    stack[top++] = a.id;
                }
            }
        }
        Arrays.sort(found, 0, count);
        Term[] out = new Term[count];
        for (int k = 0; k < count; k++) {
            out[k] = nodes.get(found[k]);
        }
        return out;
    }

    synchronized int[] variables(Term root) {
        return Arrays.stream(reachable(root)).filter(t -> t.kind == Term.Kind.VAR).mapToInt(t -> t.variable)
                .sorted().toArray();
    }

    synchronized double evaluate(Term root, double[] variables) {
        if (variables.length != variableNames.length) {
            throw new IllegalArgumentException("expected " + variableNames.length + " variable values, found "
                    + variables.length);
        }
        Term[] order = reachable(root);
        Map<Integer, Integer> slot = new HashMap<>();
        double[] v = new double[order.length];
        for (int i = 0; i < order.length; i++) {
            slot.put(order[i].id, i);
        }
        for (int i = 0; i < order.length; i++) {
            Term t = order[i];
            double[] a = new double[t.args.length];
            for (int k = 0; k < a.length; k++) {
                a[k] = v[slot.get(t.args[k].id)];
            }
            v[i] = apply(t, a, variables);
        }
        return v[order.length - 1];
    }

    /** The arithmetic of one node; the compiled evaluator does exactly the same operations in the same order. */
    static double apply(Term t, double[] a, double[] variables) {
        switch (t.kind) {
            case CONST: return t.value;
            case VAR: return variables[t.variable];
            case SUM: return Kernels.neumaier(a, a.length);
            case NEG: return -a[0];
            case MUL: return a[0] * a[1];
            case DIV: return a[0] / a[1];
            case POW: return Kernels.pow(a[0], a[1]);
            case FN: return t.function.apply(a[0]);
            default: throw new AssertionError(t.kind);
        }
    }

    /**
     * The magnitude of an expression's addends, used as the natural scale a residual is judged against: the sum
     * of the absolute values of all addends once products are distributed over sums (|c|, |x|, M(a)+M(b),
     * M(a)·M(b), M(a)/|b|; a power or function value counts as one addend). It bounds the rounding error of
     * evaluating the expression (a running error bound), and it is at least the largest addend.
     */
    synchronized Term magnitude(Term root) {
        Map<Integer, Term> m = new HashMap<>();
        for (Term t : reachable(root)) {
            Term v;
            switch (t.kind) {
                case CONST:
                    v = constant(Math.abs(t.value));
                    break;
                case VAR:
                case POW:
                case FN:
                    v = fn(Function.ABS, t);
                    break;
                case SUM: {
                    List<Term> parts = new ArrayList<>(t.args.length);
                    for (Term a : t.args) {
                        parts.add(m.get(a.id));
                    }
                    v = sum(parts);
                    break;
                }
                case NEG:
                    v = m.get(t.args[0].id);
                    break;
                case MUL:
                    v = mul(m.get(t.args[0].id), m.get(t.args[1].id));
                    break;
                case DIV:
                    v = div(m.get(t.args[0].id), fn(Function.ABS, t.args[1]));
                    break;
                default:
                    throw new AssertionError(t.kind);
            }
            m.put(t.id, v);
        }
        return m.get(root.id);
    }

    /**
     * The number of rounded operations an addend passes through on its way into the expression's value: products,
     * quotients, powers and functions count one each along the deepest path (sums are compensated and count
     * none). With it, |computed − exact| ≤ (depth + 1)·2⁻⁵³·magnitude up to second-order terms.
     */
    synchronized int roundingDepth(Term root) {
        Map<Integer, Integer> d = new HashMap<>();
        int deepest = 0;
        for (Term t : reachable(root)) {
            int v = 0;
            for (Term a : t.args) {
                v = Math.max(v, d.get(a.id));
            }
            if (t.kind == Term.Kind.MUL || t.kind == Term.Kind.DIV || t.kind == Term.Kind.POW
                    || t.kind == Term.Kind.FN) {
                v++;
            }
            d.put(t.id, v);
            deepest = v;
        }
        return deepest;
    }

    synchronized Term derivative(Term root, int variable) {
        Term d = gradient(root).get(variable);
        return d == null ? zero : d;
    }

    /**
     * Symbolic reverse accumulation: the adjoint of each node is the sum of its parents' contributions, visited
     * parents first (descending id), so each node's adjoint is complete before it is propagated.
     */
    synchronized Map<Integer, Term> gradient(Term root) {
        Term[] order = reachable(root);
        Map<Integer, List<Term>> contributions = new HashMap<>();
        contributions.computeIfAbsent(root.id, k -> new ArrayList<>()).add(one);
        Map<Integer, Term> gradient = new TreeMap<>();
        for (int i = order.length - 1; i >= 0; i--) {
            Term t = order[i];
            List<Term> parts = contributions.remove(t.id);
            if (parts == null) {
                continue;
            }
            Term adj = sum(parts);
            if (adj.isConstant(0)) {
                continue;
            }
            switch (t.kind) {
                case CONST:
                    break;
                case VAR:
                    gradient.merge(t.variable, adj, this::add);
                    break;
                case SUM:
                    for (Term a : t.args) {
                        push(contributions, a, adj);
                    }
                    break;
                case NEG:
                    push(contributions, t.args[0], neg(adj));
                    break;
                case MUL:
                    push(contributions, t.args[0], mul(adj, t.args[1]));
                    push(contributions, t.args[1], mul(adj, t.args[0]));
                    break;
                case DIV:
                    push(contributions, t.args[0], div(adj, t.args[1]));
                    push(contributions, t.args[1], neg(mul(adj, div(t, t.args[1]))));
                    break;
                case POW: {
                    Term base = t.args[0];
                    Term exponent = t.args[1];
                    if (exponent.kind == Term.Kind.CONST) {
                        push(contributions, base, mul(adj, mul(exponent, pow(base, constant(exponent.value - 1)))));
                    } else {
                        push(contributions, base, mul(adj, mul(exponent, pow(base, sub(exponent, one)))));
                        push(contributions, exponent, mul(adj, mul(t, fn(Function.LOG, base))));
                    }
                    break;
                }
                case FN:
                    push(contributions, t.args[0], mul(adj, derivativeOf(t)));
                    break;
                default:
                    throw new AssertionError(t.kind);
            }
        }
        gradient.values().removeIf(g -> g.isConstant(0));
        return gradient;
    }

    private static void push(Map<Integer, List<Term>> contributions, Term node, Term part) {
        if (!part.isConstant(0)) {
            contributions.computeIfAbsent(node.id, k -> new ArrayList<>()).add(part);
        }
    }

    /** @return f'(a) for the function node {@code t = f(a)}, reusing {@code t} where the derivative allows */
    Term derivativeOf(Term t) {
        Term a = t.args[0];
        switch (t.function) {
            case EXP: return t;
            case LOG: return div(one, a);
            case LOG10: return div(one, mul(constant(StrictMath.log(10)), a));
            case SQRT: return div(one, mul(constant(2), t));
            case SIN: return fn(Function.COS, a);
            case COS: return neg(fn(Function.SIN, a));
            case TAN: return add(one, mul(t, t));
            case ASIN: return div(one, fn(Function.SQRT, sub(one, mul(a, a))));
            case ACOS: return neg(div(one, fn(Function.SQRT, sub(one, mul(a, a)))));
            case ATAN: return div(one, add(one, mul(a, a)));
            case SINH: return fn(Function.COSH, a);
            case COSH: return fn(Function.SINH, a);
            case TANH: return sub(one, mul(t, t));
            case ABS: return fn(Function.SIGN, a);
            case SIGN: return zero;
            default: throw new AssertionError(t.function);
        }
    }

    // ---- printing --------------------------------------------------------------------------------------------

    synchronized String print(Term t) {
        StringBuilder sb = new StringBuilder();
        print(t, sb, 0, 0);
        return sb.toString();
    }

    private static final int PRINT_DEPTH = 200;

    private void print(Term t, StringBuilder sb, int context, int depth) {
        if (depth > PRINT_DEPTH) {
            sb.append("...");
            return;
        }
        int p = precedence(t);
        boolean parens = p < context;
        if (parens) {
            sb.append('(');
        }
        switch (t.kind) {
            case CONST:
                sb.append(t.value < 0 ? "-" : "").append(ExprPrinter.number(Math.abs(t.value)));
                break;
            case VAR:
                sb.append(variableNames[t.variable]);
                break;
            case SUM:
                print(t.args[0], sb, 2, depth + 1);
                for (int i = 1; i < t.args.length; i++) {
                    printAddend(t.args[i], sb, depth);
                }
                break;
            case NEG:
                sb.append('-');
                print(t.args[0], sb, 4, depth + 1);
                break;
            case MUL:
            case DIV:
                print(t.args[0], sb, 3, depth + 1);
                sb.append(t.kind == Term.Kind.MUL ? " * " : " / ");
                print(t.args[1], sb, 4, depth + 1);
                break;
            case POW:
                print(t.args[0], sb, 6, depth + 1);
                sb.append('^');
                print(t.args[1], sb, 5, depth + 1);
                break;
            case FN:
                sb.append(t.function.spelling()).append('(');
                print(t.args[0], sb, 0, depth + 1);
                sb.append(')');
                break;
            default:
                throw new AssertionError(t.kind);
        }
        if (parens) {
            sb.append(')');
        }
    }

    /** Prints a later addend of a sum, as a subtraction when it is negated or has a negative factor. */
    private void printAddend(Term a, StringBuilder sb, int depth) {
        if (a.kind == Term.Kind.NEG) {
            sb.append(" - ");
            print(a.args[0], sb, 2, depth + 1);
        } else if (a.kind == Term.Kind.CONST && a.value < 0) {
            sb.append(" - ").append(ExprPrinter.number(-a.value));
        } else if (a.kind == Term.Kind.MUL && a.args[0].kind == Term.Kind.CONST && a.args[0].value < 0) {
            sb.append(" - ").append(ExprPrinter.number(-a.args[0].value)).append(" * ");
            print(a.args[1], sb, 4, depth + 1);
        } else {
            sb.append(" + ");
            print(a, sb, 2, depth + 1);
        }
    }

    private static int precedence(Term t) {
        switch (t.kind) {
            case SUM: return 1;
            case MUL:
            case DIV: return 3;
            case NEG: return 4;
            case POW: return 5;
            case CONST: return t.value < 0 ? 4 : 10;
            default: return 10;
        }
    }
}
