package dev.lawful.examples.report;

import java.util.Arrays;
import java.util.Objects;

/**
 * What one trained network did on a scenario's test rows: its predictions, the residuals of the scenario's laws on
 * those predictions, and its training record. A {@link ScenarioResult} holds one per network and checks the array
 * lengths against its own row and column counts.
 *
 * <p>The arrays are copied on construction and every accessor returns a fresh copy, so a run cannot change after it
 * is made (and holding on to an accessor's array is safe).
 *
 * @param label           the network's name in every table, file and legend, for example {@code "unconstrained"},
 *                        {@code "penalty"} or {@code "exact"}; not blank, no line break
 * @param predicted       the predicted outputs, rows × p values, row-major, in the outputs' physical units (the unit
 *                        of each output's {@link dev.lawful.examples.TruthModel.ColumnGroup}); must be finite
 * @param residuals       the signed residual lhs − rhs of every law on every test row, rows × m values, row-major, in
 *                        each law's SI unit; must be finite
 * @param lossPerEpoch    the network's own training loss after each epoch, in training order (may be empty when it
 *                        was not recorded; a non-finite entry is kept and reported as not finite). Losses of
 *                        different networks need not be comparable: the penalty network's includes its law penalty
 * @param secondsPerEpoch mean wall-clock training time per epoch in seconds; finite and ≥ 0
 */
public record NetworkRun(String label, double[] predicted, double[] residuals, double[] lossPerEpoch,
                         double secondsPerEpoch) {

    /**
     * Checks and copies the arguments.
     *
     * @param label see the class comment
     * @param predicted see the class comment
     * @param residuals see the class comment
     * @param lossPerEpoch see the class comment
     * @param secondsPerEpoch see the class comment
     * @throws IllegalArgumentException when the label is null, blank or holds a line break, an array is null, or
     *                                  {@code secondsPerEpoch} is negative or not finite
     */
    public NetworkRun {
        if (label == null || label.isBlank() || label.indexOf('\n') >= 0 || label.indexOf('\r') >= 0) {
            throw new IllegalArgumentException("a network run needs a label of one line that is not blank, found "
                    + (label == null ? "null" : "'" + label + "'") + "; use a name such as \"exact\"");
        }
        predicted = copy(predicted, label, "predicted");
        residuals = copy(residuals, label, "residuals");
        lossPerEpoch = copy(lossPerEpoch, label, "lossPerEpoch");
        if (!(secondsPerEpoch >= 0) || Double.isInfinite(secondsPerEpoch)) {
            throw new IllegalArgumentException("run '" + label + "': secondsPerEpoch is " + secondsPerEpoch
                    + "; expected the mean training time of one epoch in seconds, finite and >= 0");
        }
    }

    private static double[] copy(double[] a, String label, String what) {
        if (a == null) {
            throw new IllegalArgumentException("run '" + label + "': " + what + " is null; pass an array ("
                    + ("lossPerEpoch".equals(what) ? "an empty one when the loss was not recorded" : "row-major")
                    + ")");
        }
        return a.clone();
    }

    /** @return a copy of the predicted outputs, rows × p, row-major, physical units */
    @Override
    public double[] predicted() {
        return predicted.clone();
    }

    /** @return a copy of the signed law residuals, rows × m, row-major, each law's SI unit */
    @Override
    public double[] residuals() {
        return residuals.clone();
    }

    /** @return a copy of the training loss after each epoch */
    @Override
    public double[] lossPerEpoch() {
        return lossPerEpoch.clone();
    }

    /** @return the number of epochs trained, the length of {@link #lossPerEpoch()} */
    public int epochs() {
        return lossPerEpoch.length;
    }

    /** @return the loss after the last epoch, or NaN when no loss was recorded */
    public double finalLoss() {
        return lossPerEpoch.length == 0 ? Double.NaN : lossPerEpoch[lossPerEpoch.length - 1];
    }

    /** Two runs are equal when their labels, array contents and times are equal. */
    @Override
    public boolean equals(Object o) {
        return o instanceof NetworkRun r && label.equals(r.label) && Arrays.equals(predicted, r.predicted)
                && Arrays.equals(residuals, r.residuals)
                && Arrays.equals(lossPerEpoch, r.lossPerEpoch)
                && Double.compare(secondsPerEpoch, r.secondsPerEpoch) == 0;
    }

    /** @return a hash of the label, the array contents and the time */
    @Override
    public int hashCode() {
        return Objects.hash(label, Arrays.hashCode(predicted), Arrays.hashCode(residuals),
                Arrays.hashCode(lossPerEpoch), secondsPerEpoch);
    }

    /** @return the label and the array lengths (not the values) */
    @Override
    public String toString() {
        return "NetworkRun[" + label + ", " + predicted.length + " predicted, " + residuals.length + " residuals, "
                + lossPerEpoch.length + " epochs, " + secondsPerEpoch + " s/epoch]";
    }
}
