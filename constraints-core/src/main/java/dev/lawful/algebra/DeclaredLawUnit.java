package dev.lawful.algebra;

import java.util.Collections;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Chooses the unit a law's residual is reported in, in the units the law file declares, so that a law such as
 * {@code R * P = U * U} with R in ohm and P in MW reads {@code ohm MW} rather than the base form
 * {@code kg2 m4 s-6 A-2}. In order of preference:
 * <ol>
 * <li>the unit the checker found, when it follows from one declaration (a declared quantity times pure numbers, a
 * sum of terms in one declared unit, a reduction such as {@code dot(C, out)}): so {@code Q = m * cp * dT} with Q in
 * kW reads {@code kW}, as it always has;</li>
 * <li>a side in one declared unit once repeated units cancel ({@code 2 * P * P / P} is in P's unit), or a sum of
 * terms in one declared unit whose text happens to be the coherent one ({@code W}), which the checker's unit does
 * not tell apart from its fallback;</li>
 * <li>a side that is one product or quotient of declared quantities, with no sum written in it: the product of
 * their units with repeated symbols combined ({@link Units#product}), so {@code m * cp * dT} with kg/s, kJ/(kg K)
 * and K reads {@code kJ/s};</li>
 * <li>otherwise the checker's unit, the coherent SI unit of the law's dimension ({@code W m-2}).</li>
 * </ol>
 * The left side is tried before the right at each step. A definition counts as a declared quantity when its own
 * expression is a product of declared quantities, or a sum of terms in the same declared units (the user named
 * that sum, so it reads as one quantity). Whatever is chosen has the law's dimension and the factor of its text,
 * so residual_SI / factor is the residual in the unit shown.
 */
final class DeclaredLawUnit {
    /** What {@link #units} returns for an expression that is no product of declared quantities (by identity). */
    private static final Map<Unit, Integer> FAILED = Collections.unmodifiableMap(new HashMap<>());

    private final Map<String, Declaration> declared = new HashMap<>();
    /** A definition's units, worked out once: a chain of definitions would otherwise be walked exponentially often. */
    private final Map<String, Map<Unit, Integer>> definitions = new HashMap<>();

    /** @param declarations a checked law set's declarations (every name a law uses is declared) */
    DeclaredLawUnit(List<Declaration> declarations) {
        for (Declaration d : declarations) {
            if (d instanceof Declaration.Variable v) {
                declared.put(v.name(), v);
            } else if (d instanceof Declaration.Constant c) {
                declared.put(c.name(), c);
            } else if (d instanceof Declaration.Definition def) {
                declared.put(def.name(), def);
            }
        }
    }

    /**
     * @param law     a checked law
     * @param checked the unit the checker found for it: a declared unit, or the coherent SI unit of its dimension
     * @return the unit to report the law in, as the class comment describes
     */
    Unit of(Declaration.Law law, Unit checked) {
        Dimension dim = checked.dimension();
        if (!checked.equals(Units.coherent(dim))) {
            return checked;
        }
        Unit unit = either(single(law.lhs(), dim), single(law.rhs(), dim));
        if (unit == null) {
            unit = either(product(law.lhs(), dim), product(law.rhs(), dim));
        }
        return unit != null ? unit : checked;
    }

    private static Unit either(Unit first, Unit second) {
        return first != null ? first : second;
    }

    /** @return the one declared unit {@code side} is in, sums of like terms allowed, or null */
    private Unit single(Expr side, Dimension dim) {
        Map<Unit, Integer> units = units(side, true);
        if (units.size() != 1 || units.values().iterator().next() != 1) {
            return null;
        }
        Unit u = units.keySet().iterator().next();
        return u.dimension().equals(dim) ? u : null;
    }

    /** @return the product of the declared units of {@code side} when it has no sum, or null */
    private Unit product(Expr side, Dimension dim) {
        Map<Unit, Integer> units = units(side, false);
        if (units == FAILED) {
            return null;
        }
        Unit u = Units.product(units);
        return u != null && u.dimension().equals(dim) ? u : null;
    }

    /**
     * @return the declared units of {@code e}, each with its exponent (zero exponents removed), or {@link #FAILED}
     */
    private Map<Unit, Integer> units(Expr e, boolean sums) {
        Map<Unit, Integer> out = new LinkedHashMap<>();
        if (!collect(e, 1, sums, out)) {
            return FAILED;
        }
        out.values().removeIf(k -> k == 0);
        return out;
    }

    /** Adds the declared units of {@code e}, raised to {@code k}, to {@code out}; false when it has none. */
    private boolean collect(Expr e, int k, boolean sums, Map<Unit, Integer> out) {
        if (e instanceof Expr.Num) {
            return true;
        } else if (e instanceof Expr.Name n) {
            return named(n.name(), k, out);
        } else if (e instanceof Expr.Index i) {
            return named(i.name(), k, out);
        } else if (e instanceof Expr.Slice s) {
            return named(s.name(), k, out);
        } else if (e instanceof Expr.Neg g) {
            return collect(g.operand(), k, sums, out);
        } else if (e instanceof Expr.Vector v) {
            // one unit for every element, as for a declared vector
            return alike(v.elements(), k, sums, out);
        } else if (e instanceof Expr.Binary b) {
            return binary(b, k, sums, out);
        }
        // a function: a reduction is a sum, and the others change units in ways a product cannot show
        return false;
    }

    private boolean binary(Expr.Binary b, int k, boolean sums, Map<Unit, Integer> out) {
        switch (b.op()) {
            case MUL:
                return collect(b.left(), k, sums, out) && collect(b.right(), k, sums, out);
            case DIV:
                return collect(b.left(), k, sums, out) && collect(b.right(), -k, sums, out);
            case POW: {
                Integer n = wholeNumber(b.right());
                return n != null && Math.abs(k * n) <= Limits.MAX_UNIT_EXPONENT
                        && collect(b.left(), k * n, sums, out);
            }
            default:
                return sums && alike(List.of(b.left(), b.right()), k, true, out);
        }
    }

    /** @return the exponent when {@code e} is a whole-number literal within the unit limit, else null */
    private static Integer wholeNumber(Expr e) {
        boolean negative = e instanceof Expr.Neg;
        Expr at = negative ? ((Expr.Neg) e).operand() : e;
        if (!(at instanceof Expr.Num n) || n.value() != Math.rint(n.value())
                || n.value() > Limits.MAX_UNIT_EXPONENT) {
            return null;
        }
        return (negative ? -1 : 1) * (int) n.value();
    }

    /** Adds the units shared by every one of {@code terms}; false when they differ (then no product shows them). */
    private boolean alike(List<Expr> terms, int k, boolean sums, Map<Unit, Integer> out) {
        Map<Unit, Integer> first = null;
        for (Expr t : terms) {
            Map<Unit, Integer> u = units(t, sums);
            if (u == FAILED || (first != null && !first.equals(u))) {
                return false;
            }
            first = u;
        }
        return first == null || add(first, k, out);
    }

    private boolean named(String name, int k, Map<Unit, Integer> out) {
        Declaration d = declared.get(name);
        if (d instanceof Declaration.Variable v) {
            return add(Map.of(v.unit(), 1), k, out);
        } else if (d instanceof Declaration.Constant c) {
            return add(Map.of(c.unit(), 1), k, out);
        } else if (d instanceof Declaration.Definition def) {
            Map<Unit, Integer> u = definitions.get(name);
            if (u == null) {
                // checked definitions refer only to earlier ones, so this recursion ends
                u = units(def.expr(), true);
                definitions.put(name, u);
            }
            return u != FAILED && add(u, k, out);
        }
        return false;
    }

    /** Adds {@code units} raised to {@code k}; a pure number (no unit text) adds nothing. */
    private static boolean add(Map<Unit, Integer> units, int k, Map<Unit, Integer> out) {
        for (Map.Entry<Unit, Integer> u : units.entrySet()) {
            if (u.getKey().text().isEmpty()) {
                continue;
            }
            int sum = out.getOrDefault(u.getKey(), 0) + k * u.getValue();
            if (Math.abs(sum) > Limits.MAX_UNIT_EXPONENT) {
                return false;
            }
            out.put(u.getKey(), sum);
        }
        return true;
    }
}
