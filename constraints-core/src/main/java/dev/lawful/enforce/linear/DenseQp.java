package dev.lawful.enforce.linear;

import java.util.Objects;

/**
 * Small dense strictly convex quadratic programmes with linear inequality constraints,
 * <pre>
 *   minimise ½ (u − z)ᵀ W (u − z)   subject to   A u ≥ b
 * </pre>
 * (W k×k symmetric positive definite, A m×k row-major {@code a[i*k + j]}, b and the multipliers λ m entries), by the
 * dual active-set method of Goldfarb and Idnani (1983), on caller-owned arrays so that a solve allocates nothing.
 *
 * <p><b>Method.</b> {@link #factor} computes the Cholesky factor W = L Lᵀ once and keeps L⁻¹; any number of solves
 * (different z, A, b) then reuse it. A solve starts from the unconstrained minimum u = z with no active constraint:
 * when every constraint holds there (to the tolerance below) it returns z itself, bit for bit, after one pass over the
 * m constraints. Otherwise it keeps J = L⁻ᵀQ and an upper triangular R with Jᵀ N = [R; 0], N the k×q matrix of
 * active normals, Q orthogonal (J starts as L⁻ᵀ). To add the most violated constraint p (normal n = a_p, slack
 * s = a_pᵀu − b_p &lt; 0) it forms d = Jᵀn and
 * <ul>
 *   <li>the primal direction y = J₂d₂ (d₂ the last k − q entries of d, J₂ the matching columns), along which the
 *       active constraints stay exact and n·y = ‖d₂‖²; the full step t₂ = −s / ‖d₂‖² makes p exact;</li>
 *   <li>the dual direction r = R⁻¹d₁: moving by t changes the active multipliers by −t·r and p's by +t, so the
 *       partial step t₁ = min over r_j &gt; 0 of λ_j / r_j is the largest keeping them non-negative.</li>
 * </ul>
 * It takes t = min(t₁, t₂): u ← u + t·y, λ ← λ − t·r, λ_p ← λ_p + t. At t₂ it adds p (Givens rotations of J's last
 * columns fold d₂ into one entry, R gains the column (d₁, ‖d₂‖)); at t₁ it drops the constraint that reached zero
 * (R loses a column, Givens rotations restore its triangle, the same rotations act on J) and tries p again. When p's
 * normal depends on the active ones (d₂ ≈ 0) only the dual step is possible; when moreover no r_j is positive, no
 * point satisfies p together with the active constraints and the problem is infeasible. Every step raises the dual
 * objective, so in exact arithmetic the method ends in finitely many steps; a step limit guards the floating-point
 * case ({@link #iterationLimit(int)}). Rotations (not a re-factorisation) keep J orthogonal to working precision;
 * each add or drop costs O(k²) and each search for the next violated constraint O(m k).
 *
 * <p><b>Tolerances</b> (relative, so that scaling a row of A and its b, or all of W, changes nothing):
 * <ul>
 *   <li>constraint i counts as satisfied when a_iᵀu − b_i ≥ −τ (Σ_j |a_ij u_j| + |b_i|), τ =
 *       {@link #feasibilityTolerance(double)} (default {@value #DEFAULT_FEASIBILITY_TOLERANCE}): the bracket is the
 *       scale of the rounding errors of the slack itself, and τ sits well above them (k·2⁻⁵³ ≤ 7e-15 for k ≤ 64) so
 *       that constraints met exactly at a degenerate vertex are not added and dropped again over rounding noise;</li>
 *   <li>a new normal depends on the active ones when ‖d₂‖ ≤ δ‖d‖, δ = {@link #dependenceTolerance(double)}
 *       (default {@value #DEFAULT_DEPENDENCE_TOLERANCE}): ‖d‖ = ‖L⁻¹n‖ is the normal's size in the metric of W⁻¹ and
 *       ‖d₂‖/‖d‖ the sine of its angle to the active normals there; an exactly dependent normal leaves a few ulps,
 *       while accepting a nearly dependent one would put a pivot of that size into R;</li>
 *   <li>among violated constraints the one farthest from its half-space, −s_i / ‖a_i‖, is added first.</li>
 * </ul>
 *
 * <p>Not thread-safe: one instance per thread. A zero row of A with b_i &gt; 0 is an infeasible constraint (named by
 * the code); with b_i ≤ 0 it always holds. Duplicate and dependent constraints are handled by the dual step.
 */
public final class DenseQp {
    /** Returned by {@link #solve} when the iteration limit was reached before an optimum. */
    public static final int ITERATION_LIMIT = Integer.MIN_VALUE;
    /** Returned by {@link #solve} when a slack a_iᵀu − b_i (or its scale) is NaN or infinite. */
    public static final int NOT_FINITE = Integer.MIN_VALUE + 1;
    /** Default τ of {@link #feasibilityTolerance(double)}. */
    public static final double DEFAULT_FEASIBILITY_TOLERANCE = 1e-12;
    /** Default δ of {@link #dependenceTolerance(double)}. */
    public static final double DEFAULT_DEPENDENCE_TOLERANCE = 1e-12;
    /** A Cholesky pivot at or below this fraction of its diagonal entry means cond(W) ≳ 1e14: not definite. */
    private static final double PIVOT_TOLERANCE = 1e-14;
    private static final int NONE = -1;

    private final int maxK;
    private final int maxM;
    /** L⁻¹ row-major, lower triangular: Jᵀ at the start of every solve. */
    private final double[] inverseFactor;
    /** Jᵀ row-major: row c is column c of J, so that d = Jᵀn and the rotations read contiguous rows. */
    private final double[] jt;
    /** R column-major ({@code rc[c*maxK + r]} = R[r][c]), so that removing a column shifts one contiguous block. */
    private final double[] rc;
    private final double[] d;
    private final double[] r;
    /** The multipliers of the active constraints, in active-set order. */
    private final double[] lam;
    private final int[] act;
    private final boolean[] isActive;
    /** ‖a_i‖ of the rows met in this solve, negative until computed (most rows are never violated). */
    private final double[] rowNorm;
    private double feasibilityTolerance = DEFAULT_FEASIBILITY_TOLERANCE;
    private double dependenceTolerance = DEFAULT_DEPENDENCE_TOLERANCE;
    private int iterationLimit;
    private int k;
    private boolean factored;
    private int q;
    private int iterations;
    /** The cosine and sine of the last rotation from {@link #givens}: two fields rather than an allocated pair. */
    private double rotC;
    private double rotS;

    /**
     * Work arrays for problems up to {@code maxK} free outputs and {@code maxM} constraints (about 3·maxK² + 4·maxK +
     * 2·maxM numbers).
     *
     * @throws IllegalArgumentException when {@code maxK < 1} or {@code maxM < 0}
     */
    public DenseQp(int maxK, int maxM) {
        if (maxK < 1 || maxM < 0) {
            throw new IllegalArgumentException("a QP needs maxK ≥ 1 and maxM ≥ 0, found maxK = " + maxK + ", maxM = "
                    + maxM);
        }
        this.maxK = maxK;
        this.maxM = maxM;
        this.inverseFactor = new double[maxK * maxK];
        this.jt = new double[maxK * maxK];
        this.rc = new double[maxK * maxK];
        this.d = new double[maxK];
        this.r = new double[maxK];
        this.lam = new double[maxK];
        this.act = new int[maxK];
        this.isActive = new boolean[maxM];
        this.rowNorm = new double[maxM];
    }

    /** {@link #factor(double[], int, int)} of W at offset 0. */
    public boolean factor(double[] w, int k) {
        return factor(w, 0, k);
    }

    /**
     * Takes W for the following solves: its Cholesky factor L and L⁻¹ (k³/2 flops, once per W).
     *
     * @param w       k×k row-major at {@code w[wOffset..]}, symmetric; only the lower triangle (j ≤ i) is read, and
     *                nothing is modified
     * @param wOffset where W starts
     * @param k       number of free outputs, 1 ≤ k ≤ maxK
     * @return false (and no usable factor) when W is not positive definite to working precision: a pivot at or
     *         below 1e-14 of its diagonal entry, or a NaN or infinite entry
     * @throws IllegalArgumentException  when k is outside [1, maxK]
     * @throws IndexOutOfBoundsException when {@code w} is too short
     */
    public boolean factor(double[] w, int wOffset, int k) {
        if (k < 1 || k > maxK) {
            throw new IllegalArgumentException("k must be in [1, " + maxK + "], found " + k);
        }
        Objects.checkFromIndexSize(wOffset, k * k, w.length);
        factored = false;
        this.k = k;
        // the factor is built in jt, which every solve overwrites anyway
        double[] l = jt;
        for (int i = 0; i < k; i++) {
            for (int j = 0; j <= i; j++) {
                double s = w[wOffset + i * k + j];
                for (int c = 0; c < j; c++) {
                    s -= l[i * k + c] * l[j * k + c];
                }
                if (j < i) {
                    l[i * k + j] = s / l[j * k + j];
                } else if (s > PIVOT_TOLERANCE * w[wOffset + i * k + i] && s < Double.POSITIVE_INFINITY) {
                    l[i * k + i] = Math.sqrt(s);
                } else {
                    return false;
                }
            }
        }
        // L⁻¹ column by column by forward substitution; it stays lower triangular
        for (int c = 0; c < k; c++) {
            for (int i = 0; i < c; i++) {
                inverseFactor[i * k + c] = 0;
            }
            inverseFactor[c * k + c] = 1 / l[c * k + c];
            for (int i = c + 1; i < k; i++) {
                double s = 0;
                for (int j = c; j < i; j++) {
                    s -= l[i * k + j] * inverseFactor[j * k + c];
                }
                inverseFactor[i * k + c] = s / l[i * k + i];
            }
        }
        factored = true;
        return true;
    }

    /** {@link #solve(double[], int, double[], int, int, double[], int, double[], int, double[], int, int[], int)} with
     * every offset 0. */
    public int solve(double[] a, double[] b, int m, double[] z, double[] u, double[] lambda, int[] active) {
        return solve(a, 0, b, 0, m, z, 0, u, 0, lambda, 0, active, 0);
    }

    /**
     * Solves minimise ½ (u − z)ᵀ W (u − z) subject to A u ≥ b for the W of the last successful {@link #factor}.
     * Allocates nothing.
     *
     * @param a        A, m×k row-major at {@code a[aOffset..]} (not modified)
     * @param b        b at {@code b[bOffset..]}, m entries (not modified)
     * @param m        number of constraints, 0 ≤ m ≤ maxM
     * @param z        the unconstrained minimum at {@code z[zOffset..]}, k entries (not modified, except through
     *                 {@code u} when they share the array and offset, which is allowed)
     * @param u        output: the minimiser at {@code u[uOffset..]}, k entries; when nothing is violated at z it is a
     *                 copy of z. On a negative return it holds the last iterate, which satisfies the active
     *                 constraints but not necessarily the others
     * @param lambda   output: the multiplier of each constraint at {@code lambda[lambdaOffset..]}, m entries, 0 for
     *                 the inactive ones; W(u − z) = Aᵀλ
     * @param active   output: the active constraints' indices in the order they were added, at
     *                 {@code active[activeOffset..]}; room for min(k, m) entries is needed, and the first q (the
     *                 returned count) are written
     * @return the number q ≥ 0 of active constraints at the optimum; or, when there is none, {@code -1 - p} when
     *         constraint p cannot be satisfied together with the active ones (the constraints are infeasible; see
     *         {@link #infeasibleConstraint}), {@link #ITERATION_LIMIT}, or {@link #NOT_FINITE} when a slack is NaN or
     *         infinite (then {@code lambda} and {@code active} describe the last iterate as well); an absent limit is
     *         a row left out, not a row with b_i = −∞
     * @throws IllegalStateException     when no W has been factored
     * @throws IllegalArgumentException  when m is outside [0, maxM]
     * @throws IndexOutOfBoundsException when an array is too short for its offset and size
     */
    public int solve(double[] a, int aOffset, double[] b, int bOffset, int m, double[] z, int zOffset, double[] u,
            int uOffset, double[] lambda, int lambdaOffset, int[] active, int activeOffset) {
        checkSizes(a, aOffset, b, bOffset, m, z, zOffset, u, uOffset, lambda, lambdaOffset);
        Objects.checkFromIndexSize(activeOffset, Math.min(k, m), active.length);
        q = 0;
        iterations = 0;
        for (int i = 0; i < m; i++) {
            isActive[i] = false;
            rowNorm[i] = -1;
        }
        System.arraycopy(z, zOffset, u, uOffset, k);
        int status = mostViolated(a, aOffset, b, bOffset, m, u, uOffset);
        if (status >= 0) {
            System.arraycopy(inverseFactor, 0, jt, 0, k * k);
            status = iterate(status, a, aOffset, b, bOffset, m, u, uOffset);
        } else if (status == NONE) {
            status = 0;
        }
        for (int i = 0; i < m; i++) {
            lambda[lambdaOffset + i] = 0;
        }
        for (int j = 0; j < q; j++) {
            lambda[lambdaOffset + act[j]] = lam[j];
            active[activeOffset + j] = act[j];
        }
        return status;
    }

    /** @return whether a {@link #solve} code says the constraints are infeasible */
    public static boolean isInfeasible(int code) {
        return code < 0 && code != ITERATION_LIMIT && code != NOT_FINITE;
    }

    /**
     * @param code a {@link #solve} code for which {@link #isInfeasible} holds
     * @return the constraint that could not be added: no point satisfies it together with the constraints active when
     *         the solve stopped
     * @throws IllegalArgumentException when the code does not report infeasible constraints
     */
    public static int infeasibleConstraint(int code) {
        if (!isInfeasible(code)) {
            throw new IllegalArgumentException("code " + code + " does not report infeasible constraints");
        }
        return -1 - code;
    }

    /** @return the number of steps (adds and drops) the last solve took; 0 when z was already feasible */
    public int iterations() {
        return iterations;
    }

    /** @return k of the last {@link #factor} call */
    public int k() {
        return k;
    }

    /**
     * @param tau τ ≥ 0 of the feasibility test (class comment); an optimum leaves each inactive constraint within it
     * @return this
     * @throws IllegalArgumentException when τ is negative, NaN or infinite
     */
    public DenseQp feasibilityTolerance(double tau) {
        this.feasibilityTolerance = nonNegative(tau, "feasibility tolerance");
        return this;
    }

    /**
     * @param delta δ ≥ 0 of the dependence test (class comment)
     * @return this
     * @throws IllegalArgumentException when δ is negative, NaN or infinite
     */
    public DenseQp dependenceTolerance(double delta) {
        this.dependenceTolerance = nonNegative(delta, "dependence tolerance");
        return this;
    }

    /**
     * @param limit the largest number of steps (adds and drops) per solve, or 0 for the default 10·(m + k) (each
     *              constraint may enter and leave a few times, and the count of adds outnumbers the drops by at most
     *              k)
     * @return this
     * @throws IllegalArgumentException when negative
     */
    public DenseQp iterationLimit(int limit) {
        if (limit < 0) {
            throw new IllegalArgumentException("iteration limit must be ≥ 0 (0 = default), found " + limit);
        }
        this.iterationLimit = limit;
        return this;
    }

    private static double nonNegative(double v, String what) {
        if (!(v >= 0 && v < Double.POSITIVE_INFINITY)) {
            throw new IllegalArgumentException(what + " must be finite and ≥ 0, found " + v);
        }
        return v;
    }

    private void checkSizes(double[] a, int aOffset, double[] b, int bOffset, int m, double[] z, int zOffset,
            double[] u, int uOffset, double[] lambda, int lambdaOffset) {
        if (!factored) {
            throw new IllegalStateException("no positive definite W has been factored; call factor before solve");
        }
        if (m < 0 || m > maxM) {
            throw new IllegalArgumentException("m must be in [0, " + maxM + "], found " + m);
        }
        Objects.checkFromIndexSize(aOffset, m * k, a.length);
        Objects.checkFromIndexSize(bOffset, m, b.length);
        Objects.checkFromIndexSize(zOffset, k, z.length);
        Objects.checkFromIndexSize(uOffset, k, u.length);
        Objects.checkFromIndexSize(lambdaOffset, m, lambda.length);
    }

    /** Adds violated constraints until none is left; returns q, or a negative code. */
    private int iterate(int first, double[] a, int aOffset, double[] b, int bOffset, int m, double[] u, int uOffset) {
        int limit = iterationLimit > 0 ? iterationLimit : 10 * (m + k);
        int p = first;
        while (p >= 0) {
            int status = enter(p, a, aOffset + p * k, b[bOffset + p], u, uOffset, limit);
            if (status < 0) {
                return status;
            }
            p = mostViolated(a, aOffset, b, bOffset, m, u, uOffset);
        }
        return p == NONE ? q : p;
    }

    /**
     * The inactive constraint farthest from its half-space, {@link #NONE} when all hold to the tolerance, or
     * {@link #NOT_FINITE}.
     */
    private int mostViolated(double[] a, int aOffset, double[] b, int bOffset, int m, double[] u, int uOffset) {
        int worst = NONE;
        double worstDistance = 0;
        for (int i = 0; i < m; i++) {
            if (isActive[i]) {
                continue;
            }
            int row = aOffset + i * k;
            double bi = b[bOffset + i];
            double slack = -bi;
            double scale = Math.abs(bi);
            for (int j = 0; j < k; j++) {
                double t = a[row + j] * u[uOffset + j];
                slack += t;
                scale += Math.abs(t);
            }
            // a finite scale bounds every term, so the slack is finite too; NaN fails the comparison
            if (!(scale < Double.POSITIVE_INFINITY)) {
                return NOT_FINITE;
            }
            if (slack >= -feasibilityTolerance * scale) {
                continue;
            }
            // a zero row cannot be met (slack = −b_i < 0): infinite distance puts it first, to be reported at once
            double distance = -slack / rowNorm(a, row, i);
            if (worst == NONE || distance > worstDistance) {
                worst = i;
                worstDistance = distance;
            }
        }
        return worst;
    }

    private double rowNorm(double[] a, int row, int i) {
        if (rowNorm[i] < 0) {
            double s = 0;
            for (int j = 0; j < k; j++) {
                s += a[row + j] * a[row + j];
            }
            rowNorm[i] = Math.sqrt(s);
        }
        return rowNorm[i];
    }

    /**
     * Brings constraint p (normal at {@code a[row..]}) into the active set by primal and dual steps, dropping the
     * constraints whose multipliers reach zero on the way. Returns 0, or a negative code.
     */
    private int enter(int p, double[] a, int row, double bp, double[] u, int uOffset, int limit) {
        double lamP = 0;
        while (true) {
            if (++iterations > limit) {
                return ITERATION_LIMIT;
            }
            double free2 = project(a, row);
            boolean dependent = free2 < 0;
            dualDirection();
            int drop = NONE;
            double t1 = Double.POSITIVE_INFINITY;
            for (int j = 0; j < q; j++) {
                if (r[j] > 0 && lam[j] / r[j] < t1) {
                    t1 = lam[j] / r[j];
                    drop = j;
                }
            }
            if (dependent && drop == NONE) {
                return -1 - p;
            }
            double t2 = Double.POSITIVE_INFINITY;
            if (!dependent) {
                double slack = -bp;
                for (int j = 0; j < k; j++) {
                    slack += a[row + j] * u[uOffset + j];
                }
                // after partial steps rounding may already have met p: then the full step is no step
                t2 = Math.max(0, -slack) / free2;
            }
            double t = Math.min(t1, t2);
            if (!dependent) {
                primalStep(t, u, uOffset);
            }
            for (int j = 0; j < q; j++) {
                // the ratio test keeps them ≥ 0 in exact arithmetic; the clamp removes rounding below zero
                lam[j] = Math.max(0, lam[j] - t * r[j]);
            }
            lamP += t;
            if (t2 <= t1) {
                add(p, lamP);
                return 0;
            }
            lam[drop] = 0;
            drop(drop);
        }
    }

    /**
     * d = Jᵀn for the normal at {@code a[row..]}; returns ‖d₂‖², or −1 when the normal depends on the active ones
     * (‖d₂‖ ≤ δ‖d‖; always when q = k).
     */
    private double project(double[] a, int row) {
        double all = 0;
        double free = 0;
        for (int c = 0; c < k; c++) {
            double s = 0;
            int base = c * k;
            for (int j = 0; j < k; j++) {
                s += jt[base + j] * a[row + j];
            }
            d[c] = s;
            all += s * s;
            if (c >= q) {
                free += s * s;
            }
        }
        return free > dependenceTolerance * dependenceTolerance * all ? free : -1;
    }

    /** r = R⁻¹d₁ by back substitution, column by column (R is stored by columns). */
    private void dualDirection() {
        System.arraycopy(d, 0, r, 0, q);
        for (int c = q - 1; c >= 0; c--) {
            int base = c * maxK;
            double rcv = r[c] / rc[base + c];
            r[c] = rcv;
            for (int i = 0; i < c; i++) {
                r[i] -= rc[base + i] * rcv;
            }
        }
    }

    /** u ← u + t·J₂d₂. */
    private void primalStep(double t, double[] u, int uOffset) {
        for (int c = q; c < k; c++) {
            double f = t * d[c];
            if (f != 0) {
                int base = c * k;
                for (int j = 0; j < k; j++) {
                    u[uOffset + j] += f * jt[base + j];
                }
            }
        }
    }

    /** Appends p with multiplier λ_p: rotations fold d₂ into d_q, and R gains the column (d₁, d_q). */
    private void add(int p, double lamP) {
        for (int j = k - 1; j > q; j--) {
            if (d[j] != 0) {
                d[j - 1] = givens(d[j - 1], d[j]);
                d[j] = 0;
                rotateRows(jt, (j - 1) * k, j * k, k);
            }
        }
        if (d[q] < 0) {
            // a reflection of J's column q keeps J = L⁻ᵀQ and gives R a positive diagonal
            d[q] = -d[q];
            for (int j = 0; j < k; j++) {
                jt[q * k + j] = -jt[q * k + j];
            }
        }
        System.arraycopy(d, 0, rc, q * maxK, q + 1);
        lam[q] = lamP;
        act[q] = p;
        isActive[p] = true;
        q++;
    }

    /**
     * Removes the active constraint at position l: R's later columns shift left, which leaves one subdiagonal entry
     * in each; a rotation of rows (c, c+1) removes it, and the same rotation of J's columns keeps Jᵀ N = [R; 0].
     */
    private void drop(int l) {
        isActive[act[l]] = false;
        for (int c = l; c < q - 1; c++) {
            System.arraycopy(rc, (c + 1) * maxK, rc, c * maxK, c + 2);
            lam[c] = lam[c + 1];
            act[c] = act[c + 1];
        }
        q--;
        for (int c = l; c < q; c++) {
            int base = c * maxK;
            if (rc[base + c + 1] == 0) {
                continue;
            }
            rc[base + c] = givens(rc[base + c], rc[base + c + 1]);
            rc[base + c + 1] = 0;
            for (int c2 = c + 1; c2 < q; c2++) {
                int b2 = c2 * maxK;
                double x = rc[b2 + c];
                double y = rc[b2 + c + 1];
                rc[b2 + c] = rotC * x + rotS * y;
                rc[b2 + c + 1] = rotC * y - rotS * x;
            }
            rotateRows(jt, c * k, (c + 1) * k, k);
        }
    }

    /**
     * The rotation taking (x, y) to (h, 0), h = √(x² + y²) ≥ 0 computed without overflow; sets {@link #rotC} and
     * {@link #rotS} and returns h. y must not be 0.
     */
    private double givens(double x, double y) {
        double ax = Math.abs(x);
        double ay = Math.abs(y);
        double h;
        if (ax > ay) {
            double ratio = y / x;
            h = ax * Math.sqrt(1 + ratio * ratio);
        } else {
            double ratio = x / y;
            h = ay * Math.sqrt(1 + ratio * ratio);
        }
        rotC = x / h;
        rotS = y / h;
        return h;
    }

    /** Applies the last rotation to the rows (of length n) at {@code first} and {@code second}. */
    private void rotateRows(double[] m, int first, int second, int n) {
        double c = rotC;
        double s = rotS;
        for (int j = 0; j < n; j++) {
            double x = m[first + j];
            double y = m[second + j];
            m[first + j] = c * x + s * y;
            m[second + j] = c * y - s * x;
        }
    }
}
