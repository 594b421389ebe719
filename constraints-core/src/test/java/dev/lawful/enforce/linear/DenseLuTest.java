package dev.lawful.enforce.linear;

import static dev.lawful.enforce.CompletionModelsTest.U;
import static dev.lawful.enforce.CompletionModelsTest.signed;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.CompletionModelsTest;
import java.util.Arrays;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * {@link DenseLu} (factor, solve, solveTransposed, with and without offsets) against Apache Commons Math 3.6.1:
 * solutions to a tolerance from the condition number, the factors and the row permutation of partial pivoting, and
 * singular detection.
 */
class DenseLuTest {

    private static double[] flat(double[][] a) {
        int n = a.length;
        double[] f = new double[n * n];
        for (int i = 0; i < n; i++) {
            System.arraycopy(a[i], 0, f, i * n, n);
        }
        return f;
    }

    private static double[][] randomMatrix(SplittableRandom r, int n) {
        double[][] a = new double[n][n];
        for (int i = 0; i < n; i++) {
            // rows of very different scales: partial pivoting must still be backward stable
            double rowScale = Math.pow(10, CompletionModelsTest.uniform(r, -3, 3));
            for (int j = 0; j < n; j++) {
                a[i][j] = r.nextInt(5) == 0 ? 0 : rowScale * signed(r, 0.01, 1);
            }
        }
        return a;
    }

    /** The row permutation of DenseLu's swap sequence: row k of P·A is row perm[k] of A. */
    private static int[] permutation(int[] pivot, int n) {
        int[] perm = new int[n];
        for (int i = 0; i < n; i++) {
            perm[i] = i;
        }
        for (int k = 0; k < n; k++) {
            int t = perm[k];
            perm[k] = perm[pivot[k]];
            perm[pivot[k]] = t;
        }
        return perm;
    }

    private static void assertClose(RealVector expected, double[] actual, double tolerance, String what) {
        double diff = 0;
        for (int i = 0; i < actual.length; i++) {
            double d = actual[i] - expected.getEntry(i);
            diff += d * d;
        }
        double error = Math.sqrt(diff);
        assertTrue(error <= tolerance, () -> what + ": ‖x − x_ref‖ = " + error + " > " + tolerance);
    }

    @Test
    void solveAndSolveTransposedAgreeWithCommonsMath() {
        trials("DenseLu vs Commons Math", 0xD1L, 300, r -> {
            int n = 1 + r.nextInt(8);
            double[][] a = randomMatrix(r, n);
            RealMatrix am = new Array2DRowRealMatrix(a);
            // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
            SingularValueDecomposition svd = new SingularValueDecomposition(am);
            double kappa = svd.getConditionNumber();
            if (!(kappa < 1e8)) {
                return;
            }
            double[] lu = flat(a);
            int[] pivot = new int[n];
            assertTrue(DenseLu.factor(lu, n, pivot), "a matrix of condition " + kappa + " factors");
            double[] b = new double[n];
            for (int i = 0; i < n; i++) {
                b[i] = signed(r, 0.1, 10);
            }
            // Source: Apache Commons Math 3.6.1 LUDecomposition
            LUDecomposition ref = new LUDecomposition(am);
            RealVector want = ref.getSolver().solve(new ArrayRealVector(b));
            double[] got = b.clone();
            DenseLu.solve(lu, n, pivot, got, 0);
            double tol = 2 * kappa * 10 * n * U * want.getNorm();
            assertClose(want, got, tol, "solve (κ = " + kappa + ", n = " + n + ")");
            // Source: Apache Commons Math 3.6.1 LUDecomposition (of the transpose)
            RealVector wantT = new LUDecomposition(am.transpose()).getSolver().solve(new ArrayRealVector(b));
            double[] gotT = b.clone();
            DenseLu.solveTransposed(lu, n, pivot, gotT, 0);
            assertClose(wantT, gotT, 2 * kappa * 10 * n * U * wantT.getNorm(), "solveTransposed (κ = " + kappa + ")");
        });
    }

    @Test
    void factorsAndPermutationAreThoseOfPartialPivoting() {
        trials("DenseLu factors", 0xD2L, 200, r -> {
            int n = 1 + r.nextInt(7);
            double[][] a = randomMatrix(r, n);
            double[] lu = flat(a);
            int[] pivot = new int[n];
            if (!DenseLu.factor(lu, n, pivot)) {
                return;
            }
            // Source: Apache Commons Math 3.6.1 LUDecomposition (partial pivoting on the largest magnitude)
            LUDecomposition ref = new LUDecomposition(new Array2DRowRealMatrix(a), 0);
            assertArrayEquals(ref.getPivot(), permutation(pivot, n), "row permutation");
            RealMatrix l = ref.getL();
            RealMatrix u = ref.getU();
            double largest = 0;
            for (double[] row : a) {
                for (double e : row) {
                    largest = Math.max(largest, Math.abs(e));
                }
            }
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < n; j++) {
                    double got = lu[i * n + j];
                    if (j < i) {
                        assertTrue(Math.abs(got) <= 1, "partial pivoting keeps |L| ≤ 1");
                        assertEquals(l.getEntry(i, j), got, 1e-12, "L[" + i + "][" + j + "]");
                    } else {
                        assertEquals(u.getEntry(i, j), got, 1e-12 * largest, "U[" + i + "][" + j + "]");
                    }
                }
            }
        });
    }

    @Test
    void zeroAndTinyLeadingPivotsArePivotedAway() {
        // a zero in the corner: elimination without row exchange divides by zero
        double[] a = {0, 1, 1, 0};
        int[] pivot = new int[2];
        assertTrue(DenseLu.factor(a, 2, pivot));
        assertArrayEquals(new int[] {1, 1}, pivot, "row 1 is the first pivot");
        double[] b = {3, 5};
        DenseLu.solve(a, 2, pivot, b, 0);
        assertArrayEquals(new double[] {5, 3}, b, 0.0);

        // a tiny corner: without pivoting x0 would come out 0 instead of 1 (fl(1 − 1e20) swamps the second row)
        double[][] m = {{1e-20, 1}, {1, 1}};
        double[] lu = flat(m);
        assertTrue(DenseLu.factor(lu, 2, pivot));
        double[] rhs = {1, 2};
        DenseLu.solve(lu, 2, pivot, rhs, 0);
        // Source: Apache Commons Math 3.6.1 LUDecomposition
        RealVector want = new LUDecomposition(new Array2DRowRealMatrix(m)).getSolver()
                .solve(new ArrayRealVector(new double[] {1, 2}));
        assertEquals(want.getEntry(0), rhs[0], 2 * U);
        assertEquals(want.getEntry(1), rhs[1], 2 * U);
        double[] rhsT = {1, 2};
        DenseLu.solveTransposed(lu, 2, pivot, rhsT, 0);
        RealVector wantT = new LUDecomposition(new Array2DRowRealMatrix(m).transpose()).getSolver()
                .solve(new ArrayRealVector(new double[] {1, 2}));
        assertEquals(wantT.getEntry(0), rhsT[0], 2 * U);
        assertEquals(wantT.getEntry(1), rhsT[1], 2 * U);
    }

    @Test
    void singularMatricesAreDetected() {
        int[] pivot = new int[3];
        assertFalse(DenseLu.factor(new double[9], 3, pivot), "zero matrix");
        assertFalse(DenseLu.factor(new double[] {1, 2, 3, 2, 4, 6, 0, 1, 5}, 3, pivot), "two proportional rows");
        assertFalse(DenseLu.factor(new double[] {1, 2, 3, 4, 5, 6, 5, 7, 9}, 3, pivot), "row 3 = row 1 + row 2");
        assertFalse(DenseLu.factor(new double[] {1, Double.NaN, 0, 1}, 2, pivot), "NaN entry");
        assertFalse(DenseLu.factor(new double[] {1, Double.POSITIVE_INFINITY, 0, 1}, 2, pivot), "infinite entry");
        assertFalse(DenseLu.factor(new double[] {0}, 1, pivot), "1×1 zero");
        assertFalse(DenseLu.factor(new double[] {-0.0}, 1, pivot), "1×1 negative zero");
        assertFalse(DenseLu.factor(new double[] {Double.NaN}, 1, pivot), "1×1 NaN");
        assertFalse(DenseLu.factor(new double[] {Double.NEGATIVE_INFINITY}, 1, pivot), "1×1 infinite");
        assertTrue(DenseLu.factor(new double[] {Double.MIN_VALUE}, 1, pivot), "1×1 subnormal: not zero");
        // near the threshold (a pivot below 1e-14 of the largest entry counts as singular)
        assertFalse(DenseLu.factor(new double[] {1, 1, 1, 1 + 1e-15}, 2, pivot), "pivot 1e-15 of the largest entry");
        assertTrue(DenseLu.factor(new double[] {1, 1, 1, 1 + 1e-12}, 2, pivot), "pivot 1e-12 of the largest entry");
        // the threshold is relative: the same matrices scaled by 1e-200 and 1e200 behave the same
        assertFalse(DenseLu.factor(new double[] {1e-200, 1e-200, 1e-200, 1e-200 * (1 + 1e-15)}, 2, pivot));
        assertTrue(DenseLu.factor(new double[] {1e-200, 1e-200, 1e-200, 1e-200 * (1 + 1e-12)}, 2, pivot));
        assertTrue(DenseLu.factor(new double[] {1e200, 0, 0, 1e200}, 2, pivot));
    }

    @Test
    void rankDeficientRandomMatricesAreDetectedAsCommonsMathSvdRankSays() {
        trials("DenseLu singular", 0xD3L, 200, r -> {
            int n = 2 + r.nextInt(5);
            int rank = 1 + r.nextInt(n - 1);
            // A = B·C with B n×rank and C rank×n
            double[][] a = new double[n][n];
            double[][] bm = new double[n][rank];
            double[][] cm = new double[rank][n];
            for (double[] row : bm) {
                for (int j = 0; j < rank; j++) {
                    row[j] = signed(r, 0.1, 1);
                }
            }
            for (double[] row : cm) {
                for (int j = 0; j < n; j++) {
                    row[j] = signed(r, 0.1, 1);
                }
            }
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < n; j++) {
                    for (int k = 0; k < rank; k++) {
                        a[i][j] += bm[i][k] * cm[k][j];
                    }
                }
            }
            // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
            int svdRank = new SingularValueDecomposition(new Array2DRowRealMatrix(a)).getRank();
            assertTrue(svdRank < n, "the reference sees the rank deficiency");
            assertFalse(DenseLu.factor(flat(a), n, new int[n]), () -> "rank " + rank + " of " + n + ": "
                    + Arrays.deepToString(a));
        });
    }

    @Test
    void offsetsAddressOneMatrixOfAPackedBatch() {
        SplittableRandom r = new SplittableRandom(0xD4L);
        int n = 4;
        int batch = 5;
        double[] packed = new double[batch * n * n];
        double[] rhs = new double[batch * n + 3];
        for (int i = 0; i < packed.length; i++) {
            packed[i] = signed(r, 0.1, 1);
        }
        for (int i = 0; i < rhs.length; i++) {
            rhs[i] = signed(r, 0.1, 1);
        }
        int[] pivots = new int[batch * n];
        double[] alone = new double[n * n];
        int[] pivotAlone = new int[n];
        for (int s = 0; s < batch; s++) {
            System.arraycopy(packed, s * n * n, alone, 0, n * n);
            double[] before = packed.clone();
            assertTrue(DenseLu.factor(packed, n, pivots, s * n * n, s * n));
            // nothing outside the sample's matrix changes
            for (int i = 0; i < packed.length; i++) {
                if (i < s * n * n || i >= (s + 1) * n * n) {
                    assertEquals(before[i], packed[i], 0.0);
                }
            }
            assertTrue(DenseLu.factor(alone, n, pivotAlone));
            assertArrayEquals(alone, Arrays.copyOfRange(packed, s * n * n, (s + 1) * n * n), 0.0, "same factors");
            assertArrayEquals(pivotAlone, Arrays.copyOfRange(pivots, s * n, (s + 1) * n), "same pivots");
            double[] b = Arrays.copyOfRange(rhs, 3 + s * n, 3 + (s + 1) * n);
            double[] bt = b.clone();
            DenseLu.solve(alone, n, pivotAlone, b, 0);
            DenseLu.solveTransposed(alone, n, pivotAlone, bt, 0);
            double[] inPlace = rhs.clone();
            DenseLu.solve(packed, n, pivots, inPlace, 3 + s * n, s * n * n, s * n);
            assertArrayEquals(b, Arrays.copyOfRange(inPlace, 3 + s * n, 3 + (s + 1) * n), 0.0, "solve at an offset");
            double[] inPlaceT = rhs.clone();
            DenseLu.solveTransposed(packed, n, pivots, inPlaceT, 3 + s * n, s * n * n, s * n);
            assertArrayEquals(bt, Arrays.copyOfRange(inPlaceT, 3 + s * n, 3 + (s + 1) * n), 0.0,
                    "solveTransposed at an offset");
        }
    }
}
