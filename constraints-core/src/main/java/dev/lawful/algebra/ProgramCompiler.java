package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Compiles any list of {@link Program.Root}s (terms of one pool, each stored in a slot of a result) into one
 * {@link Program}. Common sub-expressions are computed once, since the terms are hash-consed, and a register is
 * reused once its value is dead.
 *
 * <p>The steps: find the nodes the roots need; decide which of them get an instruction (a sum reads its cheap
 * addends in place, see {@link InlineAddend}); list the instructions children first with each root's store
 * right after its node; allocate registers by a linear scan over last uses while encoding the words. Arrays
 * indexed by node id keep compile time linear in the program size. One compiler compiles one program; the pool
 * stays locked while it reads the nodes.
 */
final class ProgramCompiler {
    /** One instruction before register allocation: its words, the nodes it reads and the node it defines. */
    private record Instruction(int[] words, int[] uses, int defines) {
    }

    private final TermPool pool;
    private final List<Program.Root> roots;
    private final int inputWidth;
    private final int size;
    /** Per node id, the first root storing it (−1: none); per root, the next root storing the same node. */
    private final int[] firstRoot;
    private final int[] nextRoot;
    private final List<Instruction> instructions = new ArrayList<>();
    private final List<Double> constants = new ArrayList<>();

    private ProgramCompiler(TermPool pool, List<Program.Root> roots, int inputWidth) {
        this.pool = pool;
        this.roots = roots;
        this.inputWidth = inputWidth;
        this.size = pool.size();
        this.firstRoot = new int[size];
        this.nextRoot = new int[roots.size()];
        Arrays.fill(firstRoot, -1);
        for (int k = roots.size() - 1; k >= 0; k--) {
            int id = roots.get(k).term().id;
            nextRoot[k] = firstRoot[id];
            firstRoot[id] = k;
        }
    }

    /**
     * Compiles the roots. Any term may be a root, several roots may store the same term, and a term may be stored
     * before or after the terms it shares nodes with: the instruction order follows node ids, not root order.
     *
     * @param pool        the pool every root's term belongs to (locked while compiling)
     * @param roots       the terms to store and where; not modified
     * @param inputWidth  input elements per sample: variables below it are inputs, the others outputs
     * @param outputWidth output elements per sample
     * @param slots       per target ({@link Program#VALUE} ..), the results stored per sample; copied
     * @return the program storing every root's value in its slot, for every sample
     */
    static Program compile(TermPool pool, List<Program.Root> roots, int inputWidth, int outputWidth, int[] slots) {
        synchronized (pool) {
            ProgramCompiler compiler = new ProgramCompiler(pool, roots, inputWidth);
            compiler.listInstructions(compiler.emitted(compiler.needed()));
            return compiler.allocate(outputWidth, slots.clone());
        }
    }

    // ---- which nodes -----------------------------------------------------------------------------------------

    /** @return per node id, whether some root depends on it */
    private boolean[] needed() {
        boolean[] needed = new boolean[size];
        IntList stack = new IntList();
        for (Program.Root r : roots) {
            if (!needed[r.term().id]) {
                needed[r.term().id] = true;
                stack.add(r.term().id);
            }
            while (stack.size() > 0) {
                for (Term a : pool.node(stack.pop()).args) {
                    if (!needed[a.id]) {
                        needed[a.id] = true;
                        stack.add(a.id);
                    }
                }
            }
        }
        return needed;
    }

    /**
     * @return per node id, whether it gets an instruction: a root does, and so does a node some emitted parent
     *         reads. Parents have larger ids than their children, so one pass downwards decides every node.
     */
    private boolean[] emitted(boolean[] needed) {
        boolean[] emitted = new boolean[size];
        boolean[] read = new boolean[size];
        for (int id = size - 1; id >= 0; id--) {
            if (needed[id] && (read[id] || firstRoot[id] >= 0)) {
                emitted[id] = true;
                markOperands(pool.node(id), read);
            }
        }
        return emitted;
    }

    /**
     * Marks the nodes whose registers {@code t}'s instruction reads. A sum reads a cheap addend's base rather than
     * the addend, which then gets no instruction unless something else reads it; a constant exponent folded into
     * POWI is not read either.
     */
    private static void markOperands(Term t, boolean[] read) {
        if (t.kind != Term.Kind.SUM) {
            for (int a = 0; a < operandCount(t); a++) {
                read[t.args[a].id] = true;
            }
            return;
        }
        for (Term a : t.args) {
            InlineAddend in = InlineAddend.of(a);
            if (in == null) {
                read[a.id] = true;
            } else if (in.base() != null) {
                read[in.base().id] = true;
            }
        }
    }

    private static int operandCount(Term t) {
        return isIntegerPower(t) ? 1 : t.args.length;
    }

    /** A whole constant exponent uses the same binary exponentiation {@link Kernels#pow} picks for it. */
    private static boolean isIntegerPower(Term t) {
        if (t.kind != Term.Kind.POW || t.args[1].kind != Term.Kind.CONST) {
            return false;
        }
        double e = t.args[1].value;
        return e == Math.rint(e) && Math.abs(e) <= Kernels.MAX_INTEGER_POWER;
    }

    // ---- instructions ----------------------------------------------------------------------------------------

    /** Lists the instructions in id order, children first, each node's stores right after it. */
    private void listInstructions(boolean[] emitted) {
        for (int id = 0; id < size; id++) {
            if (!emitted[id]) {
                continue;
            }
            Term t = pool.node(id);
            instructions.add(t.kind == Term.Kind.SUM ? sum(t) : node(t));
            for (int k = firstRoot[id]; k >= 0; k = nextRoot[k]) {
                Program.Root r = roots.get(k);
                instructions.add(new Instruction(new int[] {Program.STORE, r.target(), r.slot()}, new int[] {id},
                        -1));
            }
        }
    }

    /**
     * A sum's words are SUM, then per addend the node whose register it reads (−1 for a constant alone), the index
     * of its constant factor (−1 for none) and whether it takes the magnitude; it reads the registers of the
     * addends that have one, in addend order.
     */
    private Instruction sum(Term t) {
        int[] words = new int[1 + 3 * t.args.length];
        words[0] = Program.SUM;
        IntList bases = new IntList();
        for (int k = 0; k < t.args.length; k++) {
            addend(t.args[k], words, 1 + 3 * k, bases);
        }
        return new Instruction(words, bases.toArray(), t.id);
    }

    private void addend(Term a, int[] words, int at, IntList bases) {
        InlineAddend in = InlineAddend.of(a);
        if (in == null) {
            words[at] = a.id;
            words[at + 1] = -1;
            bases.add(a.id);
            return;
        }
        words[at] = in.base() == null ? -1 : in.base().id;
        if (in.base() != null) {
            bases.add(in.base().id);
        }
        words[at + 1] = in.hasFactor() ? constant(in.factor()) : -1;
        words[at + 2] = in.abs() ? 1 : 0;
    }

    private Instruction node(Term t) {
        int[] uses = new int[operandCount(t)];
        for (int k = 0; k < uses.length; k++) {
            uses[k] = t.args[k].id;
        }
        return new Instruction(words(t), uses, t.id);
    }

    /** @return the opcode and the words that are not registers, of any node but a sum */
    private int[] words(Term t) {
        switch (t.kind) {
            case CONST:
                return new int[] {Program.CONST, constant(t.value)};
            case VAR:
                return t.variable < inputWidth ? new int[] {Program.IN, t.variable}
                        : new int[] {Program.OUT, t.variable - inputWidth};
            case NEG:
                return new int[] {Program.NEG};
            case MUL:
                return new int[] {Program.MUL};
            case DIV:
                return new int[] {Program.DIV};
            case POW:
                return isIntegerPower(t) ? new int[] {Program.POWI, (int) t.args[1].value} : new int[] {Program.POW};
            case FN:
                return new int[] {Program.FN, t.function.ordinal()};
            default:
                throw new AssertionError(t.kind);
        }
    }

    /** @return the index of a new constant {@code v} */
    private int constant(double v) {
        constants.add(v);
        return constants.size() - 1;
    }

    // ---- registers and encoding ------------------------------------------------------------------------------

    /** Allocates registers by a linear scan over last uses and encodes every instruction. */
    private Program allocate(int outputWidth, int[] slots) {
        int[] lastUse = lastUses();
        int[] register = new int[size];
        Arrays.fill(register, -1);
        Registers registers = new Registers();
        IntList code = new IntList();
        for (int k = 0; k < instructions.size(); k++) {
            Instruction in = instructions.get(k);
            int[] regs = new int[in.uses().length];
            for (int a = 0; a < regs.length; a++) {
                regs[a] = register[in.uses()[a]];
            }
            // element-wise ops may write over an operand; a sum writes its result while it still reads the
            // operands, so it gets a register of its own before they are freed
            boolean sum = in.words()[0] == Program.SUM;
            int dst = sum ? registers.take() : -1;
            release(in.uses(), k, lastUse, register, registers);
            if (in.defines() >= 0) {
                if (!sum) {
                    dst = registers.take();
                }
                register[in.defines()] = dst;
                if (lastUse[in.defines()] < 0) {
                    throw new AssertionError("node " + in.defines() + " is computed but never used");
                }
            }
            code.addAll(sum ? encodeSum(in.words(), dst, regs) : encode(in.words(), dst, regs));
        }
        double[] c = new double[constants.size()];
        for (int i = 0; i < c.length; i++) {
            c[i] = constants.get(i);
        }
        return new Program(code.toArray(), c, Math.max(registers.count(), 1), inputWidth, outputWidth, slots);
    }

    /** @return per node id, the index of the last instruction reading it (−1: none) */
    private int[] lastUses() {
        int[] lastUse = new int[size];
        Arrays.fill(lastUse, -1);
        for (int k = 0; k < instructions.size(); k++) {
            for (int a : instructions.get(k).uses()) {
                lastUse[a] = k;
            }
        }
        return lastUse;
    }

    /** Frees the registers of the nodes instruction {@code k} reads for the last time. */
    private static void release(int[] uses, int k, int[] lastUse, int[] register, Registers registers) {
        for (int node : uses) {
            if (lastUse[node] == k && register[node] >= 0) {
                registers.release(register[node]);
                register[node] = -1;
            }
        }
    }

    /**
     * Encodes a sum: {@code SUM, dst, count}, then per addend its register (−1: none), constant index (−1: none)
     * and magnitude flag; {@code regs} holds the registers of the addends that read one, in addend order.
     */
    private static int[] encodeSum(int[] words, int dst, int[] regs) {
        int count = (words.length - 1) / 3;
        int[] w = new int[3 + 3 * count];
        w[0] = Program.SUM;
        w[1] = dst;
        w[2] = count;
        int next = 0;
        for (int k = 0; k < count; k++) {
            w[3 + 3 * k] = words[1 + 3 * k] < 0 ? -1 : regs[next++];
            w[4 + 3 * k] = words[2 + 3 * k];
            w[5 + 3 * k] = words[3 + 3 * k];
        }
        return w;
    }

    private static int[] encode(int[] words, int dst, int[] regs) {
        switch (words[0]) {
            case Program.CONST:
            case Program.IN:
            case Program.OUT:
                return new int[] {words[0], dst, words[1]};
            case Program.NEG:
                return new int[] {Program.NEG, dst, regs[0]};
            case Program.POWI:
                return new int[] {Program.POWI, dst, regs[0], words[1]};
            case Program.MUL:
            case Program.DIV:
            case Program.POW:
                return new int[] {words[0], dst, regs[0], regs[1]};
            case Program.FN:
                return new int[] {Program.FN, dst, words[1], regs[0]};
            case Program.STORE:
                return new int[] {Program.STORE, words[1], words[2], regs[0]};
            default:
                throw new AssertionError(words[0]);
        }
    }

    /** The registers in use and the free ones; a freed register is the next one taken. */
    private static final class Registers {
        private final IntList free = new IntList();
        private int count;

        int take() {
            return free.size() > 0 ? free.pop() : count++;
        }

        void release(int register) {
            free.add(register);
        }

        int count() {
            return count;
        }
    }

    /** A growable list of ints without boxing. */
    private static final class IntList {
        private int[] a = new int[16];
        private int size;

        void add(int v) {
            if (size == a.length) {
                a = Arrays.copyOf(a, size * 2);
            }
            a[size++] = v;
        }

        void addAll(int[] values) {
            for (int v : values) {
                add(v);
            }
        }

        int pop() {
            return a[--size];
        }

        int size() {
            return size;
        }

        int[] toArray() {
            return Arrays.copyOf(a, size);
        }
    }
}
