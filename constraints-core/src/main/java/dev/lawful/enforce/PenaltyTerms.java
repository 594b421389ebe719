package dev.lawful.enforce;

import dev.lawful.algebra.LawEvaluator;

/**
 * One family of penalty terms, the laws or the limits, with their weights folded into coefficients: a law
 * contributes w (r/u)², a limit w (min(0, g)/u)², so only its violation counts. Immutable; the work arrays are the
 * caller's.
 */
final class PenaltyTerms {
    final LawEvaluator evaluator;
    final int count;
    final int nnzY;
    final int nnzX;
    private final boolean oneSided;
    /** w/u²: the term is c·r², its derivative 2·c·r. */
    private final double[] coefficient;
    /** √w/u: ρ = root·r, the term ρ². */
    private final double[] root;
    private final int[] yStart;
    private final int[] yColumns;
    private final int[] xStart;
    private final int[] xColumns;

    /**
     * @param evaluator the terms' values and Jacobians (residuals of laws, or values of limits)
     * @param weights   per term, w ≥ 0
     * @param units     per term, the SI factor u of the unit its value is reported in
     * @param oneSided  whether only a negative value is penalised (a limit g ≥ 0)
     */
    PenaltyTerms(LawEvaluator evaluator, double[] weights, double[] units, boolean oneSided) {
        this.evaluator = evaluator;
        this.count = evaluator.lawCount();
        this.nnzY = evaluator.outputNonzeros();
        this.nnzX = evaluator.inputNonzeros();
        this.oneSided = oneSided;
        this.coefficient = new double[count];
        this.root = new double[count];
        this.yStart = new int[count + 1];
        this.xStart = new int[count + 1];
        this.yColumns = new int[nnzY];
        this.xColumns = new int[nnzX];
        for (int i = 0; i < count; i++) {
            coefficient[i] = weights[i] / (units[i] * units[i]);
            root[i] = Math.sqrt(weights[i]) / units[i];
            int[] oc = evaluator.outputColumns(i);
            System.arraycopy(oc, 0, yColumns, evaluator.outputOffset(i), oc.length);
            yStart[i + 1] = evaluator.outputOffset(i) + oc.length;
            int[] ic = evaluator.inputColumns(i);
            System.arraycopy(ic, 0, xColumns, evaluator.inputOffset(i), ic.length);
            xStart[i + 1] = evaluator.inputOffset(i) + ic.length;
        }
    }

    /** @return the value a term penalises: the residual of a law, the violation min(0, g) of a limit */
    private double penalised(double r) {
        return oneSided ? Math.min(0, r) : r;
    }

    /**
     * Adds the terms of sample j of a chunk to its value, and their gradients to gy, gx when given.
     *
     * @param res    the chunk's term values, {@code count} per sample
     * @param values modified: {@code values[j]} gains Σ c·r²
     * @param gy     optional, modified: row j ({@code p} wide) gains Σ 2c·r·∂/∂y
     * @param gx     optional, modified: row j ({@code nIn} wide) gains Σ 2c·r·∂/∂x
     */
    void add(int j, double[] res, double[] jy, double[] jx, double[] values, double[] gy, int p, double[] gx,
            int nIn) {
        double v = 0;
        for (int i = 0; i < count; i++) {
            double r = penalised(res[j * count + i]);
            double c = coefficient[i];
            v += c * r * r;
            scatter(j, i, 2 * c * r, jy, jx, gy, p, gx, nIn, j);
        }
        values[j] += v;
    }

    /** ρ_i = root_i·r_i of sample j, into {@code rho[at + i]}. */
    void rho(int j, double[] res, double[] rho, int at) {
        for (int i = 0; i < count; i++) {
            rho[at + i] = root[i] * penalised(res[j * count + i]);
        }
    }

    /**
     * Adds Σ ḡ_i·root_i·∂r_i/∂(y, x) of sample j of a chunk (Jacobians in chunk rows j) to row s of gy and gx.
     *
     * @param gRho the upstream gradients on ρ, {@code gRho[at + i]}
     */
    void rhoBackward(int j, double[] res, double[] gRho, int at, double[] jy, double[] jx, double[] gy, int p,
            double[] gx, int nIn, int s) {
        for (int i = 0; i < count; i++) {
            double r = res == null ? 1 : res[j * count + i];
            // a limit's violation min(0, g) has slope 1 below zero and 0 above (the one-sided choice 0 at g = 0)
            double slope = oneSided && !(r < 0) ? 0 : 1;
            scatter(j, i, gRho[at + i] * root[i] * slope, jy, jx, gy, p, gx, nIn, s);
        }
    }

    private void scatter(int j, int i, double g, double[] jy, double[] jx, double[] gy, int p, double[] gx, int nIn,
            int row) {
        if (gy != null) {
            for (int e = yStart[i]; e < yStart[i + 1]; e++) {
                gy[row * p + yColumns[e]] += g * jy[j * nnzY + e];
            }
        }
        if (gx != null) {
            for (int e = xStart[i]; e < xStart[i + 1]; e++) {
                gx[row * nIn + xColumns[e]] += g * jx[j * nnzX + e];
            }
        }
    }
}
