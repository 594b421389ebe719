package dev.lawful.algebra;

import java.util.Arrays;

/**
 * Runs a {@link Program} over a batch, {@value #BLOCK} samples at a time: each instruction processes the whole
 * block in one loop, so the dispatch of an instruction is shared by the block and nothing walks an expression
 * tree per sample. Each register is its own array and every loop indexes all its arrays with the same {@code j},
 * which lets the JIT vectorise the element-wise loops; the per-instruction helpers are small and static so the
 * JIT can inline them into the dispatch loop. Allocates nothing.
 *
 * <p>The arithmetic is that of {@link TermPool#apply}, operation for operation, so results agree with the
 * reference evaluation {@link Term#evaluate} to the bit.
 */
final class BlockInterpreter {
    /** Samples processed per instruction. */
    static final int BLOCK = 64;

    private static final Function[] FUNCTIONS = Function.values();

    private BlockInterpreter() {
    }

    /**
     * Runs {@code p} on samples {@code 0 .. batch-1}. Buffers are flat row-major arrays (sample {@code s} has
     * inputs {@code x[s*inputWidth ..]}); each result buffer holds {@code p.slots(target)} values per sample and
     * may be null, which skips the stores into it.
     *
     * @param p         the program
     * @param x         inputs, {@code batch * p.inputWidth()} values (read only)
     * @param y         outputs, {@code batch * p.outputWidth()} values (read only)
     * @param batch     number of samples
     * @param values    output buffer of {@link Program#VALUE} results, or null
     * @param scales    output buffer of {@link Program#SCALE} results, or null
     * @param jy        output buffer of {@link Program#JACOBIAN_Y} results, or null
     * @param jx        output buffer of {@link Program#JACOBIAN_X} results, or null
     * @param registers at least {@code p.registers()} arrays of {@value #BLOCK} values, overwritten
     * @param scratch   {@value #BLOCK} values, overwritten
     */
    static void run(Program p, double[] x, double[] y, int batch, double[] values, double[] scales, double[] jy,
                    double[] jx, double[][] registers, double[] scratch) {
        for (int s0 = 0; s0 < batch; s0 += BLOCK) {
            block(p, x, y, s0, Math.min(BLOCK, batch - s0), values, scales, jy, jx, registers, scratch);
        }
    }

    /** Runs the program on samples {@code s0 .. s0+m-1}; each helper returns the next instruction's position. */
    private static void block(Program p, double[] x, double[] y, int s0, int m, double[] values, double[] scales,
                              double[] jy, double[] jx, double[][] r, double[] c) {
        final int[] code = p.code();
        final double[] constants = p.constants();
        int pc = 0;
        while (pc < code.length) {
            pc = switch (code[pc]) {
                case Program.CONST -> constant(r, code, pc, constants, m);
                case Program.IN -> gather(r, code, pc, x, s0, p.inputWidth(), m);
                case Program.OUT -> gather(r, code, pc, y, s0, p.outputWidth(), m);
                case Program.SUM -> {
                    // compensated, one addend at a time across the block so the loops vectorise; per sample the
                    // operations and their order are exactly those of Kernels.neumaier
                    // the addend loop stays here: one sum helper with every addend kind's loop compiled too big
                    // for the JIT to inline, and its call per sum cost the reformer residuals benchmark ~5%
                    double[] d = r[code[pc + 1]];
                    int end = pc + 3 + 3 * code[pc + 2];
                    first(r, code, pc + 3, constants, d, m);
                    Arrays.fill(c, 0, m, 0.0);
                    for (int at = pc + 6; at < end; at += 3) {
                        int ci = code[at + 1];
                        if (code[at] < 0) {
                            addConstant(d, c, constants[ci], m);
                        } else if (code[at + 2] == 0) {
                            addScaled(d, c, ci < 0 ? 1 : constants[ci], r[code[at]], m);
                        } else {
                            addScaledAbs(d, c, ci < 0 ? 1 : constants[ci], r[code[at]], m);
                        }
                    }
                    compensate(d, c, m);
                    yield end;
                }
                case Program.NEG -> neg(r, code, pc, m);
                case Program.POWI -> powi(r, code, pc, m);
                case Program.MUL -> mul(r, code, pc, m);
                case Program.DIV -> div(r, code, pc, m);
                case Program.POW -> pow(r, code, pc, m);
                case Program.FN -> fn(r, code, pc, m);
                case Program.STORE -> store(r, code, pc, p, s0, m, values, scales, jy, jx);
                default -> throw new AssertionError(code[pc]);
            };
        }
    }

    private static int constant(double[][] r, int[] code, int pc, double[] constants, int m) {
        Arrays.fill(r[code[pc + 1]], 0, m, constants[code[pc + 2]]);
        return pc + 3;
    }

    /** Loads one input or output element of each sample of the block from a buffer of {@code width} per sample. */
    private static int gather(double[][] r, int[] code, int pc, double[] src, int s0, int width, int m) {
        double[] d = r[code[pc + 1]];
        int k = code[pc + 2] + s0 * width;
        for (int j = 0; j < m; j++) {
            d[j] = src[k + j * width];
        }
        return pc + 3;
    }

    /** Stores one result of each sample of the block, unless its buffer was not asked for. */
    private static int store(double[][] r, int[] code, int pc, Program p, int s0, int m, double[] values,
                             double[] scales, double[] jy, double[] jx) {
        int target = code[pc + 1];
        double[] out = target == Program.VALUE ? values : target == Program.SCALE ? scales
                : target == Program.JACOBIAN_Y ? jy : jx;
        if (out != null) {
            double[] a = r[code[pc + 3]];
            int stride = p.slots(target);
            int base = s0 * stride + code[pc + 2];
            for (int j = 0; j < m; j++) {
                out[base + j * stride] = a[j];
            }
        }
        return pc + 4;
    }

    /** Writes a sum's first addend (encoded at {@code code[at..at+3)}) into {@code d[0..m)}. */
    private static void first(double[][] r, int[] code, int at, double[] constants, double[] d, int m) {
        int reg = code[at];
        int ci = code[at + 1];
        if (reg < 0) {
            Arrays.fill(d, 0, m, constants[ci]);
            return;
        }
        double[] v = r[reg];
        // a plain v is read as 1·v, which is v exactly
        double k = ci < 0 ? 1 : constants[ci];
        if (code[at + 2] == 0) {
            for (int j = 0; j < m; j++) {
                d[j] = k * v[j];
            }
        } else {
            for (int j = 0; j < m; j++) {
                d[j] = k * Math.abs(v[j]);
            }
        }
    }

    /** Adds the compensation to a finished sum; as in Kernels.neumaier, an infinite sum keeps its plain value. */
    private static void compensate(double[] d, double[] c, int m) {
        for (int j = 0; j < m; j++) {
            double sj = d[j];
            d[j] = Double.isFinite(sj) ? sj + c[j] : sj;
        }
    }

    private static void addConstant(double[] d, double[] c, double vj, int m) {
        for (int j = 0; j < m; j++) {
            double sj = d[j];
            double t = sj + vj;
            double z = t - sj;
            c[j] += (sj - (t - z)) + (vj - z);
            d[j] = t;
        }
    }

    /** Adds {@code k·v} (a plain v is read as 1·v, which is v exactly). */
    private static void addScaled(double[] d, double[] c, double k, double[] v, int m) {
        for (int j = 0; j < m; j++) {
            double sj = d[j];
            double vj = k * v[j];
            double t = sj + vj;
            double z = t - sj;
            c[j] += (sj - (t - z)) + (vj - z);
            d[j] = t;
        }
    }

    private static void addScaledAbs(double[] d, double[] c, double k, double[] v, int m) {
        for (int j = 0; j < m; j++) {
            double sj = d[j];
            double vj = k * Math.abs(v[j]);
            double t = sj + vj;
            double z = t - sj;
            c[j] += (sj - (t - z)) + (vj - z);
            d[j] = t;
        }
    }

    private static int neg(double[][] r, int[] code, int pc, int m) {
        double[] d = r[code[pc + 1]];
        double[] a = r[code[pc + 2]];
        for (int j = 0; j < m; j++) {
            d[j] = -a[j];
        }
        return pc + 3;
    }

    /** Whole powers as {@link Kernels#pow} computes them; a square is exactly one product. */
    private static int powi(double[][] r, int[] code, int pc, int m) {
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
        return pc + 4;
    }

    private static int mul(double[][] r, int[] code, int pc, int m) {
        double[] d = r[code[pc + 1]];
        double[] a = r[code[pc + 2]];
        double[] b = r[code[pc + 3]];
        for (int j = 0; j < m; j++) {
            d[j] = a[j] * b[j];
        }
        return pc + 4;
    }

    private static int div(double[][] r, int[] code, int pc, int m) {
        double[] d = r[code[pc + 1]];
        double[] a = r[code[pc + 2]];
        double[] b = r[code[pc + 3]];
        for (int j = 0; j < m; j++) {
            d[j] = a[j] / b[j];
        }
        return pc + 4;
    }

    private static int pow(double[][] r, int[] code, int pc, int m) {
        double[] d = r[code[pc + 1]];
        double[] a = r[code[pc + 2]];
        double[] b = r[code[pc + 3]];
        for (int j = 0; j < m; j++) {
            d[j] = Kernels.pow(a[j], b[j]);
        }
        return pc + 4;
    }

    private static int fn(double[][] r, int[] code, int pc, int m) {
        double[] d = r[code[pc + 1]];
        Function f = FUNCTIONS[code[pc + 2]];
        double[] a = r[code[pc + 3]];
        for (int j = 0; j < m; j++) {
            d[j] = f.apply(a[j]);
        }
        return pc + 4;
    }
}
