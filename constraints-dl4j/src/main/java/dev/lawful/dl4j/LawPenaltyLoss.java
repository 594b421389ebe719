package dev.lawful.dl4j;

import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Penalty;
import java.util.Arrays;
import java.util.Objects;
import org.nd4j.common.primitives.Pair;
import org.nd4j.linalg.activations.IActivation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.lossfunctions.ILossFunction;

/**
 * The soft baseline, for an honest comparison with exact enforcement: mean squared error on the labels plus a
 * weighted penalty on the law residuals of the network output. Per example s
 * <pre>
 *   L_s = (1/p) Σ_j (ŷ_sj − l_sj)²  +  λ · P(ŷ_s)
 * </pre>
 * where ŷ = activation(preOutput) is the network output (all p outputs of the law set, in declared order), l the
 * labels, λ the {@linkplain #getPenaltyWeight() penalty weight} and P the per-sample {@link Penalty} of the same law
 * set, {@code Σ_i w_i (r_i / u_i)²} with the optional {@linkplain #getLawWeights() per-law weights} w_i. The MSE part
 * follows Deeplearning4j's {@code LossMSE} exactly: squared errors summed over the outputs and divided by the number
 * of outputs; {@link #computeScore} sums over the examples and, when {@code average} is true, divides by the number
 * of rows (masked rows included), as {@code LossL2} does. The gradient goes through
 * {@link IActivation#backprop(INDArray, INDArray)} like every Deeplearning4j loss.
 *
 * <p>All arithmetic is done in double (the arrays are converted, the residuals and their gradients come from
 * {@link Penalty}); the score array and gradient are returned in the data type of {@code preOutput}, so float and
 * double networks both work.
 *
 * <p>The law set must need no inputs: a loss function sees only the network output and the labels, so a law whose
 * terms depend on the network inputs cannot be evaluated here and is refused with a message saying so. Unlike the
 * exact law layer, a penalty only makes violations small on average: the residual falls as λ grows but does not reach
 * zero.
 *
 * <p>Masks: a per-example mask of shape {@code [batch, 1]} (what Deeplearning4j passes for feed-forward labels masks
 * and for time series reshaped to 2d) multiplies each example's loss and gradient; an example whose mask is 0
 * contributes exactly 0 to both, even when its output or labels are not finite. A mask with the shape of the labels is
 * accepted only when each row holds one value (then it is a per-example mask), and so is a rank-1 mask of one value
 * per example; a mask that masks some outputs of an
 * example and not others is refused, because a law couples the outputs of an example. Arrays must have rank 2.
 *
 * <p>Serialises with the network's JSON configuration (Deeplearning4j writes the {@code @class} of every loss
 * function): the law text travels readable inside its {@link LawSpec}, with λ and the law weights. The penalty built
 * from the law set is cached in a transient field and rebuilt on first use after loading. Instances are safe to share
 * between threads once configured (each call allocates its own work arrays); setters are for configuration only.
 */
public final class LawPenaltyLoss implements ILossFunction {
    private static final long serialVersionUID = 1L;

    private LawSpec laws;
    private double penaltyWeight = 1.0;
    private double[] lawWeights;
    private transient volatile Penalty penalty;

    /** For the JSON mapper; use {@link #of(LawSpec, double)} or set the laws and weights before use. */
    public LawPenaltyLoss() {
    }

    /**
     * @param laws          the law set; it must need no inputs
     * @param penaltyWeight λ, finite and not negative
     * @throws IllegalArgumentException when the law set needs inputs or λ is not finite and not negative
     * @throws dev.lawful.algebra.LawException when the law text does not parse or check
     */
    public LawPenaltyLoss(LawSpec laws, double penaltyWeight) {
        this(laws, penaltyWeight, null);
    }

    /**
     * @param laws          the law set; it must need no inputs
     * @param penaltyWeight λ, finite and not negative
     * @param lawWeights    w_i, one per scalar law in {@link LawEvaluator#lawName(int)} order (copied), each finite
     *                      and not negative, in 1/(law unit)²; null gives every law weight 1
     * @throws IllegalArgumentException when the law set needs inputs, λ is not finite and not negative, or the law
     *                                  weights do not fit the law set
     * @throws dev.lawful.algebra.LawException when the law text does not parse or check
     */
    public LawPenaltyLoss(LawSpec laws, double penaltyWeight, double[] lawWeights) {
        setLaws(laws);
        setPenaltyWeight(penaltyWeight);
        setLawWeights(lawWeights);
        penalty();
    }

    /**
     * @param laws          the law set; it must need no inputs
     * @param penaltyWeight λ, finite and not negative
     * @return the loss, checked against the law set now rather than at first use
     * @throws IllegalArgumentException when the law set needs inputs or λ is not finite and not negative
     */
    public static LawPenaltyLoss of(LawSpec laws, double penaltyWeight) {
        return new LawPenaltyLoss(laws, penaltyWeight);
    }

    // ---- configuration (JSON properties) ---------------------------------------------------------------------

    /** @return the law set the penalty uses */
    public LawSpec getLaws() {
        return laws;
    }

    /** Sets the law set; it is checked (and must need no inputs) on first use. */
    public void setLaws(LawSpec laws) {
        this.laws = Objects.requireNonNull(laws, "laws");
        this.penalty = null;
    }

    /** @return λ, the weight of the law penalty relative to the MSE */
    public double getPenaltyWeight() {
        return penaltyWeight;
    }

    /**
     * Sets λ.
     *
     * @throws IllegalArgumentException when λ is not finite or is negative
     */
    public void setPenaltyWeight(double penaltyWeight) {
        if (!(penaltyWeight >= 0) || penaltyWeight == Double.POSITIVE_INFINITY) {
            throw new IllegalArgumentException("penalty weight must be finite and not negative, found "
                    + penaltyWeight);
        }
        this.penaltyWeight = penaltyWeight;
    }

    /** @return the per-law weights w_i (a copy), one per scalar law, or null when every law has weight 1 */
    public double[] getLawWeights() {
        return lawWeights == null ? null : lawWeights.clone();
    }

    /**
     * Sets the per-law weights w_i, one per scalar law in {@link LawEvaluator#lawName(int)} order (copied), in
     * 1/(law unit)²; null gives every law weight 1. They are checked against the law set on first use.
     */
    public void setLawWeights(double[] lawWeights) {
        this.lawWeights = lawWeights == null ? null : lawWeights.clone();
        this.penalty = null;
    }

    /**
     * @return the penalty of the law set with the law weights (built on first use, then shared: it is immutable)
     * @throws IllegalStateException    when no law set is configured
     * @throws IllegalArgumentException when the law set needs inputs or the law weights do not fit it
     * @throws dev.lawful.algebra.LawException when the law text does not parse or check
     */
    public Penalty penalty() {
        Penalty pe = penalty;
        if (pe == null) {
            if (laws == null) {
                throw new IllegalStateException("the law penalty loss has no law set; set it with setLaws");
            }
            LawSet set = laws.lawSet();
            if (set.inputWidth() > 0) {
                throw new IllegalArgumentException("the law set " + laws.getSourceName() + " needs the inputs "
                        + String.join(", ", set.inputNames()) + ", but a Deeplearning4j loss function sees only the"
                        + " network output and the labels; use a law set whose laws involve outputs only, or enforce"
                        + " these laws exactly with a law vertex in a ComputationGraph, which receives the inputs");
            }
            pe = lawWeights == null ? Penalty.of(set) : Penalty.of(set, lawWeights);
            penalty = pe;
        }
        return pe;
    }

    // ---- ILossFunction ---------------------------------------------------------------------------------------

    /**
     * {@inheritDoc}
     *
     * <p>Σ over the examples of (mask ×) {@code MSE_s + λ P_s}, divided by the number of rows when {@code average}.
     */
    @Override
    public double computeScore(INDArray labels, INDArray preOutput, IActivation activationFn, INDArray mask,
            boolean average) {
        double[] perExample = scores(labels, preOutput, activationFn, mask);
        double sum = 0;
        double c = 0;
        for (double v : perExample) {
            double t = sum + v;
            c += Math.abs(sum) >= Math.abs(v) ? (sum - t) + v : (v - t) + sum;
            sum = t;
        }
        double score = sum + c;
        if (average) {
            score /= preOutput.size(0);
        }
        return score;
    }

    /**
     * {@inheritDoc}
     *
     * <p>One value per example, (mask ×) {@code MSE_s + λ P_s}, as a column vector {@code [batch, 1]} in the data
     * type of {@code preOutput}.
     */
    @Override
    public INDArray computeScoreArray(INDArray labels, INDArray preOutput, IActivation activationFn, INDArray mask) {
        double[] perExample = scores(labels, preOutput, activationFn, mask);
        return Nd4j.create(perExample, new long[] {perExample.length, 1}, DataType.DOUBLE)
                .castTo(preOutput.dataType());
    }

    /**
     * {@inheritDoc}
     *
     * <p>dL/dpreOutput: {@code 2 (ŷ − l) / p + λ ∂P/∂ŷ} taken back through the activation, then multiplied by the
     * per-example mask; in the data type of {@code preOutput}.
     */
    @Override
    public INDArray computeGradient(INDArray labels, INDArray preOutput, IActivation activationFn, INDArray mask) {
        Batch b = batch(labels, preOutput, activationFn, mask);
        int p = b.width;
        double[] d = new double[b.rows * p];
        if (penaltyWeight != 0) {
            penalty().gradient(null, b.y, b.rows, d, null);
        }
        for (int s = 0; s < b.rows; s++) {
            for (int j = 0; j < p; j++) {
                int k = s * p + j;
                d[k] = 2 * (b.y[k] - b.labels[k]) / p + penaltyWeight * d[k];
            }
        }
        INDArray dLda = Nd4j.create(d, new long[] {b.rows, p}, DataType.DOUBLE).castTo(preOutput.dataType());
        INDArray gradient = activationFn.backprop(preOutput.dup(), dLda).getFirst();
        if (b.rowMask != null) {
            double[] g = toDoubles(gradient);
            for (int s = 0; s < b.rows; s++) {
                double m = b.rowMask[s];
                for (int j = 0; j < p; j++) {
                    int k = s * p + j;
                    g[k] = m == 0 ? 0.0 : m * g[k];
                }
            }
            gradient = Nd4j.create(g, new long[] {b.rows, p}, DataType.DOUBLE).castTo(preOutput.dataType());
        }
        return gradient;
    }

    /** {@inheritDoc} */
    @Override
    public Pair<Double, INDArray> computeGradientAndScore(INDArray labels, INDArray preOutput,
            IActivation activationFn, INDArray mask, boolean average) {
        return new Pair<>(computeScore(labels, preOutput, activationFn, mask, average),
                computeGradient(labels, preOutput, activationFn, mask));
    }

    /** @return {@code "LawPenaltyLoss"} */
    @Override
    public String name() {
        return "LawPenaltyLoss";
    }

    // ---- internals -------------------------------------------------------------------------------------------

    /** One batch in double: outputs after the activation, labels, and the per-example mask (or null). */
    private static final class Batch {
        int rows;
        int width;
        double[] y;
        double[] labels;
        double[] rowMask;
    }

    private double[] scores(INDArray labels, INDArray preOutput, IActivation activationFn, INDArray mask) {
        Batch b = batch(labels, preOutput, activationFn, mask);
        int p = b.width;
        double[] perExample = new double[b.rows];
        if (penaltyWeight != 0) {
            penalty().value(null, b.y, b.rows, perExample);
        }
        for (int s = 0; s < b.rows; s++) {
            double se = 0;
            for (int j = 0; j < p; j++) {
                double e = b.y[s * p + j] - b.labels[s * p + j];
                se += e * e;
            }
            double v = se / p + penaltyWeight * perExample[s];
            if (b.rowMask != null) {
                double m = b.rowMask[s];
                v = m == 0 ? 0.0 : m * v;
            }
            perExample[s] = v;
        }
        return perExample;
    }

    private Batch batch(INDArray labels, INDArray preOutput, IActivation activationFn, INDArray mask) {
        Objects.requireNonNull(labels, "labels");
        Objects.requireNonNull(preOutput, "preOutput");
        Objects.requireNonNull(activationFn, "activationFn");
        Penalty pe = penalty();
        int p = pe.laws().outputWidth();
        if (preOutput.rank() != 2 || !labels.equalShapes(preOutput)) {
            throw new IllegalArgumentException("labels and network output must both have shape [batch, " + p
                    + "] for the law penalty loss, found labels " + Arrays.toString(labels.shape()) + " and output "
                    + Arrays.toString(preOutput.shape()));
        }
        if (preOutput.size(1) != p) {
            throw new IllegalArgumentException("the network output has " + preOutput.size(1) + " columns but the law"
                    + " set " + laws.getSourceName() + " has " + p + " outputs (" + String.join(", ",
                    pe.laws().outputNames()) + "); the output layer must predict all of them, in declared order");
        }
        Batch b = new Batch();
        b.rows = Math.toIntExact(preOutput.size(0));
        b.width = p;
        INDArray out = activationFn.getActivation(preOutput.dup(), true);
        b.y = toDoubles(out);
        b.labels = toDoubles(labels);
        b.rowMask = rowMask(mask, b.rows, p);
        return b;
    }

    /** The per-example mask, or null when there is none. */
    private static double[] rowMask(INDArray mask, int rows, int p) {
        if (mask == null) {
            return null;
        }
        long[] shape = mask.shape();
        if (mask.rank() == 2 && shape[0] == rows && shape[1] == 1) {
            return toDoubles(mask);
        }
        if (mask.rank() == 1 && shape[0] == rows) {
            return toDoubles(mask);
        }
        if (mask.rank() == 2 && shape[0] == rows && shape[1] == p) {
            double[] m = toDoubles(mask);
            double[] row = new double[rows];
            for (int s = 0; s < rows; s++) {
                row[s] = m[s * p];
                for (int j = 1; j < p; j++) {
                    if (Double.compare(m[s * p + j], row[s]) != 0) {
                        throw new IllegalArgumentException("the law penalty loss supports per-example masks only:"
                                + " row " + s + " of the mask masks some outputs and not others, but a law couples"
                                + " the outputs of an example; give a mask of shape [" + rows + ", 1]");
                    }
                }
            }
            return row;
        }
        throw new IllegalArgumentException("the mask of the law penalty loss must have shape [" + rows + ", 1] (one"
                + " value per example), found " + Arrays.toString(shape));
    }

    /** The values of an array in row-major order, as doubles (a fresh copy; the array is not modified). */
    private static double[] toDoubles(INDArray a) {
        INDArray c = a.castTo(DataType.DOUBLE).dup('c');
        double[] d = c.data().asDouble();
        int n = Math.toIntExact(c.length());
        if (d.length == n) {
            return d;
        }
        double[] r = new double[n];
        for (int i = 0; i < n; i++) {
            r[i] = c.getDouble((long) i);
        }
        return r;
    }

    /** @return whether {@code o} is a law penalty loss with equal law spec, penalty weight and law weights */
    @Override
    public boolean equals(Object o) {
        return o instanceof LawPenaltyLoss l && Objects.equals(laws, l.laws)
                && Double.compare(penaltyWeight, l.penaltyWeight) == 0 && Arrays.equals(lawWeights, l.lawWeights);
    }

    /** @return a hash of the law spec, penalty weight and law weights */
    @Override
    public int hashCode() {
        return Objects.hash(laws, Double.hashCode(penaltyWeight), Arrays.hashCode(lawWeights));
    }

    /** @return the penalty weight, the law weights when set, and the law spec */
    @Override
    public String toString() {
        return "LawPenaltyLoss(penaltyWeight=" + penaltyWeight
                + (lawWeights == null ? "" : ", lawWeights=" + Arrays.toString(lawWeights)) + ", laws=" + laws + ")";
    }
}
