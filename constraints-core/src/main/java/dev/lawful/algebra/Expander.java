package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * Expands a checked law set into scalar {@link Term}s: one residual {@code lhs - rhs} per law element, in SI
 * units. Definitions are expanded once each, in declaration order, so references never recurse into other
 * declarations and the recursion depth is bounded by the nesting limit of one expression.
 */
final class Expander {
    /** The elements of a value: {@code shape} 0 is a scalar held in {@code elements[0]}. */
    private record Values(int shape, Term[] elements) {
        Term at(int i) {
            return shape == 0 ? elements[0] : elements[i];
        }

        int size() {
            return Math.max(shape, 1);
        }
    }

    private final LawSet laws;
    private final TermPool pool;
    private final Map<String, Values> values = new HashMap<>();

    Expander(LawSet laws, TermPool pool) {
        this.laws = laws;
        this.pool = pool;
    }

    /** One scalar law: its element name, declaration, element index (-1 for a scalar law) and residual. */
    record ScalarLaw(String name, Declaration.Law law, int element, Term residual) {
    }

    /**
     * One scalar limit before its analysis: its name, declaration, element index (-1 for a scalar limit), the value
     * g that is at least 0 inside it, and whether it bounds the limited part (the middle of a chain, else the left
     * part) from below.
     */
    record RawLimit(String name, Declaration.Limit limit, int element, Term value, boolean lower) {
    }

    private final List<RawLimit> limits = new ArrayList<>();

    /** @return the scalar limits, in declaration order, element by element, a chain's lower piece first */
    List<RawLimit> limits() {
        return limits;
    }

    List<ScalarLaw> expand() {
        List<ScalarLaw> out = new ArrayList<>();
        for (Declaration d : laws.declarations()) {
            if (d instanceof Declaration.Variable v) {
                int base = v.role() == Declaration.Role.INPUT ? laws.inputOffset(v.name())
                        : laws.inputWidth() + laws.outputOffset(v.name());
                Term[] e = new Term[v.size()];
                Term factor = pool.constant(v.unit().factor());
                for (int i = 0; i < e.length; i++) {
                    e[i] = pool.mul(factor, pool.variable(base + i));
                }
                values.put(v.name(), new Values(v.vector() ? v.size() : 0, e));
            } else if (d instanceof Declaration.Constant c) {
                Term[] e = new Term[c.size()];
                for (int i = 0; i < e.length; i++) {
                    e[i] = pool.constant(c.values().get(i) * c.unit().factor());
                }
                values.put(c.name(), new Values(c.vector() ? c.size() : 0, e));
            } else if (d instanceof Declaration.Definition def) {
                values.put(def.name(), expr(def.expr()));
            } else if (d instanceof Declaration.Law law) {
                Values l = expr(law.lhs());
                Values r = expr(law.rhs());
                int shape = Math.max(l.shape(), r.shape());
                for (int i = 0; i < Math.max(shape, 1); i++) {
                    String name = shape == 0 ? law.name() : law.name() + "[" + i + "]";
                    out.add(new ScalarLaw(name, law, shape == 0 ? -1 : i, pool.sub(l.at(i), r.at(i))));
                }
            } else if (d instanceof Declaration.Limit limit) {
                limit(limit);
            } else if (d instanceof Declaration.Guess g) {
                guess(g);
            }
        }
        return out;
    }

    /** a >= b gives g = a - b, a <= b gives g = b - a; a chain gives e - lo (lower) and hi - e (upper). */
    private void limit(Declaration.Limit limit) {
        List<Values> parts = new ArrayList<>();
        int shape = 0;
        for (Expr e : limit.parts()) {
            Values v = expr(e);
            parts.add(v);
            shape = Math.max(shape, v.shape());
        }
        boolean atMost = limit.relations().get(0) == Declaration.Relation.AT_MOST;
        for (int i = 0; i < Math.max(shape, 1); i++) {
            String name = shape == 0 ? limit.name() : limit.name() + "[" + i + "]";
            int element = shape == 0 ? -1 : i;
            Term first = parts.get(0).at(i);
            Term second = parts.get(1).at(i);
            if (!limit.twoSided()) {
                Term g = atMost ? pool.sub(second, first) : pool.sub(first, second);
                limits.add(new RawLimit(name, limit, element, g, !atMost));
                continue;
            }
            Term lo = atMost ? first : parts.get(2).at(i);
            Term hi = atMost ? parts.get(2).at(i) : first;
            limits.add(new RawLimit(name + " (lower)", limit, element, pool.sub(second, lo), true));
            limits.add(new RawLimit(name + " (upper)", limit, element, pool.sub(hi, second), false));
        }
    }

    private final Map<Integer, Term> guesses = new java.util.TreeMap<>();

    /** The guess expressions go to the output in its declared unit: SI value divided by the unit's factor. */
    private void guess(Declaration.Guess g) {
        Expr t = g.target();
        String name = t instanceof Expr.Name n ? n.name() : t instanceof Expr.Index i ? i.name() : ((Expr.Slice) t).name();
        Declaration.Variable v = laws.outputs().stream().filter(o -> o.name().equals(name)).findFirst().orElseThrow();
        int from = t instanceof Expr.Index i ? i.index() : t instanceof Expr.Slice sl ? sl.from() : 0;
        int to = t instanceof Expr.Index i ? i.index() + 1 : t instanceof Expr.Slice sl ? sl.to() : v.size();
        Values value = expr(g.value());
        Term toDeclared = pool.constant(1.0 / v.unit().factor());
        int base = laws.outputOffset(name);
        for (int k = from; k < to; k++) {
            guesses.put(base + k, pool.mul(toDeclared, value.at(k - from)));
        }
    }

    /** @return the starting value of each guessed output element (index into the outputs), in declared units */
    Map<Integer, Term> guesses() {
        return guesses;
    }

    private Values expr(Expr e) {
        if (e instanceof Expr.Num n) {
            return scalar(pool.constant(n.value()));
        }
        if (e instanceof Expr.Name n) {
            return values.get(n.name());
        }
        if (e instanceof Expr.Index i) {
            return scalar(values.get(i.name()).elements()[i.index()]);
        }
        if (e instanceof Expr.Slice s) {
            return new Values(s.to() - s.from(), Arrays.copyOfRange(values.get(s.name()).elements(), s.from(), s.to()));
        }
        if (e instanceof Expr.Neg n) {
            Values a = expr(n.operand());
            Term[] out = new Term[a.size()];
            for (int i = 0; i < out.length; i++) {
                out[i] = pool.neg(a.at(i));
            }
            return new Values(a.shape(), out);
        }
        if (e instanceof Expr.Binary b) {
            Values l = expr(b.left());
            Values r = expr(b.right());
            int shape = Math.max(l.shape(), r.shape());
            Term[] out = new Term[Math.max(shape, 1)];
            for (int i = 0; i < out.length; i++) {
                out[i] = binary(b.op(), l.at(i), r.at(i));
            }
            return new Values(shape, out);
        }
        if (e instanceof Expr.Call c) {
            return call(c);
        }
        Expr.Vector v = (Expr.Vector) e;
        Term[] out = new Term[v.elements().size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = expr(v.elements().get(i)).at(0);
        }
        return new Values(out.length, out);
    }

    private Term binary(Expr.Op op, Term a, Term b) {
        switch (op) {
            case ADD: return pool.add(a, b);
            case SUB: return pool.sub(a, b);
            case MUL: return pool.mul(a, b);
            case DIV: return pool.div(a, b);
            default: return pool.pow(a, b);
        }
    }

    private Values call(Expr.Call c) {
        String name = c.function();
        if (name.equals("sum")) {
            Values a = expr(c.args().get(0));
            return scalar(pool.sum(Arrays.asList(a.elements())));
        }
        if (name.equals("dot")) {
            Values a = expr(c.args().get(0));
            Values b = expr(c.args().get(1));
            List<Term> products = new ArrayList<>(a.size());
            for (int i = 0; i < a.size(); i++) {
                products.add(pool.mul(a.at(i), b.at(i)));
            }
            return scalar(pool.sum(products));
        }
        if (name.equals("pow")) {
            Values a = expr(c.args().get(0));
            Values b = expr(c.args().get(1));
            int shape = Math.max(a.shape(), b.shape());
            Term[] out = new Term[Math.max(shape, 1)];
            for (int i = 0; i < out.length; i++) {
                out[i] = pool.pow(a.at(i), b.at(i));
            }
            return new Values(shape, out);
        }
        Function f = Function.named(name);
        Values a = expr(c.args().get(0));
        Term[] out = new Term[a.size()];
        for (int i = 0; i < out.length; i++) {
            out[i] = pool.fn(f, a.at(i));
        }
        return new Values(a.shape(), out);
    }

    /** @return the expanded elements of definition {@code name} and whether it is a vector */
    Term[] definition(String name) {
        Values v = values.get(name);
        return v == null ? null : v.elements().clone();
    }

    /** @return 0 when definition {@code name} is a scalar, else its length */
    int definitionShape(String name) {
        return values.get(name).shape();
    }

    private static Values scalar(Term t) {
        return new Values(0, new Term[] {t});
    }
}
