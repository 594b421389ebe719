package dev.lawful.enforce;

import static dev.lawful.enforce.CompletionModelsTest.U;
import static dev.lawful.enforce.CompletionModelsTest.block;
import static dev.lawful.enforce.CompletionModelsTest.exact;
import static dev.lawful.enforce.CompletionModelsTest.exactCheck;
import static dev.lawful.enforce.CompletionModelsTest.plus;
import static dev.lawful.enforce.CompletionModelsTest.trials;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawSet;
import java.util.SplittableRandom;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.QRDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * The per-sample solve of the affine tiers against an independent linear-algebra library. For a random
 * well-conditioned affine law set, each sample's system A y_c = b (A = ∂C/∂y_c, b = −C at y_c = 0, formed in
 * double-double and rounded once) is solved by Apache Commons Math, and the completed outputs must agree with that
 * solution to a tolerance derived from the condition number:
 *
 * <pre>
 * ‖ŷ − y_ref‖₂ ≤ ‖ρ‖₂ / σ_min + κ₂·10·n·2⁻⁵³·‖y_ref‖₂ + 2⁻⁵³·‖b‖₂ / σ_min
 * </pre>
 *
 * where ρ is what the documented residual bound allows each law (so ‖A(ŷ − y)‖ ≤ ‖ρ‖ for the exact solution y), the
 * second term is the backward error of the reference's LU with partial pivoting, and the third the rounding of b.
 */
class CompletionReferenceTest {

    private static void compareWithCommonsMath(CompletionModelsTest.Model model, SplittableRandom r) {
        LawSet laws = model.lawSet();
        Completion c = Completion.of(laws);
        int batch = 1 + r.nextInt(40);
        double[][] drawn = model.batch(r, batch);
        double[] x = drawn[0];
        double[] y = new double[batch * model.p];
        c.forward(x, drawn[1], batch, y, null, c.newWorkspace());
        int n = model.completed.length;
        int q = model.q;
        double[] v = new double[q + model.p];
        for (int s = 0; s < batch; s++) {
            System.arraycopy(drawn[2], s * (q + model.p), v, 0, q + model.p);
            for (int k : model.completed) {
                v[q + k] = 0;
            }
            double[][] a = block(model, v);
            double[] b = new double[n];
            for (int i = 0; i < n; i++) {
                CompletionModelsTest.Law law = model.laws.get(i);
                double[] c0 = {0, 0};
                for (CompletionModelsTest.Addend ad : law.lhs()) {
                    c0 = plus(c0, exact(ad, v));
                }
                for (CompletionModelsTest.Addend ad : law.rhs()) {
                    double[] e = exact(ad, v);
                    c0 = plus(c0, new double[] {-e[0], -e[1]});
                }
                b[i] = -(c0[0] + c0[1]);
            }
            RealMatrix am = new Array2DRowRealMatrix(a);
            RealVector bv = new ArrayRealVector(b);
            // Source: Apache Commons Math 3.6.1 LUDecomposition
            RealVector ref = new LUDecomposition(am).getSolver().solve(bv);
            // Source: Apache Commons Math 3.6.1 QRDecomposition (a second reference: the two must agree)
            RealVector qr = new QRDecomposition(am).getSolver().solve(bv);
            // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
            SingularValueDecomposition svd = new SingularValueDecomposition(am);
            double sigmaMin = svd.getSingularValues()[n - 1];
            double kappa = svd.getConditionNumber();
            assertTrue(kappa < 1e3, "the generated system is well conditioned");
            double refError = kappa * 10 * n * U * ref.getNorm();
            assertTrue(ref.subtract(qr).getNorm() <= 2 * refError + 2 * U * bv.getNorm() / sigmaMin,
                    "LU and QR references agree");
            // what the documented bound allows each law at the completed outputs
            System.arraycopy(x, s * q, v, 0, q);
            System.arraycopy(y, s * model.p, v, q, model.p);
            double rho = 0;
            for (int i = 0; i < n; i++) {
                double allowed = exactCheck(model.laws.get(i), v, laws.expand().roundingDepth(i))[2];
                rho += allowed * allowed;
            }
            double tolerance = Math.sqrt(rho) / sigmaMin + refError + U * bv.getNorm() / sigmaMin;
            double diff = 0;
            for (int k = 0; k < n; k++) {
                double d = y[s * model.p + model.completed[k]] - ref.getEntry(k);
                diff += d * d;
            }
            final int sample = s;
            final double error = Math.sqrt(diff);
            assertTrue(error <= tolerance, () -> "sample " + sample + ": ‖ŷ − y_ref‖ = " + error + " > tolerance "
                    + tolerance + " (κ = " + kappa + ")\n" + model.text());
        }
    }

    @Test
    void constantAffineFoldAgreesWithCommonsMathLu() {
        // Source: Apache Commons Math 3.6.1 LUDecomposition
        trials("constant-affine vs Commons Math", 0x12EF1L, 40,
                r -> compareWithCommonsMath(CompletionModelsTest.constantAffine(r), r));
    }

    @Test
    void perSampleLuAgreesWithCommonsMathLu() {
        // Source: Apache Commons Math 3.6.1 LUDecomposition
        trials("affine vs Commons Math", 0x12EF2L, 40,
                r -> compareWithCommonsMath(CompletionModelsTest.inputAffine(r), r));
    }

    @Test
    void knownSmallSystemAgreesWithCommonsMathToTheLastBits() {
        // a 3×3 system whose coefficients come from the inputs: A = [[x0, x1, 0], [0, x2, x3], [x4, 0, x5]], b = x6..8
        LawSet laws = LawSet.parse("<3x3>", String.join("\n",
                "input x[9]",
                "output y[3]",
                "law r0: x[0]*y[0] + x[1]*y[1] = x[6]",
                "law r1: x[2]*y[1] + x[3]*y[2] = x[7]",
                "law r2: x[4]*y[0] + x[5]*y[2] = x[8]",
                ""));
        Completion c = Completion.of(laws);
        assertEquals(Tier.AFFINE, c.tier());
        double[] x = {2, -1, 3, 0.5, 1, 4, 1, 2, 3};
        double[] y = new double[3];
        c.forward(x, new double[0], 1, y, null, c.newWorkspace());
        RealMatrix a = new Array2DRowRealMatrix(new double[][] {{2, -1, 0}, {0, 3, 0.5}, {1, 0, 4}});
        // Source: Apache Commons Math 3.6.1 LUDecomposition
        RealVector ref = new LUDecomposition(a).getSolver().solve(new ArrayRealVector(new double[] {1, 2, 3}));
        for (int k = 0; k < 3; k++) {
            assertEquals(ref.getEntry(k), y[k], 4 * Math.ulp(ref.getEntry(k)), "y[" + k + "]");
        }
    }
}
