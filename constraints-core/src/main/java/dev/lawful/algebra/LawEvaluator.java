package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.atomic.AtomicReferenceArray;

/**
 * The laws and their Jacobians compiled into straight-line register code that runs over a batch: each instruction
 * processes a block of {@value #BLOCK} samples in one loop, so nothing walks an expression tree per sample and the
 * per-instruction dispatch is shared by the block. Common sub-expressions are computed once (the terms are
 * hash-consed) and registers are reused once a value is dead.
 *
 * <p>Batches are flat row-major arrays: sample {@code s} has inputs {@code x[s*inputWidth ..]} and outputs
 * {@code y[s*outputWidth ..]}, in the declared units. Residuals are in coherent SI units of each law's dimension.
 * The Jacobian of law {@code i} holds only the structurally nonzero entries listed by
 * {@link #outputColumns(int)} and {@link #inputColumns(int)}, law after law: per sample {@link #outputNonzeros()}
 * entries for dC/dy and {@link #inputNonzeros()} for dC/dx, each in SI units of the law per declared unit of the
 * variable.
 *
 * <p>Each combination of results asked for (residuals, scales, either Jacobian, or a {@link #partial} one) is
 * compiled into its own program the first time it is asked for, so a null buffer costs nothing.
 *
 * <p>Immutable and safe to share between threads; each thread passes its own {@link Workspace} (or lets a call
 * allocate one).
 */
public final class LawEvaluator {
    /** Samples processed per instruction. */
    public static final int BLOCK = BlockInterpreter.BLOCK;

    private final NamedTerms terms;
    /** The program of each combination of results asked for (bit per target), compiled on first use. */
    private final AtomicReferenceArray<Program> programs = new AtomicReferenceArray<>(1 << Program.TARGETS);

    /**
     * Work arrays for one thread and one evaluator. Reuse one per thread to evaluate without allocating; a
     * workspace is not safe to use from two threads at once.
     */
    public static final class Workspace {
        private double[][] registers = new double[0][];
        private final double[] scratch = new double[BLOCK];

        private final LawEvaluator owner;

        private Workspace(LawEvaluator owner) {
            this.owner = owner;
        }

        /** Grows to the registers a program needs; only the first call with a larger program allocates. */
        private double[][] registers(int count) {
            if (registers.length < count) {
                double[][] grown = Arrays.copyOf(registers, count);
                for (int i = registers.length; i < count; i++) {
                    grown[i] = new double[BLOCK];
                }
                registers = grown;
            }
            return registers;
        }
    }

    private LawEvaluator(NamedTerms terms) {
        this.terms = terms;
    }

    /**
     * Compiles residuals, natural scales and Jacobian entries of every law. Residuals, scales and derivatives are
     * compiled when an evaluation first asks for them.
     *
     * @param expanded the scalar laws
     * @return the evaluator of those laws, in {@link ExpandedLaws} order
     * @throws LawException when the derivatives grow beyond {@link Limits#MAX_SCALAR_NODES} (raised by the
     *                      first evaluation that asks for them)
     */
    public static LawEvaluator compile(ExpandedLaws expanded) {
        return new LawEvaluator(NamedTerms.ofLaws(expanded));
    }

    /**
     * Compiles arbitrary scalar terms of a law set (for example {@link ExpandedLaws#guesses()}) into an evaluator
     * whose "residuals" are the terms' values; it has no Jacobian entries and its scales are the terms' magnitudes.
     *
     * @param expanded the law set the terms belong to
     * @param terms    the terms, in the order their values are stored per sample
     * @param names    one name per term, for {@link #lawName(int)}
     * @return the evaluator of those terms
     * @throws IllegalArgumentException when the counts differ or a term belongs to another law set
     */
    public static LawEvaluator forTerms(ExpandedLaws expanded, List<Term> terms, List<String> names) {
        return forTerms(expanded, terms, names, false);
    }

    /**
     * Like {@link #forTerms(ExpandedLaws, List, List)}, optionally with the Jacobian entries of every variable each
     * term depends on (laid out as for laws, see {@link #outputColumns(int)}).
     *
     * @param jacobians whether the evaluator computes Jacobian entries
     */
    static LawEvaluator forTerms(ExpandedLaws expanded, List<Term> terms, List<String> names, boolean jacobians) {
        return new LawEvaluator(NamedTerms.of(expanded, terms, names, jacobians));
    }

    // ---- shape -----------------------------------------------------------------------------------------------

    /** @return input elements per sample */
    public int inputWidth() {
        return terms.inputWidth();
    }

    /** @return output elements per sample */
    public int outputWidth() {
        return terms.outputWidth();
    }

    /** @return scalar laws per sample */
    public int lawCount() {
        return terms.size();
    }

    /**
     * @param i a scalar law index, 0 .. {@code lawCount() - 1}
     * @return the name of scalar law {@code i}
     * @throws ArrayIndexOutOfBoundsException when {@code i} is out of range
     */
    public String lawName(int i) {
        return terms.name(i);
    }

    /** @return structurally nonzero dC/dy entries per sample */
    public int outputNonzeros() {
        return terms.pattern().outputNonzeros();
    }

    /** @return structurally nonzero dC/dx entries per sample */
    public int inputNonzeros() {
        return terms.pattern().inputNonzeros();
    }

    /**
     * @param i a scalar law index, 0 .. {@code lawCount() - 1}
     * @return the output element index of each dC/dy entry of law {@code i}, in storage order (a new array)
     * @throws ArrayIndexOutOfBoundsException when {@code i} is out of range
     */
    public int[] outputColumns(int i) {
        return terms.pattern().outputColumns(i);
    }

    /**
     * @param i a scalar law index, 0 .. {@code lawCount()} (the count gives the number of entries)
     * @return the position of law {@code i}'s first dC/dy entry within a sample's entries
     * @throws ArrayIndexOutOfBoundsException when {@code i} is out of range
     */
    public int outputOffset(int i) {
        return terms.pattern().outputOffset(i);
    }

    /**
     * @param i a scalar law index, 0 .. {@code lawCount() - 1}
     * @return the input element index of each dC/dx entry of law {@code i}, in storage order (a new array)
     * @throws ArrayIndexOutOfBoundsException when {@code i} is out of range
     */
    public int[] inputColumns(int i) {
        return terms.pattern().inputColumns(i);
    }

    /**
     * @param i a scalar law index, 0 .. {@code lawCount()} (the count gives the number of entries)
     * @return the position of law {@code i}'s first dC/dx entry within a sample's entries
     * @throws ArrayIndexOutOfBoundsException when {@code i} is out of range
     */
    public int inputOffset(int i) {
        return terms.pattern().inputOffset(i);
    }

    /** @return a new workspace large enough for every method of this evaluator, for one thread at a time */
    public Workspace newWorkspace() {
        return new Workspace(this);
    }

    // ---- evaluation ------------------------------------------------------------------------------------------

    /**
     * Computes each law's residual C = lhs - rhs and its natural scale for every sample. The scale is the sum of
     * the magnitudes of the law's addends once products are distributed over sums ({@link ExpandedLaws#scale}):
     * for {@code cp * sum(dp * dT) / g = flux} it is Σ_k |cp·dp_k·dT_k/g| + |flux|. It is at least the largest
     * term, it is what rounding errors are proportional to, and a residual is judged relative to it. Allocates
     * nothing when given a workspace; a null buffer is not computed at all.
     *
     * @param x         inputs, {@code batch * inputWidth} values (may be null when {@code inputWidth} is 0); read only
     * @param y         outputs, {@code batch * outputWidth} values; read only
     * @param batch     number of samples
     * @param residuals output buffer of {@code batch * lawCount} values, or null
     * @param scales    output buffer of {@code batch * lawCount} values, or null
     * @param workspace this thread's work arrays, from {@link #newWorkspace()}; overwritten
     * @throws IllegalArgumentException when an array is shorter than the batch needs, the batch is negative or the
     *                                  workspace belongs to another evaluator
     * @throws LawException             when the scales grow beyond {@link Limits#MAX_SCALAR_NODES}
     */
    public void residuals(double[] x, double[] y, int batch, double[] residuals, double[] scales, Workspace workspace) {
        check(x, y, batch, residuals, scales, null, null);
        run(program(mask(residuals, scales, null, null)), x, y, batch, residuals, scales, null, null, workspace);
    }

    /**
     * Like {@link #residuals(double[], double[], int, double[], double[], Workspace)}, allocating a workspace.
     *
     * @param x         inputs, {@code batch * inputWidth} values (may be null when {@code inputWidth} is 0); read only
     * @param y         outputs, {@code batch * outputWidth} values; read only
     * @param batch     number of samples
     * @param residuals output buffer of {@code batch * lawCount} values, or null
     * @param scales    output buffer of {@code batch * lawCount} values, or null
     * @throws IllegalArgumentException when an array is shorter than the batch needs or the batch is negative
     */
    public void residuals(double[] x, double[] y, int batch, double[] residuals, double[] scales) {
        residuals(x, y, batch, residuals, scales, newWorkspace());
    }

    /**
     * Computes residuals, scales and the structurally nonzero Jacobian entries dC/dy and dC/dx of every sample.
     * Every output buffer is optional (null skips it). Allocates nothing when given a workspace.
     *
     * @param x         inputs, {@code batch * inputWidth} values (may be null when {@code inputWidth} is 0); read only
     * @param y         outputs, {@code batch * outputWidth} values; read only
     * @param batch     number of samples
     * @param residuals output buffer of {@code batch * lawCount} values, or null
     * @param scales    output buffer of {@code batch * lawCount} values, or null
     * @param jacobianY output buffer of {@code batch * outputNonzeros()} values, or null
     * @param jacobianX output buffer of {@code batch * inputNonzeros()} values, or null
     * @param workspace this thread's work arrays, from {@link #newWorkspace()}; overwritten
     * @throws IllegalArgumentException when an array is shorter than the batch needs, the batch is negative or the
     *                                  workspace belongs to another evaluator
     * @throws LawException             when the derivatives grow beyond {@link Limits#MAX_SCALAR_NODES}
     */
    public void evaluate(double[] x, double[] y, int batch, double[] residuals, double[] scales, double[] jacobianY,
                         double[] jacobianX, Workspace workspace) {
        check(x, y, batch, residuals, scales, jacobianY, jacobianX);
        // only what is asked for is computed: a null buffer costs nothing
        Program p = program(mask(residuals, scales, jacobianY, jacobianX));
        run(p, x, y, batch, residuals, scales, jacobianY, jacobianX, workspace);
    }

    /**
     * Like {@link #evaluate(double[], double[], int, double[], double[], double[], double[], Workspace)},
     * allocating a workspace.
     *
     * @param x         inputs, {@code batch * inputWidth} values (may be null when {@code inputWidth} is 0); read only
     * @param y         outputs, {@code batch * outputWidth} values; read only
     * @param batch     number of samples
     * @param residuals output buffer of {@code batch * lawCount} values, or null
     * @param scales    output buffer of {@code batch * lawCount} values, or null
     * @param jacobianY output buffer of {@code batch * outputNonzeros()} values, or null
     * @param jacobianX output buffer of {@code batch * inputNonzeros()} values, or null
     * @throws IllegalArgumentException when an array is shorter than the batch needs or the batch is negative
     * @throws LawException             when the derivatives grow beyond {@link Limits#MAX_SCALAR_NODES}
     */
    public void evaluate(double[] x, double[] y, int batch, double[] residuals, double[] scales, double[] jacobianY,
                         double[] jacobianX) {
        evaluate(x, y, batch, residuals, scales, jacobianY, jacobianX, newWorkspace());
    }

    /**
     * The Jacobian entries dC/dy of some output columns only: what a solver for those outputs needs (a Newton step
     * or an affine solve for the completed outputs reads nothing else), at a fraction of the cost of all of them
     * when the laws involve many other outputs.
     *
     * @param outputColumns the output columns (0 .. outputWidth − 1) whose entries are computed; not modified
     * @return an evaluation of residuals, scales and those entries; immutable and thread-safe
     * @throws IllegalArgumentException when a column is out of range
     */
    public Partial partial(int[] outputColumns) {
        boolean[] keep = new boolean[outputWidth()];
        for (int c : outputColumns) {
            if (c < 0 || c >= outputWidth()) {
                throw new IllegalArgumentException("output column " + c + " is out of range 0 .. "
                        + (outputWidth() - 1));
            }
            keep[c] = true;
        }
        boolean[] entries = new boolean[outputNonzeros()];
        for (int k = 0; k < entries.length; k++) {
            entries[k] = keep[terms.pattern().outputColumn(k)];
        }
        return new Partial(entries);
    }

    /**
     * The dC/dy entries chosen one by one: for a caller that knows some entries already (such as the constant ones,
     * {@link #constantOutputEntries()}) and needs only the others.
     *
     * @param entries per dC/dy entry (in storage order, {@link #outputNonzeros()} of them), whether it is computed;
     *                copied
     * @return an evaluation of residuals, scales and those entries; immutable and thread-safe
     * @throws IllegalArgumentException when the array's length is not {@link #outputNonzeros()}
     */
    public Partial partialEntries(boolean[] entries) {
        if (entries.length != outputNonzeros()) {
            throw new IllegalArgumentException("one flag per dC/dy entry: expected " + outputNonzeros() + ", found "
                    + entries.length);
        }
        return new Partial(entries.clone());
    }

    /**
     * @return per dC/dy entry (in storage order), its value when the derivative is a constant (the same for every
     *         sample: a free output entering a law linearly with a constant coefficient, say), else NaN; a new array
     * @throws LawException when the derivatives grow beyond {@link Limits#MAX_SCALAR_NODES}
     */
    public double[] constantOutputEntries() {
        double[] c = new double[outputNonzeros()];
        for (Program.Root r : terms.roots(Program.JACOBIAN_Y)) {
            c[r.slot()] = r.term().kind() == Term.Kind.CONST ? r.term().constant() : Double.NaN;
        }
        return c;
    }

    /**
     * Residuals, scales and chosen dC/dy entries ({@link #partial(int[])}, {@link #partialEntries(boolean[])}),
     * optionally with every dC/dx entry. Entries not chosen in the Jacobian buffer are left as they were.
     */
    public final class Partial {
        private final boolean[] keep;
        private final AtomicReferenceArray<Program> partialPrograms = new AtomicReferenceArray<>(16);

        private Partial(boolean[] keep) {
            this.keep = keep;
        }

        /**
         * Like {@link LawEvaluator#evaluate(double[], double[], int, double[], double[], double[], double[],
         * Workspace)} without dC/dx, computing only the chosen entries of {@code jacobianY} (same layout).
         *
         * @param x         inputs, {@code batch * inputWidth} values (may be null when {@code inputWidth} is 0)
         * @param y         outputs, {@code batch * outputWidth} values; read only
         * @param batch     number of samples
         * @param residuals output buffer of {@code batch * lawCount} values, or null
         * @param scales    output buffer of {@code batch * lawCount} values, or null
         * @param jacobianY output buffer of {@code batch * outputNonzeros()} values (required); only the chosen
         *                  entries are written
         * @param workspace this thread's work arrays, from {@link LawEvaluator#newWorkspace()}; overwritten
         * @throws IllegalArgumentException when an array is shorter than the batch needs, the batch is negative or
         *                                  the workspace belongs to another evaluator
         * @throws LawException             when the derivatives grow beyond {@link Limits#MAX_SCALAR_NODES}
         */
        public void evaluate(double[] x, double[] y, int batch, double[] residuals, double[] scales,
                             double[] jacobianY, Workspace workspace) {
            evaluate(x, y, batch, residuals, scales, jacobianY, null, workspace);
        }

        /**
         * Like {@link #evaluate(double[], double[], int, double[], double[], double[], Workspace)}, with every dC/dx
         * entry too when {@code jacobianX} is given.
         *
         * @param jacobianX output buffer of {@code batch * inputNonzeros()} values, or null
         */
        public void evaluate(double[] x, double[] y, int batch, double[] residuals, double[] scales,
                             double[] jacobianY, double[] jacobianX, Workspace workspace) {
            check(x, y, batch, residuals, scales, jacobianY, jacobianX);
            int mask = mask(residuals, scales, null, jacobianX);
            Program p = partialPrograms.get(mask);
            if (p == null) {
                partialPrograms.compareAndSet(mask, null, compile(partialRoots(residuals != null, scales != null,
                        jacobianX != null)));
                p = partialPrograms.get(mask);
            }
            run(p, x, y, batch, residuals, scales, jacobianY, jacobianX, workspace);
        }

        private List<Program.Root> partialRoots(boolean residuals, boolean scales, boolean inputs) {
            List<Program.Root> wanted = new ArrayList<>();
            if (residuals) {
                wanted.addAll(terms.roots(Program.VALUE));
            }
            if (scales) {
                wanted.addAll(terms.roots(Program.SCALE));
            }
            for (Program.Root r : terms.roots(Program.JACOBIAN_Y)) {
                if (keep[r.slot()]) {
                    wanted.add(r);
                }
            }
            if (inputs) {
                wanted.addAll(terms.roots(Program.JACOBIAN_X));
            }
            return wanted;
        }
    }

    // ---- programs --------------------------------------------------------------------------------------------

    private static int mask(double[] residuals, double[] scales, double[] jy, double[] jx) {
        return (residuals != null ? 1 << Program.VALUE : 0) | (scales != null ? 1 << Program.SCALE : 0)
                | (jy != null ? 1 << Program.JACOBIAN_Y : 0) | (jx != null ? 1 << Program.JACOBIAN_X : 0);
    }

    /** @return the program computing exactly the results in {@code mask} (bit per target), compiled once */
    private Program program(int mask) {
        Program p = programs.get(mask);
        if (p == null) {
            List<Program.Root> wanted = new ArrayList<>();
            for (int target = 0; target < Program.TARGETS; target++) {
                if ((mask & (1 << target)) != 0) {
                    wanted.addAll(terms.roots(target));
                }
            }
            // two threads may both compile it; the programs are equal and one wins
            programs.compareAndSet(mask, null, compile(wanted));
            p = programs.get(mask);
        }
        return p;
    }

    private Program compile(List<Program.Root> roots) {
        return ProgramCompiler.compile(terms.pool(), roots, inputWidth(), outputWidth(), terms.slots());
    }

    private void check(double[] x, double[] y, int batch, double[] residuals, double[] scales, double[] jy,
                       double[] jx) {
        if (batch < 0) {
            throw new IllegalArgumentException("batch must be >= 0, found " + batch);
        }
        need("x (inputs)", x, (long) batch * inputWidth());
        need("y (outputs)", y, (long) batch * outputWidth());
        if (residuals != null) {
            need("residuals", residuals, (long) batch * lawCount());
        }
        if (scales != null) {
            need("scales", scales, (long) batch * lawCount());
        }
        if (jy != null) {
            need("jacobianY", jy, (long) batch * outputNonzeros());
        }
        if (jx != null) {
            need("jacobianX", jx, (long) batch * inputNonzeros());
        }
    }

    private static void need(String what, double[] a, long n) {
        if (n > 0 && (a == null || a.length < n)) {
            throw new IllegalArgumentException(what + " must hold at least " + n + " values for this batch, found "
                    + (a == null ? "null" : a.length));
        }
    }

    private void run(Program p, double[] x, double[] y, int batch, double[] res, double[] scale, double[] jy,
                     double[] jx, Workspace ws) {
        if (ws.owner != this) {
            throw new IllegalArgumentException("workspace belongs to another evaluator; use this evaluator's "
                    + "newWorkspace()");
        }
        BlockInterpreter.run(p, x, y, batch, res, scale, jy, jx, ws.registers(p.registers()), ws.scratch);
    }
}
