package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * Each law's residual split, for a chosen set of outputs, into its <em>fixed</em> part (the addends that involve
 * none of those outputs) and its <em>moving</em> part (the others): C = C<sub>fixed</sub> + C<sub>moving</sub>,
 * and likewise the natural scale, which sums the magnitudes of the same addends. An iterative solve that moves only
 * the chosen outputs can evaluate the fixed part once and the moving part at every iterate: for a law such as
 * {@code Σ_k w_k·z_k = f(y)} over fifty free outputs z, the fifty products are computed once instead of at every
 * iteration.
 *
 * <p><b>Accuracy.</b> Each part is a compensated sum rounded to one double, and the two are then added, so the
 * residual may differ from the whole law's evaluation by about 2<sup>-53</sup> of each part's magnitude: a few
 * roundings of the scale, where the whole law's own evaluation is accurate to about 2<sup>-53</sup> of the
 * residual itself. Far from a root that does not matter; near one (the last iterations of Newton, whose stopping
 * test is a few roundings of the scale) it does, and the whole law must be evaluated there. Derivatives with
 * respect to the chosen outputs come from the moving part alone (the fixed part does not depend on them) and are
 * stored in the layout of the whole law set's evaluator, with the same bits. Immutable and thread-safe; each
 * thread evaluates with its own {@link Workspace}.
 */
public final class ResidualSplit {
    private final LawEvaluator fixed;
    private final LawEvaluator.Partial movingJacobian;
    private final LawEvaluator moving;
    private final int lawCount;
    private final int movingNonzeros;
    private final int lawNonzeros;
    private final int fixedAddends;
    /** For each dC/dy entry of the chosen columns: its position in the moving part's layout and in the laws'. */
    private final int[] from;
    private final int[] to;

    private ResidualSplit(LawEvaluator fixed, LawEvaluator moving, int lawNonzeros, int[] chosen, int fixedAddends,
                          int[] from, int[] to) {
        this.fixed = fixed;
        this.moving = moving;
        this.movingJacobian = moving.partial(chosen);
        this.lawCount = fixed.lawCount();
        this.movingNonzeros = moving.outputNonzeros();
        this.lawNonzeros = lawNonzeros;
        this.fixedAddends = fixedAddends;
        this.from = from;
        this.to = to;
    }

    /**
     * Splits every law of a law set.
     *
     * @param expanded the scalar laws
     * @param laws     their evaluator, whose Jacobian layout {@link #evaluate} writes
     * @param outputs  the chosen output columns (those an iterative solve moves)
     * @return the split
     * @throws IllegalArgumentException when an output column is out of range
     */
    public static ResidualSplit of(ExpandedLaws expanded, LawEvaluator laws, int[] outputs) {
        int nIn = expanded.inputWidth();
        Set<Integer> chosen = new HashSet<>();
        for (int o : outputs) {
            if (o < 0 || o >= expanded.outputWidth()) {
                throw new IllegalArgumentException("output column " + o + " is out of range 0 .. "
                        + (expanded.outputWidth() - 1));
            }
            chosen.add(nIn + o);
        }
        List<Term> fixedTerms = new ArrayList<>();
        List<Term> movingTerms = new ArrayList<>();
        List<String> names = new ArrayList<>();
        int fixedAddends = 0;
        TermPool pool = expanded.pool();
        synchronized (pool) {
            for (int i = 0; i < expanded.size(); i++) {
                List<Term> still = new ArrayList<>();
                List<Term> moves = new ArrayList<>();
                for (Term a : expanded.terms(i)) {
                    (involves(a, chosen) ? moves : still).add(a);
                }
                fixedAddends += still.size();
                // subsets of a flat sum's addends: no like terms or second constant to combine, same magnitudes
                fixedTerms.add(pool.sum(still));
                movingTerms.add(pool.sum(moves));
                names.add(expanded.name(i));
            }
        }
        LawEvaluator fixedPart = LawEvaluator.forTerms(expanded, fixedTerms, names, false);
        LawEvaluator movingPart = LawEvaluator.forTerms(expanded, movingTerms, names, true);
        List<Integer> src = new ArrayList<>();
        List<Integer> dst = new ArrayList<>();
        for (int i = 0; i < expanded.size(); i++) {
            int[] lawColumns = laws.outputColumns(i);
            int[] movingColumns = movingPart.outputColumns(i);
            for (int p = 0; p < lawColumns.length; p++) {
                if (!chosen.contains(nIn + lawColumns[p])) {
                    continue;
                }
                for (int q = 0; q < movingColumns.length; q++) {
                    if (movingColumns[q] == lawColumns[p]) {
                        src.add(movingPart.outputOffset(i) + q);
                        dst.add(laws.outputOffset(i) + p);
                    }
                }
            }
        }
        return new ResidualSplit(fixedPart, movingPart, laws.outputNonzeros(), outputs.clone(), fixedAddends,
                src.stream().mapToInt(Integer::intValue).toArray(), dst.stream().mapToInt(Integer::intValue).toArray());
    }

    private static boolean involves(Term t, Set<Integer> variables) {
        for (int v : t.variables()) {
            if (variables.contains(v)) {
                return true;
            }
        }
        return false;
    }

    /** @return how many addends, over all laws, are in the fixed parts: zero when splitting saves nothing */
    public int fixedAddends() {
        return fixedAddends;
    }

    /** Work arrays of one thread; not safe to share. */
    public static final class Workspace {
        private final ResidualSplit owner;
        private final LawEvaluator.Workspace fixed;
        private final LawEvaluator.Workspace moving;
        private double[] residual = new double[0];
        private double[] scale = new double[0];
        private double[] jacobian = new double[0];

        private Workspace(ResidualSplit owner) {
            this.owner = owner;
            this.fixed = owner.fixed.newWorkspace();
            this.moving = owner.moving.newWorkspace();
        }

        private void ensure(int batch) {
            if (residual.length < batch * owner.lawCount || jacobian.length < batch * owner.movingNonzeros) {
                residual = new double[batch * owner.lawCount];
                scale = new double[batch * owner.lawCount];
                jacobian = new double[batch * owner.movingNonzeros];
            }
        }
    }

    /** @return a new workspace for one thread */
    public Workspace newWorkspace() {
        return new Workspace(this);
    }

    /**
     * Evaluates the fixed parts: residual and scale of the addends that involve none of the chosen outputs (whose
     * values in {@code y} are therefore not read).
     *
     * @param x         inputs, {@code batch * inputWidth} values (may be null when there are none); read only
     * @param y         outputs, {@code batch * outputWidth} values; read only
     * @param batch     number of samples
     * @param residuals output: {@code batch * lawCount} values
     * @param scales    output: {@code batch * lawCount} values
     * @param w         this thread's workspace
     * @throws IllegalArgumentException when an array is shorter than the batch needs or the workspace is another
     *                                  split's
     */
    public void fixed(double[] x, double[] y, int batch, double[] residuals, double[] scales, Workspace w) {
        check(w);
        fixed.residuals(x, y, batch, residuals, scales, w.fixed);
    }

    /**
     * Evaluates the whole residuals and scales from the fixed parts given and the moving parts computed here, and
     * the laws' dC/dy entries at the chosen columns (other entries of {@code jacobianY} are left as they were).
     *
     * @param x              inputs, {@code batch * inputWidth} values (may be null when there are none); read only
     * @param y              outputs, {@code batch * outputWidth} values; read only
     * @param batch          number of samples
     * @param fixedResiduals the samples' fixed residual parts, from {@link #fixed}; read only
     * @param fixedScales    the samples' fixed scale parts, from {@link #fixed}; read only
     * @param residuals      output: {@code batch * lawCount} values
     * @param scales         output: {@code batch * lawCount} values
     * @param jacobianY      output: {@code batch * outputNonzeros} entries in the layout of the laws' evaluator
     * @param w              this thread's workspace
     * @throws IllegalArgumentException when an array is shorter than the batch needs or the workspace is another
     *                                  split's
     */
    public void evaluate(double[] x, double[] y, int batch, double[] fixedResiduals, double[] fixedScales,
                         double[] residuals, double[] scales, double[] jacobianY, Workspace w) {
        check(w);
        w.ensure(batch);
        movingJacobian.evaluate(x, y, batch, w.residual, w.scale, w.jacobian, w.moving);
        for (int k = 0; k < batch * lawCount; k++) {
            residuals[k] = fixedResiduals[k] + w.residual[k];
            scales[k] = fixedScales[k] + w.scale[k];
        }
        for (int s = 0; s < batch; s++) {
            for (int e = 0; e < from.length; e++) {
                jacobianY[s * lawNonzeros + to[e]] = w.jacobian[s * movingNonzeros + from[e]];
            }
        }
    }

    private void check(Workspace w) {
        if (w.owner != this) {
            throw new IllegalArgumentException("the workspace belongs to another residual split");
        }
    }
}
