package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

/**
 * Checks function calls once their arguments are checked: the name is a function, the argument count is right,
 * and the shape and unit of the result follow each function's rule ({@code sum} reduces a vector, {@code dot}
 * multiplies two vectors of one length, {@code pow} is a power, the elementary {@link Function}s apply element by
 * element). Errors go to the {@link Diagnostics}; a call with an error is then null, so nothing above it is
 * reported again.
 */
final class CallChecker {
    /** The functions that are not element-wise {@link Function}s. */
    private static final List<String> REDUCTIONS = List.of("sum", "dot", "pow");

    private final Diagnostics diagnostics;
    private final Map<String, Checker.Symbol> symbols;
    private final ExprRules rules;

    /**
     * @param diagnostics receives the errors
     * @param symbols     the declared names, read only (to tell a misused name from an unknown function)
     * @param rules       the shape and unit rules shared with operators
     */
    CallChecker(Diagnostics diagnostics, Map<String, Checker.Symbol> symbols, ExprRules rules) {
        this.diagnostics = diagnostics;
        this.symbols = symbols;
        this.rules = rules;
    }

    /** @return whether {@code name} is a function of the law language, which no declaration may take */
    static boolean isFunction(String name) {
        return Function.named(name) != null || REDUCTIONS.contains(name);
    }

    /**
     * @param c       the call
     * @param at      where the call is written
     * @param args    what checking each argument found, in order, null for an argument whose error is reported
     * @param context the prefix naming the law or definition being checked
     * @return what the call is, or null when it holds an error (reported here or before)
     */
    Checker.Info check(Expr.Call c, Span at, List<Checker.Info> args, String context) {
        String name = c.function();
        int arity = Function.named(name) != null || name.equals("sum") ? 1 : REDUCTIONS.contains(name) ? 2 : -1;
        if (arity < 0) {
            notAFunction(name, at);
            return null;
        }
        if (args.size() != arity) {
            diagnostics.error(at, "'" + name + "' takes " + arity + " argument" + (arity == 1 ? "" : "s") + ", found "
                    + args.size());
            return null;
        }
        if (args.contains(null)) {
            return null;
        }
        switch (name) {
            case "sum":
                return sum(args.get(0));
            case "pow":
                return pow(at, args.get(0), args.get(1), context);
            case "dot":
                return dot(at, args.get(0), args.get(1));
            default:
                return elementWise(Function.named(name), at, args.get(0), context);
        }
    }

    /** Reports a call of a declared name, or of an unknown one with the nearest function name. */
    private void notAFunction(String name, Span at) {
        Checker.Symbol s = symbols.get(name);
        if (s != null) {
            diagnostics.error(at, "'" + name + "' is " + s.kindText() + ", not a function; "
                    + (s.shape() > 0 ? "write " + name + "[i] for an element" : "write '*' to multiply"));
            return;
        }
        List<String> all = new ArrayList<>(REDUCTIONS);
        for (Function fn : Function.values()) {
            all.add(fn.spelling());
        }
        String near = Names.nearest(name, all);
        diagnostics.error(at, "unknown function '" + name + "'" + (near == null ? "" : "; did you mean '" + near
                + "'?"));
    }

    private static Checker.Info sum(Checker.Info a) {
        return new Checker.Info(0, a.dimension(), a.unit(), a.mentionsOutput(), a.shape() == 0 ? a.value() : null);
    }

    private Checker.Info pow(Span at, Checker.Info base, Checker.Info exponent, String context) {
        int shape = rules.broadcast(base, exponent, "in 'pow'", at, context);
        return shape < 0 ? null
                : rules.power(at, base, exponent, shape, base.mentionsOutput() || exponent.mentionsOutput(), context);
    }

    private Checker.Info dot(Span at, Checker.Info a, Checker.Info b) {
        if (a.shape() == 0 || b.shape() == 0 || a.shape() != b.shape()) {
            diagnostics.error(at, "'dot' needs two vectors of the same length, found "
                    + ExprRules.shapeText(a.shape()) + " and " + ExprRules.shapeText(b.shape()));
            return null;
        }
        Dimension ad = a.dimension() == null ? Dimension.NONE : a.dimension();
        Dimension bd = b.dimension() == null ? Dimension.NONE : b.dimension();
        Unit u = bd.isNone() ? a.unit() : ad.isNone() ? b.unit() : null;
        return new Checker.Info(0, ad.times(bd), u, a.mentionsOutput() || b.mentionsOutput(), null);
    }

    /** An elementary function, applied element by element; a constant argument gives a constant value. */
    private Checker.Info elementWise(Function f, Span at, Checker.Info a, String context) {
        Dimension d = a.dimension() == null ? Dimension.NONE : a.dimension();
        Double v = a.value() == null ? null : f.apply(a.value());
        switch (f.kind()) {
            case DIMENSIONLESS:
                if (!d.isNone()) {
                    diagnostics.error(at, context + "the argument of '" + f.spelling()
                            + "' must be dimensionless, found " + ExprRules.describe(a));
                    return null;
                }
                return new Checker.Info(a.shape(), Dimension.NONE, null, a.mentionsOutput(), v);
            case ROOT:
                if (!d.hasSquareRoot()) {
                    diagnostics.error(at, context + "the argument of '" + f.spelling() + "' is in "
                            + ExprRules.describe(a) + ", which has no square root in whole unit powers");
                    return null;
                }
                return new Checker.Info(a.shape(), d.root2(), null, a.mentionsOutput(), v);
            case SAME:
                return new Checker.Info(a.shape(), a.dimension(), a.unit(), a.mentionsOutput(), v);
            default:
                return new Checker.Info(a.shape(), Dimension.NONE, null, a.mentionsOutput(), v);
        }
    }
}
