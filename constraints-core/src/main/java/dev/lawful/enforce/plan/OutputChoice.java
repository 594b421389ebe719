package dev.lawful.enforce.plan;

import dev.lawful.algebra.Declaration;
import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import java.util.ArrayList;
import java.util.List;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.NormOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.QRPDecomposition_F64;

/**
 * Chooses and checks the completed outputs at a reference point: the Jacobian dC/dy there, its rank (dependent
 * laws are refused by name), the automatic choice by column-pivoted QR, and the condition number of the chosen
 * block.
 *
 * <p><b>Equilibrated, so that no decision depends on the units a user declares.</b> Every decision is made on
 * D_r⁻¹ (dC/dy) D_c: row i divided by law i's natural scale s_i at the reference point (the sum of the magnitudes
 * of its terms, in the law's SI unit) and column o multiplied by the magnitude |y_o| of output o there (in its
 * declared unit). Each entry is then the relative share of one output in one law, a pure number: declaring an area
 * in cm² instead of m² multiplies a column of dC/dy by 10⁻⁴ and |y_o| by 10⁴, and the product does not move. The
 * default reference point is itself the same physical point in every unit system ({@link ReferencePoint}), so the
 * rank decision, the automatic choice and the reported condition number are the same whatever units are declared.
 * The unscaled Jacobian is kept for the factors of constant blocks, which must be exact.
 */
final class OutputChoice {
    /** Condition number above which a choice is reported as ill-conditioned. */
    static final double WARN_CONDITION = 1e8;
    /** Relative size of a QR diagonal below which a direction counts as lost (rank deficiency). */
    private static final double RANK_TOLERANCE = 1e-10;

    private final LawSet laws;
    private final ReferencePoint reference;
    private final ExpandedLaws expanded;
    private final int n;
    private final int p;
    /** dC/dy at the reference point, n×p row-major, unscaled (SI law unit per declared output unit). */
    final double[] jacobian;
    /** The equilibrated dC/dy, n×p row-major, pure numbers: every decision is made on it. */
    private final double[] scaled;

    OutputChoice(LawSet laws, ReferencePoint reference) {
        this.laws = laws;
        this.reference = reference;
        this.expanded = laws.expand();
        this.n = expanded.size();
        this.p = laws.outputWidth();
        LawEvaluator ev = laws.evaluator();
        double[] jy = new double[ev.outputNonzeros()];
        double[] scales = new double[n];
        ev.evaluate(reference.x(), reference.y(), 1, null, scales, jy, null);
        this.jacobian = new double[n * p];
        for (int i = 0; i < n; i++) {
            int[] cols = ev.outputColumns(i);
            int off = ev.outputOffset(i);
            for (int k = 0; k < cols.length; k++) {
                jacobian[i * p + cols[k]] = jy[off + k];
            }
        }
        this.scaled = equilibrate(jacobian, scales, columnScales(laws, reference), n, p);
    }

    /**
     * @return per output, its magnitude at the reference point in its declared unit; where that is 0 (a point given
     *         by the user), one coherent SI unit expressed in the declared unit
     */
    private static double[] columnScales(LawSet laws, ReferencePoint reference) {
        double[] c = new double[laws.outputWidth()];
        int o = 0;
        for (Declaration.Variable v : laws.outputs()) {
            for (int i = 0; i < v.size(); i++, o++) {
                double m = Math.abs(reference.output(o));
                c[o] = m > 0 && Double.isFinite(m) ? m : 1 / v.unit().factor();
            }
        }
        return c;
    }

    /**
     * @return D_r⁻¹ J D_c, with D_r the laws' natural scales (or, where a scale is 0 or not finite, the largest
     *         magnitude of the row after column scaling, so that row still has entries of order one) and D_c the
     *         outputs' magnitudes
     */
    static double[] equilibrate(double[] jacobian, double[] rowScales, double[] columnScales, int n, int p) {
        double[] s = new double[n * p];
        for (int i = 0; i < n; i++) {
            double largest = 0;
            for (int o = 0; o < p; o++) {
                s[i * p + o] = jacobian[i * p + o] * columnScales[o];
                largest = Math.max(largest, Math.abs(s[i * p + o]));
            }
            double r = rowScales[i];
            if (!(r > 0) || Double.isInfinite(r)) {
                r = largest > 0 && Double.isFinite(largest) ? largest : 1;
            }
            for (int o = 0; o < p; o++) {
                s[i * p + o] /= r;
            }
        }
        return s;
    }

    /**
     * Refuses laws whose output Jacobian rows are dependent (on the equilibrated Jacobian), naming them and saying
     * whether one is redundant or the set is contradictory ({@link Dependence}).
     */
    void requireIndependentLaws() {
        if (n == 0) {
            return;
        }
        // pivot over laws: QR with column pivoting of the transpose (p×n)
        DMatrixRMaj t = new DMatrixRMaj(p, n);
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < p; j++) {
                t.set(j, i, scaled[i * p + j]);
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
        List<Integer> basis = new ArrayList<>();
        for (int k = 0; k < rank; k++) {
            basis.add(pivots[k]);
        }
        throw Dependence.diagnose(laws, reference, pivots[rank], basis);
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
                a.set(i, k, scaled[i * p + allowed[k]]);
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

    /**
     * @return the 2-norm condition number of the equilibrated n×n block D_r⁻¹ (dC/dy_completed) D_c at the
     *         reference point
     */
    double condition(int[] completed) {
        if (n == 0) {
            return 1;
        }
        DMatrixRMaj a = new DMatrixRMaj(n, n);
        for (int i = 0; i < n; i++) {
            for (int k = 0; k < n; k++) {
                a.set(i, k, scaled[i * p + completed[k]]);
            }
        }
        double c = NormOps_DDRM.conditionP2(a);
        return Double.isNaN(c) ? Double.POSITIVE_INFINITY : c;
    }
}
