package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.enforce.Penalty;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.activations.IActivation;
import org.nd4j.linalg.activations.impl.ActivationIdentity;
import org.nd4j.linalg.activations.impl.ActivationTanH;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.lossfunctions.impl.LossMSE;

/** Score, score array, gradient and argument checks of {@link LawPenaltyLoss} against independent computations. */
class LawPenaltyLossScoreTest {
    /** Outputs only, one affine and one nonlinear law, with units so that residuals are scaled by the law unit. */
    static final String LAWS = String.join("\n",
            "output q[3] kg/h",
            "output v m/s",
            "const v0 = 2 m/s",
            "law split: q[0] = q[1] + q[2]",
            "law speed: v * v = v0 * v0",
            "");

    private static final int BATCH = 7;
    private static final int P = 4;

    private static INDArray random(SplittableRandom r, int rows, int cols, DataType type) {
        double[] d = new double[rows * cols];
        for (int i = 0; i < d.length; i++) {
            d[i] = r.nextDouble(-1.5, 1.5);
        }
        return Nd4j.create(d, new long[] {rows, cols}, DataType.DOUBLE).castTo(type);
    }

    private static double[] flat(INDArray a) {
        double[][] m = a.castTo(DataType.DOUBLE).toDoubleMatrix();
        double[] f = new double[m.length * m[0].length];
        for (int i = 0; i < m.length; i++) {
            System.arraycopy(m[i], 0, f, i * m[0].length, m[0].length);
        }
        return f;
    }

    /** Per example: LossMSE's score array plus λ times the core penalty of the activated output. */
    private static double[] expectedPerExample(INDArray labels, INDArray pre, IActivation act, double lambda,
            Penalty penalty) {
        // Source: Deeplearning4j 1.0.0-M2.1 LossMSE (the MSE part: squared errors summed over the outputs,
        // divided by the number of outputs)
        double[] mse = flat(new LossMSE().computeScoreArray(labels, pre, act, null));
        double[] y = flat(act.getActivation(pre.dup(), false));
        double[] perSample = new double[labels.rows()];
        penalty.value(null, y, labels.rows(), perSample);
        double[] e = new double[labels.rows()];
        for (int s = 0; s < e.length; s++) {
            e[s] = mse[s] + lambda * perSample[s];
        }
        return e;
    }

    @Test
    void scoreIsMsePlusLambdaTimesPenalty() {
        SplittableRandom r = new SplittableRandom(11);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        double lambda = 0.7;
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), lambda);
        Penalty penalty = Penalty.of(LawSpec.of(LAWS).lawSet());
        for (IActivation act : new IActivation[] {new ActivationIdentity(), new ActivationTanH()}) {
            double[] expected = expectedPerExample(labels, pre, act, lambda, penalty);
            double sum = 0;
            for (double v : expected) {
                sum += v;
            }
            assertArrayEquals(expected, flat(loss.computeScoreArray(labels, pre, act, null)), 1e-12, act.toString());
            assertEquals(sum, loss.computeScore(labels, pre, act, null, false), 1e-12, act.toString());
            // average divides by the number of rows, as LossL2/LossMSE do
            assertEquals(sum / BATCH, loss.computeScore(labels, pre, act, null, true), 1e-13, act.toString());
            assertEquals(sum / BATCH, loss.computeGradientAndScore(labels, pre, act, null, true).getFirst(), 1e-13);
            assertTrue(expected[0] > flat(new LossMSE().computeScoreArray(labels, pre, act, null))[0],
                    "the random outputs violate the laws, so the penalty adds to the MSE");
        }
    }

    @Test
    void lawWeightsScaleEachLaw() {
        SplittableRandom r = new SplittableRandom(12);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        double[] w = {2.5, 0.25};
        LawPenaltyLoss loss = new LawPenaltyLoss(LawSpec.of(LAWS), 1.3, w);
        double[] expected = expectedPerExample(labels, pre, new ActivationIdentity(), 1.3,
                Penalty.of(LawSpec.of(LAWS).lawSet(), w));
        assertArrayEquals(expected, flat(loss.computeScoreArray(labels, pre, new ActivationIdentity(), null)), 1e-12);
        assertArrayEquals(w, loss.getLawWeights());
        assertThrows(IllegalArgumentException.class,
                () -> new LawPenaltyLoss(LawSpec.of(LAWS), 1.0, new double[] {1.0}));
    }

    @Test
    void zeroLambdaGradientIsLossMseGradient() {
        SplittableRandom r = new SplittableRandom(13);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        INDArray mask = Nd4j.create(new double[] {1, 0, 1, 1, 0.5, 1, 0}, new long[] {BATCH, 1}, DataType.DOUBLE);
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), 0.0);
        IActivation act = new ActivationTanH();
        // Source: Deeplearning4j 1.0.0-M2.1 LossMSE
        INDArray reference = new LossMSE().computeGradient(labels, pre.dup(), act, mask);
        assertArrayEquals(flat(reference), flat(loss.computeGradient(labels, pre, act, mask)), 1e-14);
        assertEquals(new LossMSE().computeScore(labels, pre, act, mask, true),
                loss.computeScore(labels, pre, act, mask, true), 1e-14);
    }

    @Test
    void gradientAddsLambdaTimesPenaltyGradientBeforeTheActivation() {
        SplittableRandom r = new SplittableRandom(14);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        double lambda = 0.9;
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), lambda);
        IActivation act = new ActivationTanH();
        double[] y = flat(act.getActivation(pre.dup(), false));
        double[] gy = new double[BATCH * P];
        Penalty.of(LawSpec.of(LAWS).lawSet()).gradient(null, y, BATCH, gy, null);
        double[] mseGrad = flat(new LossMSE().computeGradient(labels, pre.dup(), act, null));
        double[] g = flat(loss.computeGradient(labels, pre, act, null));
        double[] z = flat(pre);
        for (int k = 0; k < g.length; k++) {
            double dTanh = 1 - Math.tanh(z[k]) * Math.tanh(z[k]);
            assertEquals(mseGrad[k] + lambda * gy[k] * dTanh, g[k], 1e-12, "element " + k);
        }
        assertArrayEquals(g, flat(loss.computeGradientAndScore(labels, pre, act, null, false).getSecond()), 0.0);
    }

    @Test
    void perExampleMaskMultipliesEachExample() {
        SplittableRandom r = new SplittableRandom(15);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        double[] m = {1, 0, 1, 0.5, 0, 1, 1};
        INDArray mask = Nd4j.create(m, new long[] {BATCH, 1}, DataType.DOUBLE);
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), 0.4);
        IActivation act = new ActivationIdentity();
        double[] unmasked = flat(loss.computeScoreArray(labels, pre, act, null));
        double[] masked = flat(loss.computeScoreArray(labels, pre, act, mask));
        double sum = 0;
        for (int s = 0; s < BATCH; s++) {
            assertEquals(m[s] * unmasked[s], masked[s], 1e-14, "example " + s);
            sum += m[s] * unmasked[s];
        }
        assertEquals(sum / BATCH, loss.computeScore(labels, pre, act, mask, true), 1e-13);
        double[] gu = flat(loss.computeGradient(labels, pre, act, null));
        double[] gm = flat(loss.computeGradient(labels, pre, act, mask));
        for (int k = 0; k < gu.length; k++) {
            assertEquals(m[k / P] * gu[k], gm[k], 1e-14, "element " + k);
        }

        // a mask with the labels' shape whose rows are constant is the same per-example mask
        INDArray wide = mask.repeat(1, P);
        assertArrayEquals(masked, flat(loss.computeScoreArray(labels, pre, act, wide)), 0.0);
        assertArrayEquals(gm, flat(loss.computeGradient(labels, pre, act, wide)), 0.0);
    }

    @Test
    void maskedExampleContributesZeroEvenWhenNotFinite() {
        SplittableRandom r = new SplittableRandom(16);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        pre.putScalar(2, 1, Double.NaN);
        labels.putScalar(2, 3, Double.POSITIVE_INFINITY);
        INDArray mask = Nd4j.ones(DataType.DOUBLE, BATCH, 1);
        mask.putScalar(2, 0, 0.0);
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), 0.4);
        double score = loss.computeScore(labels, pre, new ActivationIdentity(), mask, false);
        assertTrue(Double.isFinite(score), "score " + score);
        double[] g = flat(loss.computeGradient(labels, pre, new ActivationIdentity(), mask));
        for (int j = 0; j < P; j++) {
            assertEquals(0.0, g[2 * P + j]);
        }
        for (double v : g) {
            assertTrue(Double.isFinite(v));
        }
    }

    @Test
    void perOutputMaskIsRefused() {
        SplittableRandom r = new SplittableRandom(17);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        INDArray mask = Nd4j.ones(DataType.DOUBLE, BATCH, P);
        mask.putScalar(3, 2, 0.0);
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), 0.4);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> loss.computeScore(labels, pre, new ActivationIdentity(), mask, true));
        assertTrue(e.getMessage().contains("per-example masks only") && e.getMessage().contains("row 3"),
                e.getMessage());
        assertThrows(IllegalArgumentException.class,
                () -> loss.computeGradient(labels, pre, new ActivationIdentity(), Nd4j.ones(DataType.DOUBLE, 3, 1)));
    }

    @Test
    void floatArraysGiveTheDoubleResultRoundedOnce() {
        SplittableRandom r = new SplittableRandom(18);
        INDArray labels = random(r, BATCH, P, DataType.DOUBLE);
        INDArray pre = random(r, BATCH, P, DataType.DOUBLE);
        INDArray labelsF = labels.castTo(DataType.FLOAT);
        INDArray preF = pre.castTo(DataType.FLOAT);
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), 0.6);
        IActivation act = new ActivationIdentity();
        // the float arrays hold the same values once widened, so the double computation on them is the reference
        INDArray scores = loss.computeScoreArray(labelsF, preF, act, null);
        INDArray grad = loss.computeGradient(labelsF, preF, act, null);
        assertEquals(DataType.FLOAT, scores.dataType());
        assertEquals(DataType.FLOAT, grad.dataType());
        double[] sd = flat(loss.computeScoreArray(labelsF.castTo(DataType.DOUBLE), preF.castTo(DataType.DOUBLE),
                act, null));
        double[] gd = flat(loss.computeGradient(labelsF.castTo(DataType.DOUBLE), preF.castTo(DataType.DOUBLE), act,
                null));
        double[] sf = flat(scores);
        double[] gf = flat(grad);
        for (int s = 0; s < sd.length; s++) {
            assertEquals((float) sd[s], (float) sf[s], "example " + s);
        }
        for (int k = 0; k < gd.length; k++) {
            assertEquals((float) gd[k], (float) gf[k], "element " + k);
        }
    }

    @Test
    void lawSetNeedingInputsIsRefused() {
        LawSpec spec = LawSpec.of(String.join("\n",
                "input feed kg/h",
                "output a kg/h",
                "output b kg/h",
                "law balance: a + b = feed",
                ""));
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> LawPenaltyLoss.of(spec, 1.0));
        assertTrue(e.getMessage().contains("needs the inputs feed")
                && e.getMessage().contains("sees only the network output"), e.getMessage());
        // configured through the setters (as the JSON mapper does), it is refused at first use
        LawPenaltyLoss loss = new LawPenaltyLoss();
        loss.setLaws(spec);
        INDArray a = Nd4j.zeros(DataType.DOUBLE, 2, 2);
        IllegalArgumentException e2 = assertThrows(IllegalArgumentException.class,
                () -> loss.computeScore(a, a, new ActivationIdentity(), null, true));
        assertEquals(e.getMessage(), e2.getMessage());
    }

    @Test
    void badArgumentsAreRefusedClearly() {
        INDArray wrong = Nd4j.zeros(DataType.DOUBLE, 2, 3);
        LawPenaltyLoss loss = LawPenaltyLoss.of(LawSpec.of(LAWS), 1.0);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> loss.computeScore(wrong, wrong, new ActivationIdentity(), null, true));
        assertTrue(e.getMessage().contains("has 3 columns") && e.getMessage().contains("4 outputs"), e.getMessage());
        assertThrows(IllegalArgumentException.class, () -> loss.computeGradient(Nd4j.zeros(DataType.DOUBLE, 2, 4),
                wrong, new ActivationIdentity(), null));
        assertThrows(IllegalArgumentException.class, () -> loss.setPenaltyWeight(-1));
        assertThrows(IllegalArgumentException.class, () -> loss.setPenaltyWeight(Double.NaN));
        assertThrows(IllegalArgumentException.class, () -> loss.setPenaltyWeight(Double.POSITIVE_INFINITY));
        IllegalStateException none = assertThrows(IllegalStateException.class, () -> new LawPenaltyLoss().penalty());
        assertTrue(none.getMessage().contains("setLaws"), none.getMessage());
    }

    @Test
    void equalityFollowsTheConfiguration() {
        LawPenaltyLoss a = new LawPenaltyLoss(LawSpec.of(LAWS), 0.5, new double[] {1, 2});
        LawPenaltyLoss b = new LawPenaltyLoss(LawSpec.of(LAWS), 0.5, new double[] {1, 2});
        assertEquals(a, b);
        assertEquals(a.hashCode(), b.hashCode());
        assertEquals(a.toString(), b.toString());
        assertTrue(a.toString().contains("penaltyWeight=0.5"), a.toString());
        assertEquals("LawPenaltyLoss", a.name());
        assertNotEquals(a, new LawPenaltyLoss(LawSpec.of(LAWS), 0.25, new double[] {1, 2}));
        assertNotEquals(a, new LawPenaltyLoss(LawSpec.of(LAWS), 0.5));
        assertNotEquals(a, new LawPenaltyLoss(LawSpec.of(LAWS.replace("2 m/s", "3 m/s")), 0.5,
                new double[] {1, 2}));
    }
}
