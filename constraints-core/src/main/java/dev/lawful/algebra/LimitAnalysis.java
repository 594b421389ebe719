package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Judges the expanded limits of a law set and turns them into {@link ScalarLimit}s. What needs the expanded terms
 * is checked here rather than in the {@link Checker}: that a limit still involves an output once simplified, that it
 * is affine in the outputs (its derivative with respect to every output is free of outputs, so the set it allows
 * is convex in the outputs for fixed inputs), and that constant bounds on one output leave some value possible.
 * Findings go to the {@link Diagnostics}; a vector limit's elements are reported once, at the first wrong one.
 */
final class LimitAnalysis {
    private final LawSet laws;
    private final Parser.Places places;
    private final Diagnostics diagnostics;
    private final int inputWidth;
    private final Set<Declaration.Limit> reported = new HashSet<>();

    LimitAnalysis(LawSet laws, Parser.Places places, Diagnostics diagnostics) {
        this.laws = laws;
        this.places = places;
        this.diagnostics = diagnostics;
        this.inputWidth = laws.inputWidth();
    }

    /** @return the scalar limits, in the order given; those found wrong are reported and left out */
    List<ScalarLimit> analyse(List<Expander.RawLimit> raw) {
        List<ScalarLimit> out = new ArrayList<>();
        for (Expander.RawLimit r : raw) {
            ScalarLimit limit = scalar(r);
            if (limit != null) {
                out.add(limit);
            }
        }
        contradictions(out);
        return out;
    }

    private ScalarLimit scalar(Expander.RawLimit r) {
        int[] outputs = Arrays.stream(r.value().variables()).filter(v -> v >= inputWidth).map(v -> v - inputWidth)
                .toArray();
        if (outputs.length == 0) {
            report(r.limit(), "limit '" + r.name() + "' does not depend on any output once simplified (its value is "
                    + abbreviate(r.value().toString()) + "); a limit must constrain at least one output");
            return null;
        }
        Map<Integer, Term> gradient = r.value().gradient();
        for (int o : outputs) {
            Term d = gradient.get(inputWidth + o);
            for (int v : d == null ? new int[0] : d.variables()) {
                if (v >= inputWidth) {
                    report(r.limit(), "limit '" + r.name() + "' is not affine in the outputs: its derivative with"
                            + " respect to output '" + laws.outputNames().get(o) + "' depends on output '"
                            + laws.outputNames().get(v - inputWidth) + "'; a limit must be linear in the outputs"
                            + " (its coefficients may depend on inputs)");
                    return null;
                }
            }
        }
        Unit unit = laws.limitUnit(r.limit().name());
        Term slope = outputs.length == 1 ? gradient.get(inputWidth + outputs[0]) : null;
        if (slope == null || slope.kind() != Term.Kind.CONST || slope.constant() == 0) {
            return new ScalarLimit(r.name(), r.limit(), r.value(), unit, outputs, -1, Double.NaN, r.lower());
        }
        double c = slope.constant();
        double bound = Double.NaN;
        boolean constant = Arrays.stream(r.value().variables()).allMatch(v -> v >= inputWidth);
        if (constant) {
            // g = c·y + r with r constant: g at y = 0 is r, and g = 0 at y = -r/c (+ 0.0 turns -0 into 0)
            double rest = r.value().evaluate(new double[inputWidth + laws.outputWidth()]);
            bound = Double.isFinite(rest) ? -rest / c + 0.0 : Double.NaN;
        }
        return new ScalarLimit(r.name(), r.limit(), r.value(), unit, outputs, outputs[0], bound, c > 0);
    }

    /** Constant bounds on one output with the greatest lower bound above the least upper bound allow no value. */
    private void contradictions(List<ScalarLimit> limits) {
        Map<Integer, ScalarLimit> lowest = new LinkedHashMap<>();
        Map<Integer, ScalarLimit> highest = new LinkedHashMap<>();
        for (ScalarLimit l : limits) {
            if (!l.isConstantBound()) {
                continue;
            }
            Map<Integer, ScalarLimit> side = l.lower() ? lowest : highest;
            ScalarLimit best = side.get(l.singleOutput());
            if (best == null || (l.lower() ? l.bound() > best.bound() : l.bound() < best.bound())) {
                side.put(l.singleOutput(), l);
            }
        }
        Set<List<Declaration.Limit>> pairs = new HashSet<>();
        for (Map.Entry<Integer, ScalarLimit> e : lowest.entrySet()) {
            ScalarLimit lo = e.getValue();
            ScalarLimit hi = highest.get(e.getKey());
            if (hi == null || lo.bound() <= hi.bound() || !pairs.add(List.of(lo.declaration(), hi.declaration()))) {
                continue;
            }
            Declaration.Variable v = output(e.getKey());
            String element = laws.outputNames().get(e.getKey());
            String unit = v.unit().text().isEmpty() ? "" : " " + v.unit().text();
            String needs = "needs " + element + " >= " + ExprPrinter.number(lo.bound()) + unit;
            String upper = element + " <= " + ExprPrinter.number(hi.bound()) + unit;
            Declaration.Limit later = position(lo.declaration()) > position(hi.declaration()) ? lo.declaration()
                    : hi.declaration();
            String message = lo.declaration() == hi.declaration()
                    ? "limit '" + lo.declaration().name() + "' cannot hold: it " + needs + " and " + upper
                    : "limits '" + lo.declaration().name() + "' and '" + hi.declaration().name() + "' cannot both hold: '"
                    + lo.declaration().name() + "' " + needs + ", '" + hi.declaration().name() + "' needs " + upper;
            diagnostics.error(nameSpan(later), message);
        }
    }

    private Declaration.Variable output(int element) {
        Declaration.Variable found = null;
        for (Declaration.Variable v : laws.outputs()) {
            if (laws.outputOffset(v.name()) <= element) {
                found = v;
            }
        }
        return found;
    }

    private void report(Declaration.Limit limit, String message) {
        if (reported.add(limit)) {
            diagnostics.error(nameSpan(limit), message);
        }
    }

    private Span nameSpan(Declaration d) {
        Span s = places.names.get(d);
        return s == null ? new Span(0, 0) : s;
    }

    private int position(Declaration d) {
        return nameSpan(d).offset();
    }

    private static String abbreviate(String s) {
        return s.length() <= 80 ? s : s.substring(0, 77) + "...";
    }
}
