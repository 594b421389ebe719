package dev.lawful.enforce;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;

/**
 * The documented exactness bound of a {@link Completion}, per sample and scalar law, for outputs that may have been
 * rounded or mapped after enforcement:
 * <pre>
 *   |C_i(x, y)| ≤ b_i = (d_i + 3)·2⁻⁵³·s_i + Σ_{j completed} |∂C_i/∂y_j| · e_j + Σ_k |∂C_i/∂x_k| · e_x,k
 * </pre>
 * where s_i is the law's natural scale, d_i its rounding depth ({@link ExpandedLaws}) and e_j a bound on the
 * absolute error added to the completed output j after enforcement: 0 for the double entry points, ½·ulp_f32(y_j)
 * when the outputs were rounded to float, σ_j times that (plus the double rounding of the map) when a network emitted
 * them normalised in float. When the law set declares limits, the first sum runs over every output: a limit may move
 * a sample's free outputs, which are then rounded like the completed ones. The last sum is for inputs the completion saw rounded (a float network sees its inputs
 * as floats): e_x,k bounds the difference between the input given here and the one the laws were enforced for.
 * Everything is evaluated at the given inputs and outputs with the law set's own evaluator.
 *
 * <p>Use it to verify outputs from any source (a network, a file, a host simulator) against the promise the
 * completion makes. Immutable and thread-safe; each call allocates its work arrays.
 */
public final class RoundingBound {
    private final Completion completion;
    private final ExpandedLaws expanded;
    private final LawEvaluator evaluator;
    private final boolean[] completed;

    private RoundingBound(Completion c) {
        this.completion = c;
        this.expanded = c.laws().expand();
        this.evaluator = c.laws().evaluator();
        this.completed = new boolean[c.outputWidth()];
        for (int o : c.completedOutputs()) {
            completed[o] = true;
        }
        if (!c.laws().limits().isEmpty()) {
            // a limit may move free outputs: the enforcement computed them, and their rounding counts too
            java.util.Arrays.fill(completed, true);
        }
    }

    /**
     * @param completion the completion whose promise is checked (declared layout)
     * @return its bound
     * @throws IllegalArgumentException when the completion's layout is not {@link Completion.Layout#DECLARED}
     */
    public static RoundingBound of(Completion completion) {
        if (completion.layout() != Completion.Layout.DECLARED) {
            throw new IllegalArgumentException("the rounding bound reads outputs in declared order; build the"
                    + " completion with the DECLARED layout");
        }
        return new RoundingBound(completion);
    }

    /** @return the number of scalar laws, the width of the residual and bound rows */
    public int lawCount() {
        return evaluator.lawCount();
    }

    /**
     * ½·ulp_f32 of each value: the error bound of rounding a double to float, for {@code outputError}.
     *
     * @param y values (not modified)
     * @return a new array of ½·{@code Math.ulp((float) y[k])}
     */
    public static double[] floatRounding(double[] y) {
        double[] e = new double[y.length];
        for (int k = 0; k < y.length; k++) {
            e[k] = 0.5 * Math.ulp((float) y[k]);
        }
        return e;
    }

    /**
     * Residuals and their bounds.
     *
     * @param x           inputs, {@code batch × inputWidth} in declared units (null when there are none)
     * @param inputError  e_x, {@code batch × inputWidth} bounds on how far the inputs the laws were enforced for lie
     *                    from {@code x}, or null when they are {@code x} itself
     * @param y           outputs, {@code batch × outputWidth} in declared units and order
     * @param batch       number of samples
     * @param outputError e, {@code batch × outputWidth} absolute error bounds added after enforcement (only the
     *                    completed columns are read, every column when the law set declares limits), or null for outputs straight from the double entry points
     * @param residuals   output buffer of {@code batch × lawCount()} residuals C_i in coherent SI units (modified)
     * @param bounds      output buffer of {@code batch × lawCount()} bounds b_i, SI units (modified)
     * @return the number of samples with at least one law outside its bound (a non-finite residual counts as
     *         outside)
     * @throws IllegalArgumentException when an array is shorter than the batch needs
     */
    public int evaluate(double[] x, double[] inputError, double[] y, int batch, double[] outputError,
            double[] residuals, double[] bounds) {
        int n = evaluator.lawCount();
        int p = completion.outputWidth();
        int nnz = evaluator.outputNonzeros();
        int k = completion.inputWidth();
        int nnzX = evaluator.inputNonzeros();
        if (residuals.length < batch * n || bounds.length < batch * n) {
            throw new IllegalArgumentException("residuals and bounds must hold " + batch * n + " values (batch "
                    + batch + " × " + n + " laws), found " + residuals.length + " and " + bounds.length);
        }
        if (outputError != null && outputError.length < batch * p) {
            throw new IllegalArgumentException("outputError must hold " + batch * p + " values (batch " + batch
                    + " × " + p + " outputs), found " + outputError.length);
        }
        double[] scale = new double[batch * n];
        if (inputError != null && inputError.length < batch * k) {
            throw new IllegalArgumentException("inputError must hold " + batch * k + " values (batch " + batch
                    + " × " + k + " inputs), found " + inputError.length);
        }
        double[] jy = new double[batch * nnz];
        double[] jx = new double[batch * nnzX];
        evaluator.evaluate(x, y, batch, residuals, scale, outputError == null ? null : jy,
                inputError == null ? null : jx, evaluator.newWorkspace());
        int outside = 0;
        for (int s = 0; s < batch; s++) {
            boolean bad = false;
            for (int i = 0; i < n; i++) {
                double b = (expanded.roundingDepth(i) + 3) * 0x1p-53 * scale[s * n + i];
                if (outputError != null) {
                    int[] cols = evaluator.outputColumns(i);
                    for (int c = 0; c < cols.length; c++) {
                        int j = cols[c];
                        if (completed[j]) {
                            b += Math.abs(jy[s * nnz + evaluator.outputOffset(i) + c]) * outputError[s * p + j];
                        }
                    }
                }
                if (inputError != null) {
                    int[] cols = evaluator.inputColumns(i);
                    for (int c = 0; c < cols.length; c++) {
                        b += Math.abs(jx[s * nnzX + evaluator.inputOffset(i) + c]) * inputError[s * k + cols[c]];
                    }
                }
                bounds[s * n + i] = b;
                // an infinite bound would admit any residual: an overflowed sample is always outside
                if (!(Math.abs(residuals[s * n + i]) <= b) || b == Double.POSITIVE_INFINITY) {
                    bad = true;
                }
            }
            if (bad) {
                outside++;
            }
        }
        return outside;
    }
}
