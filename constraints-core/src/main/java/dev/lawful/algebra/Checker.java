package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Checks parsed declarations: every name known and declared before use, no duplicates, vector lengths that agree,
 * indices in range, laws that mention an output, and units that agree in every sum and between the two sides of
 * every law. All findings go to the {@link Diagnostics}; checking goes on after an error wherever the rest can
 * still be judged (an erroneous sub-expression is skipped silently, so one mistake gives one message). Function
 * calls are judged by a {@link CallChecker}, and the shape and unit rules operators share with calls live in
 * {@link ExprRules}.
 */
final class Checker {

    /** What a declared name stands for. */
    record Symbol(Declaration declaration, int line, int shape, Dimension dimension, Unit unit, boolean output,
                  boolean mentionsOutput, Double value) {
        /** @return what the name is, for messages: "an input", "an output", "a constant" or "a definition" */
        String kindText() {
            if (declaration instanceof Declaration.Variable v) {
                return v.role() == Declaration.Role.INPUT ? "an input" : "an output";
            }
            return declaration instanceof Declaration.Constant ? "a constant" : "a definition";
        }
    }

    /**
     * What the checker knows of an expression.
     *
     * @param shape          0 for a scalar, otherwise the vector length
     * @param dimension      the dimension, or null for a literal zero, which fits any dimension
     * @param unit           the declared unit the value is in, when it follows from one declaration, else null
     * @param mentionsOutput whether an output takes part
     * @param value          the value when it is a constant scalar, else null
     */
    record Info(int shape, Dimension dimension, Unit unit, boolean mentionsOutput, Double value) {
    }

    /** What a checked law is: its element count (0 for a scalar) and the unit its residual is reported in. */
    record LawInfo(int shape, Unit unit) {
    }

    private final Diagnostics diagnostics;
    private final Parser.Places places;
    private final ExprRules rules;
    private final CallChecker calls;
    private final Map<String, Symbol> symbols = new LinkedHashMap<>();
    private final Map<String, Integer> lawLines = new LinkedHashMap<>();
    /** The names in {@link #lawLines} that belong to limits (laws and limits share one namespace). */
    private final Set<String> limitNames = new HashSet<>();
    private final Map<String, Integer> laterNames = new LinkedHashMap<>();
    private final Set<String> used = new HashSet<>();
    /** The unit of each definition: the declared unit it follows from, or the coherent SI unit. */
    final Map<String, Unit> definitionUnits = new LinkedHashMap<>();
    final Map<String, LawInfo> laws = new LinkedHashMap<>();
    /** Each checked limit: its element count and the unit of its parts (declared, or coherent SI). */
    final Map<String, LawInfo> limits = new LinkedHashMap<>();
    private int completionLine = -1;
    /** "law 'x': " or "definition 'q': " while checking one, so a message names what it is about */
    private String context = "";

    Checker(Diagnostics diagnostics, Parser.Places places) {
        this.diagnostics = diagnostics;
        this.places = places;
        this.rules = new ExprRules(diagnostics);
        this.calls = new CallChecker(diagnostics, symbols, rules);
    }

    void check(List<Declaration> declarations) {
        for (Declaration d : declarations) {
            String name = d instanceof Declaration.Variable v ? v.name() : d instanceof Declaration.Constant c ? c.name()
                    : d instanceof Declaration.Definition def ? def.name() : null;
            if (name != null) {
                laterNames.putIfAbsent(name, spanOf(d).offset());
            }
        }
        for (Declaration d : declarations) {
            int line = diagnostics.source().line(spanOf(d).offset());
            if (d instanceof Declaration.Variable v) {
                // a unit that did not parse is already reported: let it fit anything rather than cascade
                Dimension dim = places.badUnits.contains(d) ? null : v.unit().dimension();
                declare(d, v.name(), line, new Symbol(d, line, v.vector() ? v.size() : 0, dim, v.unit(),
                        v.role() == Declaration.Role.OUTPUT, v.role() == Declaration.Role.OUTPUT, null));
            } else if (d instanceof Declaration.Constant c) {
                Double value = c.vector() ? null : c.values().get(0) * c.unit().factor();
                declare(d, c.name(), line, new Symbol(d, line, c.vector() ? c.size() : 0,
                        places.badUnits.contains(d) ? null : c.unit().dimension(),
                        c.unit(), false, false, value));
            } else if (d instanceof Declaration.Definition def) {
                context = "definition '" + def.name() + "': ";
                Info info = expr(def.expr());
                context = "";
                if (info != null) {
                    Dimension dd = info.dimension() == null ? Dimension.NONE : info.dimension();
                    definitionUnits.put(def.name(), info.unit() != null && info.unit().dimension().equals(dd)
                            ? info.unit() : Units.coherent(dd));
                    declare(d, def.name(), line, new Symbol(d, line, info.shape(),
                            info.dimension() == null ? Dimension.NONE : info.dimension(), info.unit(), false,
                            info.mentionsOutput(), info.value()));
                } else {
                    // keep the name known so later uses are not reported again as unknown
                    declare(d, def.name(), line, new Symbol(d, line, -1, null, null, false, true, null));
                }
            } else if (d instanceof Declaration.Law law) {
                context = "law '" + law.name() + "': ";
                law(law, line);
                context = "";
            } else if (d instanceof Declaration.Limit limit) {
                context = "limit '" + limit.name() + "': ";
                limit(limit, line);
                context = "";
            } else if (d instanceof Declaration.Completion c) {
                completion(c, line);
            } else if (d instanceof Declaration.Guess g) {
                context = "guess for " + ExprPrinter.print(g.target()) + ": ";
                guess(g);
                context = "";
            }
        }
        warnUnused(declarations);
    }

    private void warnUnused(List<Declaration> declarations) {
        for (Declaration d : declarations) {
            String kind = d instanceof Declaration.Constant ? "constant" : d instanceof Declaration.Definition
                    ? "definition" : null;
            String name = d instanceof Declaration.Constant c ? c.name() : d instanceof Declaration.Definition def
                    ? def.name() : null;
            if (kind != null && symbols.containsKey(name) && symbols.get(name).declaration() == d
                    && !used.contains(name)) {
                diagnostics.warning(nameSpan(d), kind + " '" + name + "' is never used");
            }
        }
    }


    private Span spanOf(Object node) {
        Span s = places.of(node);
        return s == null ? new Span(0, 0) : s;
    }

    private Span nameSpan(Declaration d) {
        Span s = places.names.get(d);
        return s == null ? spanOf(d) : s;
    }

    private void declare(Declaration d, String name, int line, Symbol symbol) {
        if (Parser.KEYWORDS.contains(name)) {
            diagnostics.error(nameSpan(d), "'" + name + "' is a keyword and cannot be declared");
            return;
        }
        if (CallChecker.isFunction(name)) {
            diagnostics.error(nameSpan(d), "'" + name + "' is a function name and cannot be declared");
            return;
        }
        Symbol previous = symbols.get(name);
        if (previous != null) {
            diagnostics.error(nameSpan(d), "'" + name + "' is already declared at line " + previous.line());
            return;
        }
        if (lawLines.containsKey(name)) {
            diagnostics.error(nameSpan(d), "'" + name + "' is already the name of the "
                    + (limitNames.contains(name) ? "limit" : "law") + " at line " + lawLines.get(name));
            return;
        }
        symbols.put(name, symbol);
    }

    private void law(Declaration.Law law, int line) {
        Span at = nameSpan(law);
        if (limitNames.contains(law.name())) {
            diagnostics.error(at, "law '" + law.name() + "' has the name of the limit at line " + lawLines.get(law.name())
                    + "; laws and limits share one namespace");
        } else if (lawLines.containsKey(law.name())) {
            diagnostics.error(at, "law '" + law.name() + "' is already declared at line " + lawLines.get(law.name()));
        } else if (symbols.containsKey(law.name())) {
            diagnostics.error(at, "law name '" + law.name() + "' is already declared at line "
                    + symbols.get(law.name()).line());
        } else {
            lawLines.put(law.name(), line);
        }
        Info left = expr(law.lhs());
        Info right = expr(law.rhs());
        if (left == null || right == null) {
            return;
        }
        String what = "between the sides of law '" + law.name() + "'";
        int shape = rules.broadcast(left, right, what, spanOf(law.rhs()), context);
        if (shape < 0) {
            return;
        }
        Dimension dim = left.dimension() != null ? left.dimension() : right.dimension();
        if (left.dimension() != null && right.dimension() != null && !left.dimension().equals(right.dimension())) {
            diagnostics.error(spanOf(law.rhs()), "unit mismatch " + what + ": left is " + ExprRules.describe(left)
                    + ", right is " + ExprRules.describe(right));
            return;
        }
        if (!left.mentionsOutput() && !right.mentionsOutput()) {
            diagnostics.error(at, "law '" + law.name() + "' mentions no output; a law must constrain at least one"
                    + " output");
            return;
        }
        if (dim == null) {
            dim = Dimension.NONE;
        }
        Unit unit = left.unit() != null && left.unit().dimension().equals(dim) ? left.unit()
                : right.unit() != null && right.unit().dimension().equals(dim) ? right.unit()
                : Units.coherent(dim);
        laws.put(law.name(), new LawInfo(shape, unit));
    }

    /** Like a law: every part in one unit, lengths that broadcast, and at least one output mentioned. */
    private void limit(Declaration.Limit limit, int line) {
        Span at = nameSpan(limit);
        String name = limit.name();
        if (lawLines.containsKey(name)) {
            diagnostics.error(at, limitNames.contains(name) ? "limit '" + name + "' is already declared at line "
                    + lawLines.get(name) : "limit '" + name + "' has the name of the law at line " + lawLines.get(name)
                    + "; laws and limits share one namespace");
        } else if (symbols.containsKey(name)) {
            diagnostics.error(at, "limit name '" + name + "' is already declared at line " + symbols.get(name).line());
        } else {
            lawLines.put(name, line);
            limitNames.add(name);
        }
        List<Info> parts = new ArrayList<>();
        for (Expr e : limit.parts()) {
            parts.add(expr(e));
        }
        if (parts.contains(null)) {
            return;
        }
        Info joined = parts.get(0);
        // a literal 0 fits any unit, so the part to compare with is the last one that has a unit
        Info known = joined;
        boolean mentions = joined.mentionsOutput();
        for (int i = 1; i < parts.size(); i++) {
            Info right = parts.get(i);
            Span rightAt = spanOf(limit.parts().get(i));
            String what = parts.size() == 2 ? "between the sides of limit '" + name + "'"
                    : "between the sides of the " + (i == 1 ? "first" : "second") + " '"
                    + limit.relations().get(i - 1).symbol() + "' of limit '" + name + "'";
            int shape = rules.broadcast(joined, right, what, rightAt, context);
            if (shape < 0) {
                return;
            }
            if (known.dimension() != null && right.dimension() != null && !known.dimension().equals(right.dimension())) {
                diagnostics.error(rightAt, "unit mismatch " + what + ": left is " + ExprRules.describe(known)
                        + ", right is " + ExprRules.describe(right));
                return;
            }
            known = right.dimension() != null ? right : known;
            Dimension dim = joined.dimension() != null ? joined.dimension() : right.dimension();
            Unit unit = joined.unit() != null ? joined.unit() : right.unit();
            joined = new Info(shape, dim, unit, mentions |= right.mentionsOutput(), null);
        }
        if (!mentions) {
            diagnostics.error(at, "limit '" + name + "' involves no output: a limit must constrain at least one output");
            return;
        }
        Dimension dim = joined.dimension() == null ? Dimension.NONE : joined.dimension();
        Unit unit = joined.unit() != null && joined.unit().dimension().equals(dim) ? joined.unit() : Units.coherent(dim);
        limits.put(name, new LawInfo(joined.shape(), unit));
    }

    private void completion(Declaration.Completion c, int line) {
        if (completionLine >= 0) {
            diagnostics.error(spanOf(c), "only one 'complete' statement is allowed; the first is at line "
                    + completionLine);
            return;
        }
        completionLine = line;
        Set<String> seen = new HashSet<>();
        for (Expr t : c.targets()) {
            String name = t instanceof Expr.Name n ? n.name() : t instanceof Expr.Index i ? i.name()
                    : ((Expr.Slice) t).name();
            Symbol s = lookup(name, spanOf(t));
            if (s == null || s.shape() < 0) {
                continue;
            }
            if (!(s.declaration() instanceof Declaration.Variable v) || v.role() != Declaration.Role.OUTPUT) {
                diagnostics.error(spanOf(t), "'" + name + "' is " + s.kindText() + "; only outputs can be completed");
                continue;
            }
            if (elementRef(t, s) == null) {
                continue;
            }
            int from = t instanceof Expr.Index i ? i.index() : t instanceof Expr.Slice sl ? sl.from() : 0;
            int to = t instanceof Expr.Index i ? i.index() + 1 : t instanceof Expr.Slice sl ? sl.to() : Math.max(1, s.shape());
            for (int k = from; k < to; k++) {
                String element = s.shape() == 0 ? name : name + "[" + k + "]";
                if (!seen.add(element)) {
                    diagnostics.error(spanOf(t), "'" + element + "' is completed twice");
                    break;
                }
            }
        }
    }

    private final Set<String> guessed = new HashSet<>();

    private void guess(Declaration.Guess g) {
        Expr t = g.target();
        String name = t instanceof Expr.Name n ? n.name() : t instanceof Expr.Index i ? i.name() : ((Expr.Slice) t).name();
        Symbol s = lookup(name, spanOf(t));
        Info value = expr(g.value());
        if (s == null || s.shape() < 0) {
            return;
        }
        if (!(s.declaration() instanceof Declaration.Variable v) || v.role() != Declaration.Role.OUTPUT) {
            diagnostics.error(spanOf(t), "'" + name + "' is " + s.kindText() + "; guesses are for outputs");
            return;
        }
        Info target = elementRef(t, s);
        if (target == null || value == null) {
            return;
        }
        if (value.shape() != 0 && value.shape() != target.shape()) {
            diagnostics.error(spanOf(g.value()), context + "vector length mismatch: the output is "
                    + ExprRules.shapeText(target.shape()) + ", the guess is " + ExprRules.shapeText(value.shape()));
            return;
        }
        if (value.dimension() != null && target.dimension() != null && !value.dimension().equals(target.dimension())) {
            diagnostics.error(spanOf(g.value()), context + "unit mismatch: the output is in "
                    + ExprRules.describe(target) + ", the guess is in " + ExprRules.describe(value));
            return;
        }
        int from = t instanceof Expr.Index i ? i.index() : t instanceof Expr.Slice sl ? sl.from() : 0;
        int to = t instanceof Expr.Index i ? i.index() + 1 : t instanceof Expr.Slice sl ? sl.to() : Math.max(1, s.shape());
        for (int k = from; k < to; k++) {
            String element = s.shape() == 0 ? name : name + "[" + k + "]";
            if (!guessed.add(element)) {
                diagnostics.error(spanOf(t), "'" + element + "' has two guesses; keep one");
                return;
            }
        }
    }

    private Symbol lookup(String name, Span at) {
        Symbol s = symbols.get(name);
        if (s != null) {
            used.add(name);
        }
        if (s == null && laterNames.containsKey(name)) {
            int declared = laterNames.get(name);
            if (declared > at.offset()) {
                diagnostics.error(at, "'" + name + "' is used before its declaration at line "
                        + diagnostics.source().line(declared) + "; declare it first");
            }
            // otherwise its declaration was rejected with an error of its own
            return null;
        }
        if (s == null) {
            String near = Names.nearest(name, symbols.keySet());
            diagnostics.error(at, "unknown name '" + name + "'" + (near == null ? "" : "; did you mean '" + near + "'?"));
        }
        return s;
    }

    /** Checks an index or slice against the symbol's length; null after reporting an error. */
    private Info elementRef(Expr e, Symbol s) {
        String name = e instanceof Expr.Index i ? i.name() : e instanceof Expr.Slice sl ? sl.name() : null;
        if (name == null) {
            return new Info(s.shape(), s.dimension(), s.unit(), s.mentionsOutput(), s.value());
        }
        if (s.shape() == 0) {
            diagnostics.error(spanOf(e), "'" + name + "' is a scalar and cannot be indexed");
            return null;
        }
        if (e instanceof Expr.Index i) {
            if (i.index() >= s.shape()) {
                diagnostics.error(spanOf(e), "index " + i.index() + " is out of range for '" + name + "' of length "
                        + s.shape() + " (valid: 0 to " + (s.shape() - 1) + ")");
                return null;
            }
            Double value = null;
            if (s.declaration() instanceof Declaration.Constant c) {
                value = c.values().get(i.index()) * c.unit().factor();
            }
            return new Info(0, s.dimension(), s.unit(), s.mentionsOutput(), value);
        }
        Expr.Slice sl = (Expr.Slice) e;
        if (sl.to() > s.shape()) {
            diagnostics.error(spanOf(e), "slice " + name + "[" + sl.from() + ":" + sl.to() + "] is out of range for '"
                    + name + "' of length " + s.shape() + " (the end may be at most " + s.shape() + ")");
            return null;
        }
        return new Info(sl.to() - sl.from(), s.dimension(), s.unit(), s.mentionsOutput(), null);
    }

    // ---- expressions -----------------------------------------------------------------------------------------

    /** @return what the expression is, or null when it holds an error (already reported) */
    private Info expr(Expr e) {
        if (e instanceof Expr.Num n) {
            return new Info(0, n.value() == 0 ? null : Dimension.NONE, null, false, n.value());
        }
        if (e instanceof Expr.Name || e instanceof Expr.Index || e instanceof Expr.Slice) {
            String name = e instanceof Expr.Name n ? n.name() : e instanceof Expr.Index i ? i.name()
                    : ((Expr.Slice) e).name();
            Symbol s = lookup(name, spanOf(e));
            if (s == null || s.shape() < 0) {
                return null;
            }
            return elementRef(e, s);
        }
        if (e instanceof Expr.Neg n) {
            Info a = expr(n.operand());
            return a == null ? null : new Info(a.shape(), a.dimension(), a.unit(), a.mentionsOutput(),
                    a.value() == null ? null : -a.value());
        }
        if (e instanceof Expr.Binary b) {
            return binary(b);
        }
        if (e instanceof Expr.Call c) {
            return call(c);
        }
        return vector((Expr.Vector) e);
    }

    private Info binary(Expr.Binary b) {
        Info l = expr(b.left());
        Info r = expr(b.right());
        if (l == null || r == null) {
            return null;
        }
        String what = "in '" + b.op().symbol() + "'";
        int shape = rules.broadcast(l, r, what, spanOf(b), context);
        if (shape < 0) {
            return null;
        }
        boolean mentions = l.mentionsOutput() || r.mentionsOutput();
        Double lv = l.value();
        Double rv = r.value();
        switch (b.op()) {
            case ADD:
            case SUB: {
                if (l.dimension() != null && r.dimension() != null && !l.dimension().equals(r.dimension())) {
                    diagnostics.error(spanOf(b), context + "unit mismatch " + what + ": left is "
                            + ExprRules.describe(l) + ", right is " + ExprRules.describe(r));
                    return null;
                }
                Dimension d = l.dimension() != null ? l.dimension() : r.dimension();
                Unit u = l.dimension() != null ? l.unit() : r.unit();
                if (l.unit() != null && r.unit() != null && !l.unit().equals(r.unit())) {
                    u = null;
                }
                Double v = lv != null && rv != null ? (b.op() == Expr.Op.ADD ? lv + rv : lv - rv) : null;
                return new Info(shape, d, u, mentions, v);
            }
            case MUL:
            case DIV: {
                Dimension ld = l.dimension() == null ? Dimension.NONE : l.dimension();
                Dimension rd = r.dimension() == null ? Dimension.NONE : r.dimension();
                Dimension d = b.op() == Expr.Op.MUL ? ld.times(rd) : ld.over(rd);
                if (d.maxAbsExponent() > Limits.MAX_UNIT_EXPONENT) {
                    diagnostics.error(spanOf(b), "unit exponent beyond the limit of " + Limits.MAX_UNIT_EXPONENT);
                    return null;
                }
                // a pure-number factor keeps the other side's unit (C * out stays in out's unit)
                Unit u = rd.isNone() && (r.unit() == null || r.unit().isNone()) ? l.unit()
                        : ld.isNone() && b.op() == Expr.Op.MUL && (l.unit() == null || l.unit().isNone()) ? r.unit()
                        : null;
                Double v = lv != null && rv != null ? (b.op() == Expr.Op.MUL ? lv * rv : lv / rv) : null;
                if (l.dimension() == null || (r.dimension() == null && b.op() == Expr.Op.MUL)) {
                    // zero times anything is zero, which fits any unit
                    return new Info(shape, null, null, mentions, v);
                }
                return new Info(shape, d, u, mentions, v);
            }
            default:
                return rules.power(spanOf(b), l, r, shape, mentions, context);
        }
    }

    private Info call(Expr.Call c) {
        List<Info> args = new ArrayList<>();
        for (Expr a : c.args()) {
            args.add(expr(a));
        }
        return calls.check(c, spanOf(c), args, context);
    }

    private Info vector(Expr.Vector v) {
        Dimension d = null;
        Unit u = null;
        boolean mentions = false;
        for (Expr e : v.elements()) {
            Info i = expr(e);
            if (i == null) {
                return null;
            }
            if (i.shape() != 0) {
                diagnostics.error(spanOf(e), "the elements of a vector literal must be scalars, found "
                        + ExprRules.shapeText(i.shape()));
                return null;
            }
            if (i.dimension() != null) {
                if (d != null && !d.equals(i.dimension())) {
                    diagnostics.error(spanOf(e), context + "unit mismatch in a vector literal: earlier elements are in "
                            + d + ", this one is in " + ExprRules.describe(i));
                    return null;
                }
                if (d == null) {
                    u = i.unit();
                } else if (u != null && !u.equals(i.unit())) {
                    u = null;
                }
                d = i.dimension();
            }
            mentions |= i.mentionsOutput();
        }
        return new Info(v.elements().size(), d, u, mentions, null);
    }
}
