package dev.lawful.algebra;

/**
 * Straight-line register code compiled by {@link ProgramCompiler} and run by {@link BlockInterpreter}: one flat
 * array of instruction words, the constants they read, how many block-sized registers they need, and how many
 * slots each kind of result has per sample.
 *
 * <p>Instruction words, each instruction's first word being its opcode:
 * <pre>
 * CONST dst constant          IN dst inputElement          OUT dst outputElement
 * NEG dst a                   MUL dst a b   DIV dst a b    POW dst a b
 * POWI dst a exponent         FN dst functionOrdinal a     STORE target slot a
 * SUM dst count { register constant magnitude }            (one triple per addend)
 * </pre>
 * A sum's addend reads {@code constant · register}, {@code constant · |register|} or the constant alone (register
 * −1); a constant index of −1 stands for the factor 1. A {@code STORE} copies a register into slot {@code slot} of
 * the per-sample results of {@code target}.
 *
 * <p>Immutable: the arrays are never written after construction, and only the interpreter of this package reads
 * them (without copying, as it runs once per block).
 */
final class Program {
    static final int CONST = 0;
    static final int IN = 1;
    static final int OUT = 2;
    static final int SUM = 3;
    static final int NEG = 4;
    static final int MUL = 5;
    static final int DIV = 6;
    static final int POW = 7;
    static final int POWI = 8;
    static final int FN = 9;
    static final int STORE = 10;

    /** Results stored per sample: the terms' values (a law's residual). */
    static final int VALUE = 0;
    /** Results stored per sample: the terms' natural scales. */
    static final int SCALE = 1;
    /** Results stored per sample: the structurally nonzero derivatives by output elements. */
    static final int JACOBIAN_Y = 2;
    /** Results stored per sample: the structurally nonzero derivatives by input elements. */
    static final int JACOBIAN_X = 3;
    /** The number of kinds of result. */
    static final int TARGETS = 4;

    /** A term whose value the program stores in slot {@code slot} of {@code target}. */
    record Root(Term term, int target, int slot) {
    }

    private final int[] code;
    private final double[] constants;
    private final int registers;
    private final int inputWidth;
    private final int outputWidth;
    private final int[] slots;

    /**
     * @param code        the instruction words (kept, not copied)
     * @param constants   the constants the instructions index (kept, not copied)
     * @param registers   the number of registers the code uses, at least 1
     * @param inputWidth  input elements per sample
     * @param outputWidth output elements per sample
     * @param slots       per target, the results stored per sample, which is the stride of its buffer (kept)
     */
    Program(int[] code, double[] constants, int registers, int inputWidth, int outputWidth, int[] slots) {
        this.code = code;
        this.constants = constants;
        this.registers = registers;
        this.inputWidth = inputWidth;
        this.outputWidth = outputWidth;
        this.slots = slots;
    }

    int[] code() {
        return code;
    }

    double[] constants() {
        return constants;
    }

    int registers() {
        return registers;
    }

    int inputWidth() {
        return inputWidth;
    }

    int outputWidth() {
        return outputWidth;
    }

    /** @return the number of results of {@code target} per sample */
    int slots(int target) {
        return slots[target];
    }
}
