package dev.lawful.enforce.plan;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.NormOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.QRPDecomposition_F64;

/**
 * Chooses and checks the completed outputs at a reference point: the Jacobian dC/dy there, its rank (dependent
 * laws are refused by name), the automatic choice by column-pivoted QR, and the condition number of the chosen
 * block.
 */
final class OutputChoice {
    /** Condition number above which a choice is reported as ill-conditioned. */
    static final double WARN_CONDITION = 1e8;
    /** Relative size of a QR diagonal below which a direction counts as lost (rank deficiency). */
    private static final double RANK_TOLERANCE = 1e-10;

    private final LawSet laws;
    private final ExpandedLaws expanded;
    private final int n;
    private final int p;
    /** dC/dy at the reference point, n×p row-major. */
    final double[] jacobian;

    OutputChoice(LawSet laws, ReferencePoint reference) {
        this.laws = laws;
        this.expanded = laws.expand();
        this.n = expanded.size();
        this.p = laws.outputWidth();
        LawEvaluator ev = laws.evaluator();
        double[] jy = new double[ev.outputNonzeros()];
        ev.evaluate(reference.x(), reference.y(), 1, null, null, jy, null);
        this.jacobian = new double[n * p];
        for (int i = 0; i < n; i++) {
            int[] cols = ev.outputColumns(i);
            int off = ev.outputOffset(i);
            for (int k = 0; k < cols.length; k++) {
                jacobian[i * p + cols[k]] = jy[off + k];
            }
        }
    }

    /** Refuses laws whose output Jacobian rows are dependent, naming them. */
    void requireIndependentLaws() {
        if (n == 0) {
            return;
        }
        // pivot over laws: QR with column pivoting of the transpose (p×n)
        DMatrixRMaj t = new DMatrixRMaj(p, n);
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < p; j++) {
                t.set(j, i, jacobian[i * p + j]);
            }
        }
        QRPDecomposition_F64<DMatrixRMaj> qr = DecompositionFactory_DDRM.qrp(p, n);
        qr.setSingularThreshold(RANK_TOLERANCE * Math.max(1e-300, NormOps_DDRM.normPInf(t)));
        if (!qr.decompose(t.copy())) {
            throw laws.problem(null, "could not analyse the laws' Jacobian at the reference point");
        }
        int rank = qr.getRank();
        if (rank >= n) {
            return;
        }
        int[] pivots = qr.getColPivots();
        int dependent = pivots[rank];
        List<Integer> basis = new ArrayList<>();
        for (int k = 0; k < rank; k++) {
            basis.add(pivots[k]);
        }
        List<String> involved = combination(dependent, basis);
        String names = String.join(", ", involved.stream().map(s -> "'" + s + "'").toList());
        throw laws.problem(expanded.law(dependent), "laws " + names + " are not independent in the outputs"
                + " (at the reference point, law '" + expanded.name(dependent) + "' is a combination of the others):"
                + " they are redundant or contradictory; remove or correct one of them");
    }

    /** @return the law names in the combination that reproduces row {@code dependent} from {@code basis} */
    private List<String> combination(int dependent, List<Integer> basis) {
        Set<String> names = new LinkedHashSet<>();
        if (!basis.isEmpty()) {
            DMatrixRMaj b = new DMatrixRMaj(p, basis.size());
            DMatrixRMaj target = new DMatrixRMaj(p, 1);
            for (int j = 0; j < p; j++) {
                for (int k = 0; k < basis.size(); k++) {
                    b.set(j, k, jacobian[basis.get(k) * p + j]);
                }
                target.set(j, 0, jacobian[dependent * p + j]);
            }
            DMatrixRMaj alpha = new DMatrixRMaj(basis.size(), 1);
            CommonOps_DDRM.solve(b, target, alpha);
            double largest = 0;
            for (int k = 0; k < basis.size(); k++) {
                largest = Math.max(largest, Math.abs(alpha.get(k, 0)));
            }
            for (int k = 0; k < basis.size(); k++) {
                if (Math.abs(alpha.get(k, 0)) > 1e-9 * largest) {
                    names.add(expanded.name(basis.get(k)));
                }
            }
        }
        names.add(expanded.name(dependent));
        return new ArrayList<>(names);
    }

    /**
     * Picks the n best-conditioned completed outputs among {@code allowed} by QR with column pivoting of dC/dy at
     * the reference point.
     *
     * @return output element indices, in pivot order
     */
    int[] automatic(int[] allowed) {
        if (allowed.length < n) {
            throw laws.problem(null, "the laws give " + n + " scalar equation" + (n == 1 ? "" : "s") + " but only "
                    + allowed.length + " output" + (allowed.length == 1 ? "" : "s") + " may be completed; allow at least "
                    + n + " output" + (n == 1 ? "" : "s"));
        }
        DMatrixRMaj a = new DMatrixRMaj(n, allowed.length);
        for (int i = 0; i < n; i++) {
            for (int k = 0; k < allowed.length; k++) {
                a.set(i, k, jacobian[i * p + allowed[k]]);
            }
        }
        QRPDecomposition_F64<DMatrixRMaj> qr = DecompositionFactory_DDRM.qrp(n, allowed.length);
        qr.setSingularThreshold(RANK_TOLERANCE * Math.max(1e-300, NormOps_DDRM.normPInf(a)));
        if (!qr.decompose(a.copy())) {
            throw laws.problem(null, "could not analyse the laws' Jacobian at the reference point");
        }
        if (qr.getRank() < n) {
            throw laws.problem(null, "no choice of " + n + " completed outputs among the allowed ones makes the laws"
                    + " solvable (their Jacobian has rank " + qr.getRank() + " < " + n + "); allow other outputs");
        }
        int[] pivots = qr.getColPivots();
        int[] out = new int[n];
        for (int k = 0; k < n; k++) {
            out[k] = allowed[pivots[k]];
        }
        return out;
    }

    /** @return the 2-norm condition number of the n×n block dC/dy_completed at the reference point */
    double condition(int[] completed) {
        if (n == 0) {
            return 1;
        }
        DMatrixRMaj a = new DMatrixRMaj(n, n);
        for (int i = 0; i < n; i++) {
            for (int k = 0; k < n; k++) {
                a.set(i, k, jacobian[i * p + completed[k]]);
            }
        }
        double c = NormOps_DDRM.conditionP2(a);
        return Double.isNaN(c) ? Double.POSITIVE_INFINITY : c;
    }
}
