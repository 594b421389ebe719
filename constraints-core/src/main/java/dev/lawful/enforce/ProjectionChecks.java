package dev.lawful.enforce;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.algebra.Term;
import dev.lawful.enforce.plan.Dependence;
import dev.lawful.enforce.plan.ReferencePoint;

/** The build-time refusals of {@link Projection}: laws nonlinear in the outputs, dependent laws. */
final class ProjectionChecks {
    /** Coefficient (of unit law rows) above which an earlier law counts as part of a dependence. */
    static final double PART_OF_DEPENDENCE = 1e-8;
    private static final String REFERENCE = "the reference point";

    private ProjectionChecks() {
    }

    /**
     * @throws dev.lawful.algebra.LawException pointing at the first law whose derivative with respect to an output
     *         depends on an output
     */
    static void requireAffine(LawSet laws) {
        ExpandedLaws e = laws.expand();
        int nIn = e.inputWidth();
        for (int i = 0; i < e.size(); i++) {
            Map<Integer, Term> gradient = e.gradient(i);
            for (int j : e.outputs(i)) {
                Term d = gradient.get(nIn + j);
                if (d == null) {
                    continue;
                }
                for (int v : d.variables()) {
                    if (v >= nIn) {
                        throw laws.problem(laws.law(e.law(i).name()), "law '" + e.name(i)
                                + "' is nonlinear in the outputs: its coefficient of output '" + e.variableName(nIn + j)
                                + "' is " + abbreviate(d.toString()) + ", which depends on output '"
                                + e.variableName(v) + "'; projection needs laws that are affine in the outputs (their"
                                + " output coefficients may depend on inputs only); use completion for nonlinear"
                                + " laws, or rewrite the law");
                    }
                }
            }
        }
    }

    /**
     * @return null when every output coefficient is a constant, otherwise why the input gradient is refused
     */
    static String inputGradientRefusal(ExpandedLaws e) {
        int nIn = e.inputWidth();
        for (int i = 0; i < e.size(); i++) {
            Map<Integer, Term> gradient = e.gradient(i);
            for (int j : e.outputs(i)) {
                Term d = gradient.get(nIn + j);
                if (d != null && d.variables().length > 0) {
                    return "the gradient with respect to the inputs is not available for this law set: the"
                            + " coefficient of output '" + e.variableName(nIn + j) + "' in law '" + e.name(i)
                            + "' depends on input '" + e.variableName(d.variables()[0]) + "', so that gradient"
                            + " needs second derivatives of the laws, which projection does not compute; pass null"
                            + " for the input gradient (the inputs are then treated as constants), or use"
                            + " completion, whose input gradient needs first derivatives only";
                }
            }
        }
        return null;
    }

    /**
     * Factors the output coefficients at the reference point in the projection's metric.
     *
     * @return the factorisation at the reference point (the factorisation of every sample when the coefficients are
     *         constants)
     * @throws dev.lawful.algebra.LawException naming the laws when a law's coefficients are not finite there or
     *         are a linear combination of those of the laws before it
     */
    static ProjectionFactor requireIndependent(LawSet laws, LawEvaluator evaluator, ReferencePoint point,
                                               int[] start, int[] columns, double[] invSqrtW, double tolerance) {
        ExpandedLaws e = laws.expand();
        int n = evaluator.lawCount();
        ProjectionFactor f = new ProjectionFactor(n, e.outputWidth());
        if (n == 0) {
            return f;
        }
        double[] x = point.x();
        double[] y = point.y();
        double[] jy = new double[evaluator.outputNonzeros()];
        evaluator.evaluate(x, y, 1, null, null, jy, null);
        int bad = f.load(jy, 0, start, columns, invSqrtW);
        if (bad >= 0) {
            throw laws.problem(laws.law(e.law(bad).name()), "the output coefficients of law '" + e.name(bad)
                    + "' are not finite at " + REFERENCE + ", so the laws cannot be checked for independence;"
                    + " rewrite the law so its coefficients are defined there");
        }
        int k = f.factor(tolerance);
        if (k < 0) {
            return f;
        }
        String name = e.name(k);
        if (f.norm[k] == 0) {
            throw laws.problem(laws.law(e.law(k).name()), "law '" + name + "' is redundant or contradictory: its"
                    + " output coefficients are all zero at " + REFERENCE + ", so moving the outputs cannot enforce"
                    + " it; remove the law or rewrite it");
        }
        int[] parts = f.dependence(k, PART_OF_DEPENDENCE);
        List<Integer> others = new ArrayList<>();
        for (int i : parts.length > 0 ? parts : java.util.stream.IntStream.range(0, k).toArray()) {
            others.add(i);
        }
        // the same diagnosis as completion: redundant (say so and remove it) or contradictory (show what is left)
        throw Dependence.diagnose(laws, point, k, others);
    }

    /** @return {@code 'a'}, {@code 'a' and 'b'}, {@code 'a', 'b' and 'c'} */
    static String quoted(List<String> names) {
        return Dependence.quoted(names);
    }

    private static String abbreviate(String s) {
        return s.length() <= 80 ? s : s.substring(0, 77) + "...";
    }
}
