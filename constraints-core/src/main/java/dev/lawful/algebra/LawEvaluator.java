package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

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
 * <p>Immutable and safe to share between threads; each thread passes its own {@link Workspace} (or lets a call
 * allocate one).
 */
public final class LawEvaluator {
    /** Samples processed per instruction. */
    public static final int BLOCK = 64;

    private static final int CONST = 0;
    private static final int IN = 1;
    private static final int OUT = 2;
    private static final int SUM = 3;
    private static final int NEG = 4;
    private static final int MUL = 5;
    private static final int DIV = 6;
    private static final int POW = 7;
    private static final int POWI = 8;
    private static final int FN = 9;
    private static final int STORE = 10;

    private static final int TO_RESIDUAL = 0;
    private static final int TO_SCALE = 1;
    private static final int TO_JY = 2;
    private static final int TO_JX = 3;

    private static final Function[] FUNCTIONS = Function.values();

    private final int inputWidth;
    private final int outputWidth;
    private final int laws;
    private final String[] lawNames;
    private final int[] outStart;
    private final int[] outColumns;
    private final int[] inStart;
    private final int[] inColumns;
    /** Roots given up front (arbitrary terms), or null when they are built from {@link #expanded} on demand. */
    private final List<Root> roots;
    private final ExpandedLaws expanded;
    private final java.util.concurrent.atomic.AtomicReferenceArray<List<Root>> groups =
            new java.util.concurrent.atomic.AtomicReferenceArray<>(4);
    private final TermPool pool;
    private final java.util.concurrent.atomic.AtomicReferenceArray<Program> programs =
            new java.util.concurrent.atomic.AtomicReferenceArray<>(16);

    /** Work arrays for one thread. Reuse one per thread to evaluate without allocating. */
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

    private record Program(int[] code, double[] constants, int registers) {
    }

    private record Root(Term term, int target, int index) {
    }

    /**
     * Compiles residuals, natural scales and Jacobian entries of every law.
     *
     * @param expanded the scalar laws
     * @throws LawException when the derivatives grow beyond {@link Limits#MAX_SCALAR_NODES}
     */
    public static LawEvaluator compile(ExpandedLaws expanded) {
        return new LawEvaluator(expanded);
    }

    /**
     * Compiles arbitrary scalar terms of a law set (for example {@link ExpandedLaws#guesses()}) into an evaluator
     * whose "residuals" are the terms' values; it has no Jacobian entries and its scales are the terms' magnitudes.
     *
     * @param expanded the law set the terms belong to
     * @param terms    the terms, in the order their values are stored per sample
     * @param names    one name per term, for {@link #lawName(int)}
     */
    public static LawEvaluator forTerms(ExpandedLaws expanded, List<Term> terms, List<String> names) {
        return new LawEvaluator(expanded, terms, names);
    }

    private LawEvaluator(ExpandedLaws e, List<Term> terms, List<String> names) {
        if (terms.size() != names.size()) {
            throw new IllegalArgumentException("one name per term: " + terms.size() + " terms, " + names.size()
                    + " names");
        }
        this.inputWidth = e.inputWidth();
        this.outputWidth = e.outputWidth();
        this.laws = terms.size();
        this.lawNames = names.toArray(new String[0]);
        this.outStart = new int[laws + 1];
        this.inStart = new int[laws + 1];
        this.outColumns = new int[0];
        this.inColumns = new int[0];
        List<Root> roots = new ArrayList<>();
        for (int i = 0; i < laws; i++) {
            Term t = terms.get(i);
            if (t.pool != e.pool()) {
                throw new IllegalArgumentException("term " + i + " belongs to another law set");
            }
            roots.add(new Root(t, TO_RESIDUAL, i));
            roots.add(new Root(e.pool().magnitude(t), TO_SCALE, i));
        }
        this.roots = List.copyOf(roots);
        this.expanded = e;
        this.pool = e.pool();
    }

    private LawEvaluator(ExpandedLaws e) {
        this.inputWidth = e.inputWidth();
        this.outputWidth = e.outputWidth();
        this.laws = e.size();
        this.lawNames = new String[laws];
        this.outStart = new int[laws + 1];
        this.inStart = new int[laws + 1];
        List<Integer> outCols = new ArrayList<>();
        List<Integer> inCols = new ArrayList<>();
        // the Jacobian pattern is structural (it keeps an entry even when its derivative is identically zero), so
        // it is known without differentiating; residuals, scales and derivatives are built when first asked for
        for (int i = 0; i < laws; i++) {
            lawNames[i] = e.name(i);
            for (int v : e.outputs(i)) {
                outCols.add(v);
            }
            for (int v : e.inputs(i)) {
                inCols.add(v);
            }
            outStart[i + 1] = outCols.size();
            inStart[i + 1] = inCols.size();
        }
        this.outColumns = outCols.stream().mapToInt(Integer::intValue).toArray();
        this.inColumns = inCols.stream().mapToInt(Integer::intValue).toArray();
        this.expanded = e;
        this.roots = null;
        this.pool = e.pool();
    }

    /** @return the roots storing results of {@code target}, built on first use */
    private List<Root> roots(int target) {
        List<Root> r = groups.get(target);
        if (r != null) {
            return r;
        }
        List<Root> built = new ArrayList<>();
        if (roots != null) {
            for (Root root : roots) {
                if (root.target() == target) {
                    built.add(root);
                }
            }
        } else {
            try {
                for (int i = 0; i < laws; i++) {
                    if (target == TO_RESIDUAL) {
                        built.add(new Root(expanded.residual(i), TO_RESIDUAL, i));
                    } else if (target == TO_SCALE) {
                        built.add(new Root(expanded.scale(i), TO_SCALE, i));
                    } else {
                        Map<Integer, Term> g = expanded.gradient(i);
                        Term zero = pool.constant(0);
                        if (target == TO_JY) {
                            for (int k = outStart[i]; k < outStart[i + 1]; k++) {
                                built.add(new Root(g.getOrDefault(inputWidth + outColumns[k], zero), TO_JY, k));
                            }
                        } else {
                            for (int k = inStart[i]; k < inStart[i + 1]; k++) {
                                built.add(new Root(g.getOrDefault(inColumns[k], zero), TO_JX, k));
                            }
                        }
                    }
                }
            } catch (TermPool.TooLarge tooLarge) {
                Diagnostics d = new Diagnostics(new SourceText("<derivatives>", ""));
                d.error(new Span(0, 0), "the derivatives of the law set need more than " + Limits.MAX_SCALAR_NODES
                        + " scalar expression nodes; split the law set or use fewer vector elements");
                throw new LawException(d.all(), 0);
            }
        }
        groups.compareAndSet(target, null, List.copyOf(built));
        return groups.get(target);
    }

    // ---- assembly --------------------------------------------------------------------------------------------

    private static int mask(double[] residuals, double[] scales, double[] jy, double[] jx) {
        return (residuals != null ? 1 : 0) | (scales != null ? 2 : 0) | (jy != null ? 4 : 0) | (jx != null ? 8 : 0);
    }

    /** @return the program computing exactly the results in {@code mask} (bit per target), compiled once */
    private Program program(int mask) {
        Program p = programs.get(mask);
        if (p == null) {
            List<Root> wanted = new ArrayList<>();
            for (int target = 0; target < 4; target++) {
                if ((mask & (1 << target)) != 0) {
                    wanted.addAll(roots(target));
                }
            }
            // two threads may both compile it; the programs are equal and one wins
            programs.compareAndSet(mask, null, assemble(wanted, pool));
            p = programs.get(mask);
        }
        return p;
    }

    private Program assemble(List<Root> roots, TermPool pool) {
        synchronized (pool) {
            return assembleLocked(roots, pool);
        }
    }

    private Program assembleLocked(List<Root> roots, TermPool pool) {
        // every node any root needs (arrays indexed by node id: compile time stays linear in the program size)
        int size = pool.size();
        boolean[] needed = new boolean[size];
        int[] stack = new int[64];
        for (Root r : roots) {
            int top = 0;
            if (!needed[r.term().id]) {
                needed[r.term().id] = true;
                stack[top++] = r.term().id;
            }
            while (top > 0) {
                Term t = pool.node(stack[--top]);
                for (Term a : t.args) {
                    if (!needed[a.id]) {
                        needed[a.id] = true;
                        if (top == stack.length) {
                            stack = Arrays.copyOf(stack, top * 2);
                        }
                        stack[top++] = a.id;
                    }
                }
            }
        }
        int[] firstRoot = new int[size];
        Arrays.fill(firstRoot, -1);
        int[] nextRoot = new int[roots.size()];
        for (int k = roots.size() - 1; k >= 0; k--) {
            int id = roots.get(k).term().id;
            nextRoot[k] = firstRoot[id];
            firstRoot[id] = k;
        }
        // which nodes get an instruction: a root, or a node some emitted parent reads. Parents have larger ids than
        // their children, so one pass downwards decides every node. A sum reads a cheap addend (c·v, −v, |v|,
        // c·|v|, a constant) in place from the register of v, so such an addend gets no instruction of its own
        // unless something else reads it; a constant exponent folded into POWI is not read either.
        boolean[] emitted = new boolean[size];
        boolean[] read = new boolean[size];
        for (int id = size - 1; id >= 0; id--) {
            if (!needed[id] || !(read[id] || firstRoot[id] >= 0)) {
                continue;
            }
            emitted[id] = true;
            Term t = pool.node(id);
            if (t.kind == Term.Kind.SUM) {
                for (Term a : t.args) {
                    Inline in = inline(a);
                    if (in == null) {
                        read[a.id] = true;
                    } else if (in.base() != null) {
                        read[in.base().id] = true;
                    }
                }
            } else {
                int argCount = isIntegerPower(t) ? 1 : t.args.length;
                for (int a = 0; a < argCount; a++) {
                    read[t.args[a].id] = true;
                }
            }
        }
        // instructions (op and aux words, used nodes, defined node) in id order, children first
        List<int[]> instrs = new ArrayList<>();
        List<int[]> uses = new ArrayList<>();
        IntList defines = new IntList();
        List<Double> constants = new ArrayList<>();
        for (int id = 0; id < size; id++) {
            if (!emitted[id]) {
                continue;
            }
            Term t = pool.node(id);
            int[] args;
            int[] aux;
            if (t.kind == Term.Kind.SUM) {
                // per addend: the node whose register it reads (−1 for a constant alone), the index of its
                // constant factor (−1 for none) and whether it takes the magnitude
                int[] operand = new int[3 * t.args.length];
                IntList bases = new IntList();
                for (int k = 0; k < t.args.length; k++) {
                    Inline in = inline(t.args[k]);
                    if (in == null) {
                        operand[3 * k] = t.args[k].id;
                        operand[3 * k + 1] = -1;
                        bases.add(t.args[k].id);
                        continue;
                    }
                    operand[3 * k] = in.base() == null ? -1 : in.base().id;
                    if (in.base() != null) {
                        bases.add(in.base().id);
                    }
                    if (in.hasFactor()) {
                        constants.add(in.factor());
                        operand[3 * k + 1] = constants.size() - 1;
                    } else {
                        operand[3 * k + 1] = -1;
                    }
                    operand[3 * k + 2] = in.abs() ? 1 : 0;
                }
                args = Arrays.copyOf(bases.a, bases.size);
                aux = new int[1 + operand.length];
                aux[0] = SUM;
                System.arraycopy(operand, 0, aux, 1, operand.length);
                instrs.add(aux);
                uses.add(args);
                defines.add(id);
                for (int k = firstRoot[id]; k >= 0; k = nextRoot[k]) {
                    Root r = roots.get(k);
                    instrs.add(new int[] {STORE, r.target(), r.index()});
                    uses.add(new int[] {id});
                    defines.add(-1);
                }
                continue;
            }
            args = new int[isIntegerPower(t) ? 1 : t.args.length];
            for (int k = 0; k < args.length; k++) {
                args[k] = t.args[k].id;
            }
            switch (t.kind) {
                case CONST:
                    constants.add(t.value);
                    aux = new int[] {CONST, constants.size() - 1};
                    break;
                case VAR:
                    aux = t.variable < inputWidth ? new int[] {IN, t.variable} : new int[] {OUT, t.variable - inputWidth};
                    break;
                case NEG:
                    aux = new int[] {NEG};
                    break;
                case MUL:
                    aux = new int[] {MUL};
                    break;
                case DIV:
                    aux = new int[] {DIV};
                    break;
                case POW:
                    // a whole constant exponent uses the same binary exponentiation Kernels.pow picks for it
                    aux = isIntegerPower(t) ? new int[] {POWI, (int) t.args[1].value} : new int[] {POW};
                    break;
                case FN:
                    aux = new int[] {FN, t.function.ordinal()};
                    break;
                default:
                    throw new AssertionError(t.kind);
            }
            instrs.add(aux);
            uses.add(args);
            defines.add(id);
            for (int k = firstRoot[id]; k >= 0; k = nextRoot[k]) {
                Root r = roots.get(k);
                instrs.add(new int[] {STORE, r.target(), r.index()});
                uses.add(new int[] {id});
                defines.add(-1);
            }
        }
        int[] lastUse = new int[size];
        Arrays.fill(lastUse, -1);
        for (int k = 0; k < instrs.size(); k++) {
            for (int a : uses.get(k)) {
                lastUse[a] = k;
            }
        }
        // linear-scan register allocation over last uses
        int[] register = new int[size];
        Arrays.fill(register, -1);
        int[] free = new int[16];
        int freeCount = 0;
        int registers = 0;
        int[] code = new int[64];
        int length = 0;
        for (int k = 0; k < instrs.size(); k++) {
            int[] aux = instrs.get(k);
            int[] args = uses.get(k);
            int[] regs = new int[args.length];
            for (int a = 0; a < args.length; a++) {
                regs[a] = register[args[a]];
            }
            // element-wise ops may write over an operand; a sum writes its result while it still reads the
            // operands, so it gets a register of its own before they are freed
            boolean inPlace = aux[0] != SUM;
            int dst = -1;
            int node = defines.get(k);
            if (!inPlace) {
                dst = freeCount > 0 ? free[--freeCount] : registers++;
            }
            for (int a = 0; a < args.length; a++) {
                if (lastUse[args[a]] == k && register[args[a]] >= 0) {
                    if (freeCount == free.length) {
                        free = Arrays.copyOf(free, freeCount * 2);
                    }
                    free[freeCount++] = register[args[a]];
                    register[args[a]] = -1;
                }
            }
            if (node >= 0) {
                if (inPlace) {
                    dst = freeCount > 0 ? free[--freeCount] : registers++;
                }
                register[node] = dst;
                if (lastUse[node] < 0) {
                    throw new AssertionError("node " + node + " is computed but never used");
                }
            }
            int[] words = aux[0] == SUM ? encodeSum(aux, dst, regs) : encode(aux, dst, regs);
            if (length + words.length > code.length) {
                code = Arrays.copyOf(code, Math.max(code.length * 2, length + words.length));
            }
            System.arraycopy(words, 0, code, length, words.length);
            length += words.length;
        }
        double[] c = new double[constants.size()];
        for (int i = 0; i < c.length; i++) {
            c[i] = constants.get(i);
        }
        return new Program(Arrays.copyOf(code, length), c, Math.max(registers, 1));
    }

    private static boolean isIntegerPower(Term t) {
        if (t.kind != Term.Kind.POW || t.args[1].kind != Term.Kind.CONST) {
            return false;
        }
        double e = t.args[1].value;
        return e == Math.rint(e) && Math.abs(e) <= Kernels.MAX_INTEGER_POWER;
    }

    /** A growable list of ints without boxing. */
    private static final class IntList {
        private int[] a = new int[64];
        private int size;

        void add(int v) {
            if (size == a.length) {
                a = Arrays.copyOf(a, size * 2);
            }
            a[size++] = v;
        }

        int get(int i) {
            return a[i];
        }
    }

    /** A sum's addend read in place: factor·base, factor·|base| or |base| (base null: the factor alone). */
    private record Inline(Term base, boolean hasFactor, double factor, boolean abs) {
    }

    /**
     * @return how a sum reads {@code a} in place, or null when {@code a} is a register of its own (a variable, a
     *         sum, anything not cheap). The value is the same bits as the node's: c·v is one rounded product either
     *         way (IEEE multiplication commutes), −v is (−1)·v and |v| is exact.
     */
    private static Inline inline(Term a) {
        if (a.kind == Term.Kind.CONST) {
            return new Inline(null, true, a.value, false);
        }
        Term x;
        boolean hasFactor = true;
        double c;
        if (a.kind == Term.Kind.MUL && a.args.length == 2 && a.args[0].kind == Term.Kind.CONST) {
            c = a.args[0].value;
            x = a.args[1];
        } else if (a.kind == Term.Kind.MUL && a.args.length == 2 && a.args[1].kind == Term.Kind.CONST) {
            c = a.args[1].value;
            x = a.args[0];
        } else if (a.kind == Term.Kind.NEG) {
            c = -1;
            x = a.args[0];
        } else {
            hasFactor = false;
            c = 1;
            x = a;
        }
        boolean abs = false;
        if (x.kind == Term.Kind.FN && x.function == Function.ABS) {
            abs = true;
            x = x.args[0];
        }
        if (!hasFactor && !abs || x.kind == Term.Kind.CONST) {
            return null;
        }
        return new Inline(x, hasFactor, c, abs);
    }

    /**
     * Encodes a sum: {@code SUM, dst, count}, then per addend its register (−1: none), constant index (−1: none)
     * and magnitude flag; {@code regs} holds the registers of the addends that read one, in addend order.
     */
    private static int[] encodeSum(int[] aux, int dst, int[] regs) {
        int count = (aux.length - 1) / 3;
        int[] w = new int[3 + 3 * count];
        w[0] = SUM;
        w[1] = dst;
        w[2] = count;
        int next = 0;
        for (int k = 0; k < count; k++) {
            w[3 + 3 * k] = aux[1 + 3 * k] < 0 ? -1 : regs[next++];
            w[4 + 3 * k] = aux[2 + 3 * k];
            w[5 + 3 * k] = aux[3 + 3 * k];
        }
        return w;
    }

    private static int[] encode(int[] aux, int dst, int[] regs) {
        switch (aux[0]) {
            case CONST:
            case IN:
            case OUT:
                return new int[] {aux[0], dst, aux[1]};
            case NEG:
                return new int[] {NEG, dst, regs[0]};
            case POWI:
                return new int[] {POWI, dst, regs[0], aux[1]};
            case MUL:
            case DIV:
            case POW:
                return new int[] {aux[0], dst, regs[0], regs[1]};
            case FN:
                return new int[] {FN, dst, aux[1], regs[0]};
            case STORE:
                return new int[] {STORE, aux[1], aux[2], regs[0]};
            default:
                throw new AssertionError(aux[0]);
        }
    }

    // ---- shape -----------------------------------------------------------------------------------------------

    /** @return input elements per sample */
    public int inputWidth() {
        return inputWidth;
    }

    /** @return output elements per sample */
    public int outputWidth() {
        return outputWidth;
    }

    /** @return scalar laws per sample */
    public int lawCount() {
        return laws;
    }

    /** @return the name of scalar law {@code i} */
    public String lawName(int i) {
        return lawNames[i];
    }

    /** @return structurally nonzero dC/dy entries per sample */
    public int outputNonzeros() {
        return outColumns.length;
    }

    /** @return structurally nonzero dC/dx entries per sample */
    public int inputNonzeros() {
        return inColumns.length;
    }

    /** @return the output element index of each dC/dy entry of law {@code i}, in storage order */
    public int[] outputColumns(int i) {
        return Arrays.copyOfRange(outColumns, outStart[i], outStart[i + 1]);
    }

    /** @return the position of law {@code i}'s first dC/dy entry within a sample's entries */
    public int outputOffset(int i) {
        return outStart[i];
    }

    /** @return the input element index of each dC/dx entry of law {@code i}, in storage order */
    public int[] inputColumns(int i) {
        return Arrays.copyOfRange(inColumns, inStart[i], inStart[i + 1]);
    }

    /** @return the position of law {@code i}'s first dC/dx entry within a sample's entries */
    public int inputOffset(int i) {
        return inStart[i];
    }

    /** @return a workspace large enough for every method of this evaluator */
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
     * @param x         inputs, {@code batch * inputWidth} values (may be null when {@code inputWidth} is 0)
     * @param y         outputs, {@code batch * outputWidth} values
     * @param batch     number of samples
     * @param residuals output buffer of {@code batch * lawCount} values, or null
     * @param scales    output buffer of {@code batch * lawCount} values, or null
     * @param workspace this thread's work arrays, from {@link #newWorkspace()}
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public void residuals(double[] x, double[] y, int batch, double[] residuals, double[] scales, Workspace workspace) {
        check(x, y, batch, residuals, scales, null, null);
        run(program(mask(residuals, scales, null, null)), x, y, batch, residuals, scales, null, null, workspace);
    }

    /** Like {@link #residuals(double[], double[], int, double[], double[], Workspace)}, allocating a workspace. */
    public void residuals(double[] x, double[] y, int batch, double[] residuals, double[] scales) {
        residuals(x, y, batch, residuals, scales, newWorkspace());
    }

    /**
     * Computes residuals, scales and the structurally nonzero Jacobian entries dC/dy and dC/dx of every sample.
     * Every output buffer is optional (null skips it). Allocates nothing when given a workspace.
     *
     * @param jacobianY output buffer of {@code batch * outputNonzeros()} values, or null
     * @param jacobianX output buffer of {@code batch * inputNonzeros()} values, or null
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public void evaluate(double[] x, double[] y, int batch, double[] residuals, double[] scales, double[] jacobianY,
                         double[] jacobianX, Workspace workspace) {
        check(x, y, batch, residuals, scales, jacobianY, jacobianX);
        // only what is asked for is computed: a null buffer costs nothing
        Program p = program(mask(residuals, scales, jacobianY, jacobianX));
        run(p, x, y, batch, residuals, scales, jacobianY, jacobianX, workspace);
    }

    /**
     * The Jacobian entries dC/dy of some output columns only: what a solver for those outputs needs (a Newton step
     * or an affine solve for the completed outputs reads nothing else), at a fraction of the cost of all of them
     * when the laws involve many other outputs.
     *
     * @param outputColumns the output columns (0 .. outputWidth − 1) whose entries are computed
     * @return an evaluation of residuals, scales and those entries; immutable and thread-safe
     * @throws IllegalArgumentException when a column is out of range
     */
    public Partial partial(int[] outputColumns) {
        boolean[] keep = new boolean[outputWidth];
        for (int c : outputColumns) {
            if (c < 0 || c >= outputWidth) {
                throw new IllegalArgumentException("output column " + c + " is out of range 0 .. "
                        + (outputWidth - 1));
            }
            keep[c] = true;
        }
        return new Partial(keep);
    }

    /**
     * Residuals, scales and the dC/dy entries of chosen output columns ({@link #partial(int[])}). Entries of other
     * columns in the Jacobian buffer are left as they were.
     */
    public final class Partial {
        private final boolean[] keep;
        private final java.util.concurrent.atomic.AtomicReferenceArray<Program> partialPrograms =
                new java.util.concurrent.atomic.AtomicReferenceArray<>(4);

        private Partial(boolean[] keep) {
            this.keep = keep;
        }

        /**
         * Like {@link LawEvaluator#evaluate(double[], double[], int, double[], double[], double[], double[],
         * Workspace)} without dC/dx, computing only the chosen columns' entries of {@code jacobianY} (same layout).
         *
         * @param jacobianY output buffer of {@code batch * outputNonzeros()} values (required)
         * @throws IllegalArgumentException when an array is shorter than the batch needs
         */
        public void evaluate(double[] x, double[] y, int batch, double[] residuals, double[] scales,
                             double[] jacobianY, Workspace workspace) {
            check(x, y, batch, residuals, scales, jacobianY, null);
            int mask = (residuals != null ? 1 : 0) | (scales != null ? 2 : 0);
            Program p = partialPrograms.get(mask);
            if (p == null) {
                List<Root> wanted = new ArrayList<>();
                if (residuals != null) {
                    wanted.addAll(roots(TO_RESIDUAL));
                }
                if (scales != null) {
                    wanted.addAll(roots(TO_SCALE));
                }
                for (Root r : roots(TO_JY)) {
                    if (keep[outColumns[r.index()]]) {
                        wanted.add(r);
                    }
                }
                partialPrograms.compareAndSet(mask, null, assemble(wanted, pool));
                p = partialPrograms.get(mask);
            }
            run(p, x, y, batch, residuals, scales, jacobianY, null, workspace);
        }
    }

    /** Like {@link #evaluate(double[], double[], int, double[], double[], double[], double[], Workspace)}. */
    public void evaluate(double[] x, double[] y, int batch, double[] residuals, double[] scales, double[] jacobianY,
                         double[] jacobianX) {
        evaluate(x, y, batch, residuals, scales, jacobianY, jacobianX, newWorkspace());
    }

    private void check(double[] x, double[] y, int batch, double[] residuals, double[] scales, double[] jy,
                       double[] jx) {
        if (batch < 0) {
            throw new IllegalArgumentException("batch must be >= 0, found " + batch);
        }
        need("x (inputs)", x, (long) batch * inputWidth);
        need("y (outputs)", y, (long) batch * outputWidth);
        if (residuals != null) {
            need("residuals", residuals, (long) batch * laws);
        }
        if (scales != null) {
            need("scales", scales, (long) batch * laws);
        }
        if (jy != null) {
            need("jacobianY", jy, (long) batch * outColumns.length);
        }
        if (jx != null) {
            need("jacobianX", jx, (long) batch * inColumns.length);
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
        double[][] r = ws.registers(p.registers());
        for (int s0 = 0; s0 < batch; s0 += BLOCK) {
            block(p, x, y, s0, Math.min(BLOCK, batch - s0), res, scale, jy, jx, r, ws.scratch);
        }
    }

    /** Writes a sum's first addend (encoded at {@code code[at..at+3)}) into {@code d[0..m)}. */
    private static void addend(double[][] r, int[] code, int at, double[] constants, double[] d, int m) {
        int reg = code[at];
        int ci = code[at + 1];
        boolean abs = code[at + 2] != 0;
        if (reg < 0) {
            Arrays.fill(d, 0, m, constants[ci]);
            return;
        }
        double[] v = r[reg];
        double k = ci < 0 ? 1 : constants[ci];
        // a plain v is read as 1·v, which is v exactly
        if (!abs) {
            for (int j = 0; j < m; j++) {
                d[j] = k * v[j];
            }
        } else {
            for (int j = 0; j < m; j++) {
                d[j] = k * Math.abs(v[j]);
            }
        }
    }

    /**
     * Runs the program on samples {@code s0 .. s0+m-1}. Each register is its own array and every loop indexes
     * all its arrays with the same {@code j}, which lets the JIT vectorise the element-wise loops.
     */
    private void block(Program p, double[] x, double[] y, int s0, int m, double[] res, double[] scale, double[] jy,
                       double[] jx, double[][] r, double[] c) {
        final int[] code = p.code();
        final double[] constants = p.constants();
        final int nIn = inputWidth;
        final int nOut = outputWidth;
        int pc = 0;
        while (pc < code.length) {
            int op = code[pc];
            switch (op) {
                case CONST: {
                    Arrays.fill(r[code[pc + 1]], 0, m, constants[code[pc + 2]]);
                    pc += 3;
                    break;
                }
                case IN: {
                    double[] d = r[code[pc + 1]];
                    int k = code[pc + 2] + s0 * nIn;
                    for (int j = 0; j < m; j++) {
                        d[j] = x[k + j * nIn];
                    }
                    pc += 3;
                    break;
                }
                case OUT: {
                    double[] d = r[code[pc + 1]];
                    int k = code[pc + 2] + s0 * nOut;
                    for (int j = 0; j < m; j++) {
                        d[j] = y[k + j * nOut];
                    }
                    pc += 3;
                    break;
                }
                case SUM: {
                    // compensated sum, one addend at a time across the block so the loops vectorise; per sample
                    // the operations and their order are exactly those of Kernels.neumaier. Cheap addends (c·v,
                    // −v, |v|, c·|v|, constants) are formed in place from v's register.
                    double[] d = r[code[pc + 1]];
                    int n = code[pc + 2];
                    addend(r, code, pc + 3, constants, d, m);
                    Arrays.fill(c, 0, m, 0.0);
                    for (int a = 1; a < n; a++) {
                        int at = pc + 3 + 3 * a;
                        int reg = code[at];
                        int ci = code[at + 1];
                        boolean abs = code[at + 2] != 0;
                        if (reg < 0) {
                            double vj = constants[ci];
                            for (int j = 0; j < m; j++) {
                                double sj = d[j];
                                double t = sj + vj;
                                double z = t - sj;
                                c[j] += (sj - (t - z)) + (vj - z);
                                d[j] = t;
                            }
                        } else if (!abs) {
                            // a plain v is read as 1·v, which is v exactly
                            double[] v = r[reg];
                            double k = ci < 0 ? 1 : constants[ci];
                            for (int j = 0; j < m; j++) {
                                double sj = d[j];
                                double vj = k * v[j];
                                double t = sj + vj;
                                double z = t - sj;
                                c[j] += (sj - (t - z)) + (vj - z);
                                d[j] = t;
                            }
                        } else {
                            double[] v = r[reg];
                            double k = ci < 0 ? 1 : constants[ci];
                            for (int j = 0; j < m; j++) {
                                double sj = d[j];
                                double vj = k * Math.abs(v[j]);
                                double t = sj + vj;
                                double z = t - sj;
                                c[j] += (sj - (t - z)) + (vj - z);
                                d[j] = t;
                            }
                        }
                    }
                    for (int j = 0; j < m; j++) {
                        double sj = d[j];
                        // as in Kernels.neumaier: an infinite sum keeps its plain value
                        d[j] = Double.isFinite(sj) ? sj + c[j] : sj;
                    }
                    pc += 3 + 3 * n;
                    break;
                }
                case NEG: {
                    double[] d = r[code[pc + 1]];
                    double[] a = r[code[pc + 2]];
                    for (int j = 0; j < m; j++) {
                        d[j] = -a[j];
                    }
                    pc += 3;
                    break;
                }
                case POWI: {
                    double[] d = r[code[pc + 1]];
                    double[] a = r[code[pc + 2]];
                    int n = code[pc + 3];
                    if (n == 2) {
                        for (int j = 0; j < m; j++) {
                            d[j] = a[j] * a[j];
                        }
                    } else {
                        for (int j = 0; j < m; j++) {
                            d[j] = Kernels.powi(a[j], n);
                        }
                    }
                    pc += 4;
                    break;
                }
                case MUL: {
                    double[] d = r[code[pc + 1]];
                    double[] a = r[code[pc + 2]];
                    double[] b = r[code[pc + 3]];
                    for (int j = 0; j < m; j++) {
                        d[j] = a[j] * b[j];
                    }
                    pc += 4;
                    break;
                }
                case DIV: {
                    double[] d = r[code[pc + 1]];
                    double[] a = r[code[pc + 2]];
                    double[] b = r[code[pc + 3]];
                    for (int j = 0; j < m; j++) {
                        d[j] = a[j] / b[j];
                    }
                    pc += 4;
                    break;
                }
                case POW: {
                    double[] d = r[code[pc + 1]];
                    double[] a = r[code[pc + 2]];
                    double[] b = r[code[pc + 3]];
                    for (int j = 0; j < m; j++) {
                        d[j] = Kernels.pow(a[j], b[j]);
                    }
                    pc += 4;
                    break;
                }
                case FN: {
                    double[] d = r[code[pc + 1]];
                    Function f = FUNCTIONS[code[pc + 2]];
                    double[] a = r[code[pc + 3]];
                    for (int j = 0; j < m; j++) {
                        d[j] = f.apply(a[j]);
                    }
                    pc += 4;
                    break;
                }
                case STORE: {
                    int target = code[pc + 1];
                    int index = code[pc + 2];
                    double[] a = r[code[pc + 3]];
                    double[] out;
                    int stride;
                    if (target == TO_RESIDUAL) {
                        out = res;
                        stride = laws;
                    } else if (target == TO_SCALE) {
                        out = scale;
                        stride = laws;
                    } else if (target == TO_JY) {
                        out = jy;
                        stride = outColumns.length;
                    } else {
                        out = jx;
                        stride = inColumns.length;
                    }
                    if (out != null) {
                        int base = s0 * stride + index;
                        for (int j = 0; j < m; j++) {
                            out[base + j * stride] = a[j];
                        }
                    }
                    pc += 4;
                    break;
                }
                default:
                    throw new AssertionError(op);
            }
        }
    }
}
