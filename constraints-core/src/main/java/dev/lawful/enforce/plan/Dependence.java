package dev.lawful.enforce.plan;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.algebra.Unit;
import java.math.BigDecimal;
import java.math.MathContext;
import java.util.ArrayList;
import java.util.List;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;

/**
 * Tells a redundant law from a contradictory set, once the laws' output coefficients are found dependent at the
 * reference point. The combination of the other laws that reproduces one law's output coefficients either also
 * reproduces its inputs and constants (the law is <b>redundant</b>: it says nothing new and can be removed) or
 * leaves something over (the set is <b>contradictory</b>: no outputs satisfy all the laws for those inputs, and one
 * of them is wrong). The test is made at the reference point and at three more generic points, so a combination
 * whose coefficients depend on the inputs is judged by its values, not by its form.
 */
public final class Dependence {
    /** Relative size below which a coefficient of the combination counts as absent. */
    private static final double ABSENT = 1e-9;
    /** Relative misfit of the output coefficients above which a point does not show the dependence. */
    private static final double FIT = 1e-8;
    /** Relative leftover (of the magnitudes of the laws' terms) above which the laws contradict each other. */
    private static final double LEFTOVER = 1e-8;
    private static final int POINTS = 4;

    private final LawSet laws;
    private final ExpandedLaws expanded;
    private final LawEvaluator evaluator;
    private final int n;
    private final int p;

    private Dependence(LawSet laws) {
        this.laws = laws;
        this.expanded = laws.expand();
        this.evaluator = laws.evaluator();
        this.n = expanded.size();
        this.p = laws.outputWidth();
    }

    /** The laws' values at one point: residuals, natural scales and the output Jacobian (n×p, row-major). */
    private record Values(double[] residual, double[] scale, double[] jacobian) {
    }

    /**
     * @param laws      the law set
     * @param reference the reference point
     * @param dependent a law whose output coefficients are a combination of those of {@code basis} there
     * @param basis     independent laws
     * @return the refusal to throw: redundant or contradictory, naming the laws and showing the combination
     */
    public static LawException diagnose(LawSet laws, ReferencePoint reference, int dependent, List<Integer> basis) {
        return new Dependence(laws).diagnose(reference, dependent, basis);
    }

    private LawException diagnose(ReferencePoint reference, int dependent, List<Integer> basis) {
        Values at = values(reference);
        double[] alpha = combination(at, dependent, basis);
        // name the last law of the combination as the one that depends on the others: usually the one added last
        List<Integer> involved = new ArrayList<>();
        for (int k = 0; k < basis.size(); k++) {
            if (Math.abs(alpha[k]) * rowNorm(at, basis.get(k)) > ABSENT * rowNorm(at, dependent)) {
                involved.add(basis.get(k));
            }
        }
        involved.add(dependent);
        involved.sort(null);
        int last = involved.remove(involved.size() - 1);
        double[] first = combination(at, last, involved);
        boolean sameEverywhere = true;
        boolean elsewhere = false;
        for (int v = 0; v < POINTS; v++) {
            Values here = v == 0 ? at : values(ReferencePoint.generic(laws, v));
            double[] a = v == 0 ? first : combination(here, last, involved);
            if (!fits(here, last, involved, a)) {
                continue;
            }
            elsewhere |= v > 0;
            sameEverywhere &= close(a, first);
            double leftover = leftover(here, last, involved, a);
            if (Math.abs(leftover) > LEFTOVER * magnitude(here, last, involved, a)) {
                return contradictory(last, involved, a, leftover, v == 0);
            }
        }
        if (!elsewhere) {
            return onlyHere(last, involved, first);
        }
        return redundant(last, involved, first, sameEverywhere);
    }

    /** The output coefficients are dependent at the reference point only: the point is special for these laws. */
    private LawException onlyHere(int law, List<Integer> others, double[] alpha) {
        List<String> all = names(others);
        all.add(expanded.name(law));
        return laws.problem(expanded.law(law), "laws " + quoted(all) + " are dependent at the reference point only"
                + (others.isEmpty() ? " (no output moves law '" + expanded.name(law) + "' there)"
                : " (law '" + expanded.name(law) + "' has the output terms of " + text(others, alpha) + " there)")
                + " and independent at other points: give a reference point where they are independent, or rewrite"
                + " the laws");
    }

    private LawException contradictory(int law, List<Integer> others, double[] alpha, double leftover,
            boolean atReference) {
        Unit unit = expanded.unit(law);
        String amount = number(Math.abs(leftover) / unit.factor()) + (unit.isNone() ? "" : " " + unit.display());
        List<String> all = names(others);
        all.add(expanded.name(law));
        String message = "laws " + quoted(all) + " contradict each other: " + (others.isEmpty()
                ? "law '" + expanded.name(law) + "' involves outputs but no output moves it"
                : (others.size() == 1 && number(alpha[0]).equals("1") ? "law '" + expanded.name(others.get(0)) + "'"
                : "the combination " + text(others, alpha)) + " has the same output terms as law '"
                + expanded.name(law) + "'") + " but differs from it by " + amount
                + (atReference ? " at the reference point" : " at a generic point") + ", so no outputs satisfy"
                + " them all; one of these laws is wrong: correct it";
        return laws.problem(expanded.law(law), message);
    }

    private LawException redundant(int law, List<Integer> others, double[] alpha, boolean sameEverywhere) {
        String name = expanded.name(law);
        String message = others.isEmpty()
                ? "law '" + name + "' is redundant: it holds whatever the outputs are (no output moves it), so it"
                + " says nothing new; remove it"
                : "law '" + name + "' is redundant: it is " + text(others, alpha) + (sameEverywhere
                ? " (outputs, inputs and constants alike, at every point tried)"
                : " at the reference point, and a combination of the same laws at every point tried (the factors"
                + " depend on the inputs)") + ", so it says nothing new; remove it";
        return laws.problem(expanded.law(law), message);
    }

    private Values values(ReferencePoint point) {
        double[] residual = new double[n];
        double[] scale = new double[n];
        double[] jy = new double[evaluator.outputNonzeros()];
        evaluator.evaluate(point.x(), point.y(), 1, residual, scale, jy, null);
        double[] jacobian = new double[n * p];
        for (int i = 0; i < n; i++) {
            int[] cols = evaluator.outputColumns(i);
            int off = evaluator.outputOffset(i);
            for (int k = 0; k < cols.length; k++) {
                jacobian[i * p + cols[k]] = jy[off + k];
            }
        }
        return new Values(residual, scale, jacobian);
    }

    /** @return α with row {@code law} ≈ Σ α_k row {@code others_k} of the output Jacobian (least squares) */
    private double[] combination(Values at, int law, List<Integer> others) {
        if (others.isEmpty()) {
            return new double[0];
        }
        DMatrixRMaj b = new DMatrixRMaj(p, others.size());
        DMatrixRMaj target = new DMatrixRMaj(p, 1);
        for (int j = 0; j < p; j++) {
            for (int k = 0; k < others.size(); k++) {
                b.set(j, k, at.jacobian()[others.get(k) * p + j]);
            }
            target.set(j, 0, at.jacobian()[law * p + j]);
        }
        DMatrixRMaj alpha = new DMatrixRMaj(others.size(), 1);
        CommonOps_DDRM.solve(b, target, alpha);
        return alpha.getData().clone();
    }

    /** @return whether the combination reproduces the law's output coefficients at this point */
    private boolean fits(Values at, int law, List<Integer> others, double[] alpha) {
        double misfit = 0;
        double size = rowNorm(at, law);
        for (int k = 0; k < others.size(); k++) {
            size += Math.abs(alpha[k]) * rowNorm(at, others.get(k));
        }
        for (int j = 0; j < p; j++) {
            double d = at.jacobian()[law * p + j];
            for (int k = 0; k < others.size(); k++) {
                d -= alpha[k] * at.jacobian()[others.get(k) * p + j];
            }
            misfit = Math.max(misfit, Math.abs(d));
        }
        return misfit <= FIT * size;
    }

    /** @return C_law − Σ α_k C_others_k: for laws affine in the outputs, what is left of inputs and constants */
    private static double leftover(Values at, int law, List<Integer> others, double[] alpha) {
        double r = at.residual()[law];
        for (int k = 0; k < others.size(); k++) {
            r -= alpha[k] * at.residual()[others.get(k)];
        }
        return r;
    }

    /** @return the magnitude of every term of the law and of the combination, s_law + Σ |α_k| s_k */
    private static double magnitude(Values at, int law, List<Integer> others, double[] alpha) {
        double m = at.scale()[law];
        for (int k = 0; k < others.size(); k++) {
            m += Math.abs(alpha[k]) * at.scale()[others.get(k)];
        }
        return m;
    }

    private double rowNorm(Values at, int law) {
        double m = 0;
        for (int j = 0; j < p; j++) {
            m = Math.max(m, Math.abs(at.jacobian()[law * p + j]));
        }
        return m;
    }

    private static boolean close(double[] a, double[] b) {
        for (int k = 0; k < a.length; k++) {
            if (Math.abs(a[k] - b[k]) > 1e-9 * Math.max(Math.abs(a[k]), Math.abs(b[k]))) {
                return false;
            }
        }
        return true;
    }

    /** @return the combination as law text: {@code a + b - 0.5*c}, {@code 2*a} */
    private String text(List<Integer> others, double[] alpha) {
        StringBuilder sb = new StringBuilder();
        for (int k = 0; k < others.size(); k++) {
            double a = alpha[k];
            String name = expanded.name(others.get(k));
            if (sb.length() > 0) {
                sb.append(a < 0 ? " - " : " + ");
            } else if (a < 0) {
                sb.append('-');
            }
            double m = Math.abs(a);
            sb.append(number(m).equals("1") ? name : number(m) + "*" + name);
        }
        return sb.toString();
    }

    /** @return {@code v} to six significant digits, without trailing zeros */
    static String number(double v) {
        if (v == 0 || !Double.isFinite(v)) {
            return v == 0 ? "0" : Double.toString(v);
        }
        BigDecimal d = new BigDecimal(v).round(new MathContext(6)).stripTrailingZeros();
        int exponent = d.precision() - d.scale() - 1;
        return exponent >= -4 && exponent < 7 ? d.toPlainString() : d.toString().replace("E+", "e").replace("E", "e");
    }

    private List<String> names(List<Integer> lawIndices) {
        List<String> names = new ArrayList<>();
        for (int i : lawIndices) {
            names.add(expanded.name(i));
        }
        return names;
    }

    /**
     * @param names law names
     * @return {@code 'a'}, {@code 'a' and 'b'}, {@code 'a', 'b' and 'c'}
     */
    public static String quoted(List<String> names) {
        StringBuilder sb = new StringBuilder();
        for (int i = 0; i < names.size(); i++) {
            if (i > 0) {
                sb.append(i == names.size() - 1 ? " and " : ", ");
            }
            sb.append('\'').append(names.get(i)).append('\'');
        }
        return sb.toString();
    }
}
