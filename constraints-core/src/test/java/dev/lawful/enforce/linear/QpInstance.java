package dev.lawful.enforce.linear;

import static dev.lawful.enforce.CompletionModelsTest.signed;
import static dev.lawful.enforce.CompletionModelsTest.uniform;

import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealMatrix;

/**
 * A random QP minimise ½ (u − z)ᵀW(u − z) subject to A u ≥ b for {@link DenseQp}'s tests, feasible by construction:
 * b = A u0 − slack for a known u0 and slack ≥ 0 (zero for some rows, so that constraints meet at u0 and degenerate
 * vertices occur). W = Q diag(e) Qᵀ with Q orthogonal and e in [1/√c, √c], so cond(W) ≤ c.
 */
record QpInstance(double[][] w, double[][] a, double[] b, double[] z, double[] u0) {

    int k() {
        return z.length;
    }

    int m() {
        return b.length;
    }

    /** A feasible instance with k in [1, maxK], m in [1, maxM] and cond(W) ≤ condition. */
    static QpInstance random(SplittableRandom r, int maxK, int maxM, double condition) {
        int k = 1 + r.nextInt(maxK);
        int m = 1 + r.nextInt(maxM);
        double[][] w = spd(r, k, condition);
        double[] u0 = new double[k];
        for (int j = 0; j < k; j++) {
            u0[j] = signed(r, 0, 2);
        }
        double[][] a = new double[m][k];
        double[] b = new double[m];
        for (int i = 0; i < m; i++) {
            // rows of very different sizes: the tolerances are relative to each row
            double rowScale = Math.pow(10, uniform(r, -2, 2));
            double au = 0;
            for (int j = 0; j < k; j++) {
                a[i][j] = r.nextInt(6) == 0 ? 0 : rowScale * signed(r, 0.05, 1);
                au += a[i][j] * u0[j];
            }
            b[i] = r.nextInt(4) == 0 ? au : au - rowScale * uniform(r, 0, 1);
        }
        double[] z = new double[k];
        double spread = uniform(r, 0.1, 5);
        for (int j = 0; j < k; j++) {
            z[j] = u0[j] + spread * signed(r, 0, 1);
        }
        return new QpInstance(w, a, b, z, u0);
    }

    /** A random symmetric positive definite k×k matrix with condition number at most {@code condition}. */
    static double[][] spd(SplittableRandom r, int k, double condition) {
        double[][] g = new double[k][k];
        for (double[] row : g) {
            for (int j = 0; j < k; j++) {
                row[j] = signed(r, 0, 1);
            }
        }
        // Source: Apache Commons Math 3.6.1 QRDecomposition (an orthogonal Q from a random matrix)
        RealMatrix q = new QRDecomposition(new Array2DRowRealMatrix(g)).getQ();
        double half = Math.log10(condition) / 2;
        double[] e = new double[k];
        for (int j = 0; j < k; j++) {
            e[j] = Math.pow(10, uniform(r, -half, half));
        }
        double[][] w = new double[k][k];
        for (int i = 0; i < k; i++) {
            for (int j = 0; j <= i; j++) {
                double s = 0;
                for (int c = 0; c < k; c++) {
                    s += q.getEntry(i, c) * e[c] * q.getEntry(j, c);
                }
                w[i][j] = s;
                w[j][i] = s;
            }
        }
        return w;
    }

    /** What {@link DenseQp#solve} returned and wrote. */
    record Solution(int code, double[] u, double[] lambda, int[] active, int iterations) {
        int[] activeSet() {
            return Arrays.copyOf(active, Math.max(code, 0));
        }
    }

    /** Factors W in {@code qp} and solves; fails the test when W does not factor. */
    Solution solveWith(DenseQp qp) {
        if (!qp.factor(flat(w, k()), k())) {
            throw new AssertionError("W of condition at most the requested one factors");
        }
        return solveFactored(qp);
    }

    /** Solves with the W already factored in {@code qp}. */
    Solution solveFactored(DenseQp qp) {
        double[] u = new double[k()];
        double[] lambda = new double[m()];
        int[] active = new int[Math.min(k(), m())];
        int code = qp.solve(flat(a, k()), b, m(), z, u, lambda, active);
        return new Solution(code, u, lambda, active, qp.iterations());
    }

    /** The objective ½ (u − z)ᵀW(u − z). */
    double objective(double[] u) {
        double s = 0;
        for (int i = 0; i < k(); i++) {
            for (int j = 0; j < k(); j++) {
                s += 0.5 * (u[i] - z[i]) * w[i][j] * (u[j] - z[j]);
            }
        }
        return s;
    }

    /** The KKT violations of (u, λ) ({@link KktCheck}), four entries. */
    double[] kkt(double[] u, double[] lambda) {
        double[] out = new double[KktCheck.SIZE];
        KktCheck.check(flat(w, k()), k(), flat(a, k()), b, m(), z, u, lambda, out);
        return out;
    }

    QpInstance withZ(double[] newZ) {
        return new QpInstance(w, a, b, newZ, u0);
    }

    static double[] flat(double[][] x, int cols) {
        double[] f = new double[x.length * cols];
        for (int i = 0; i < x.length; i++) {
            System.arraycopy(x[i], 0, f, i * cols, cols);
        }
        return f;
    }
}
