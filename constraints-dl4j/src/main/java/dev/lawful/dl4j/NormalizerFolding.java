package dev.lawful.dl4j;

import java.util.List;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.api.preprocessor.DataNormalization;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerMinMaxScaler;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.factory.Nd4j;

/**
 * Reads a fitted Deeplearning4j normalizer's per-column statistics into a {@link Scaling}, checking them against the
 * law set, with messages that say what to change. Package-private: the layer and the vertex share it.
 */
final class NormalizerFolding {
    private NormalizerFolding() {
    }

    /**
     * @param who        the start of every message ("law layer", "law vertex")
     * @param normalizer a fitted {@link NormalizerStandardize} or {@link NormalizerMinMaxScaler}
     * @param names      the law set's declared output names (the label columns, in declared order)
     * @return the label columns' scaling
     * @throws IllegalArgumentException when the normalizer is of another kind, does not normalise labels, has another
     *         number of label columns, or has a label column it cannot invert
     */
    static Scaling labels(String who, DataNormalization normalizer, List<String> names) {
        supported(who, normalizer);
        if (!normalizer.isFitLabel()) {
            throw new IllegalArgumentException(who + ": the normalizer does not normalise labels (fitLabel is false),"
                    + " but the laws relate the outputs, and their physical values are needed to complete them; call"
                    + " normalizer.fitLabel(true) before normalizer.fit(...), so that the labels are normalised too");
        }
        INDArray[] stats;
        try {
            stats = normalizer instanceof NormalizerStandardize
                    ? new INDArray[] {((NormalizerStandardize) normalizer).getLabelMean(),
                        ((NormalizerStandardize) normalizer).getLabelStd()}
                    : new INDArray[] {((NormalizerMinMaxScaler) normalizer).getLabelMin(),
                        ((NormalizerMinMaxScaler) normalizer).getLabelMax()};
        } catch (NullPointerException e) {
            stats = null;
        }
        if (stats == null || stats[0] == null || stats[1] == null) {
            throw new IllegalArgumentException(who + ": the normalizer has no label statistics; call"
                    + " normalizer.fitLabel(true), then normalizer.fit(...) on the training data");
        }
        return fold(who, normalizer, stats, "label", "outputs", names,
                "fit the normalizer on labels that hold every output in declared order");
    }

    /**
     * @param who        the start of every message
     * @param normalizer a fitted {@link NormalizerStandardize} or {@link NormalizerMinMaxScaler}
     * @param names      the law set's declared input names (the feature columns, in declared order)
     * @return the feature columns' scaling
     * @throws IllegalArgumentException when the normalizer is of another kind, is not fitted, has another number of
     *         feature columns, or has a feature column it cannot invert
     */
    static Scaling features(String who, DataNormalization normalizer, List<String> names) {
        supported(who, normalizer);
        INDArray[] stats;
        try {
            stats = normalizer instanceof NormalizerStandardize
                    ? new INDArray[] {((NormalizerStandardize) normalizer).getMean(),
                        ((NormalizerStandardize) normalizer).getStd()}
                    : new INDArray[] {((NormalizerMinMaxScaler) normalizer).getMin(),
                        ((NormalizerMinMaxScaler) normalizer).getMax()};
        } catch (NullPointerException e) {
            stats = null;
        }
        if (stats == null || stats[0] == null || stats[1] == null) {
            throw new IllegalArgumentException(who + ": the normalizer has no feature statistics; call"
                    + " normalizer.fitLabel(true), then normalizer.fit(...) on the training data");
        }
        return fold(who, normalizer, stats, "feature", "inputs", names,
                "fit the normalizer on features that hold the law inputs in declared order");
    }

    private static void supported(String who, DataNormalization normalizer) {
        if (normalizer == null) {
            throw new IllegalArgumentException(who + ": the normalizer is null; pass the fitted NormalizerStandardize"
                    + " or NormalizerMinMaxScaler that normalises the training data");
        }
        if (!(normalizer instanceof NormalizerStandardize) && !(normalizer instanceof NormalizerMinMaxScaler)) {
            throw new IllegalArgumentException(who + ": a normalizer of type " + normalizer.getClass().getSimpleName()
                    + " cannot be folded into the laws; use NormalizerStandardize or NormalizerMinMaxScaler");
        }
    }

    private static Scaling fold(String who, DataNormalization normalizer, INDArray[] stats, String kind,
                                String declared, List<String> names, String fix) {
        double[] a = stats[0].castTo(DataType.DOUBLE).dup('c').data().asDouble();
        double[] b = stats[1].castTo(DataType.DOUBLE).dup('c').data().asDouble();
        if (a.length != names.size()) {
            throw new IllegalArgumentException(who + ": the normalizer's " + kind + "s have " + a.length + " column"
                    + (a.length == 1 ? "" : "s") + " but the law set declares " + names.size() + " " + declared
                    + " (" + String.join(", ", names) + "); " + fix);
        }
        double[] scale = new double[a.length];
        double[] offset = new double[a.length];
        if (normalizer instanceof NormalizerStandardize) {
            for (int j = 0; j < a.length; j++) {
                if (!(b[j] > Nd4j.EPS_THRESHOLD) || !Double.isFinite(b[j]) || !Double.isFinite(a[j])) {
                    throw new IllegalArgumentException(who + ": " + kind + " column " + j + " (" + names.get(j)
                            + ") has mean " + a[j] + " and standard deviation " + b[j] + " in the normalizer; a"
                            + " standard deviation at or below " + Nd4j.EPS_THRESHOLD + " (the floor Deeplearning4j"
                            + " puts under a zero one) means the column is constant in the data the normalizer was"
                            + " fitted on, so its normalised values cannot be mapped back to physical units; fit the"
                            + " normalizer on data in which " + names.get(j) + " varies, or declare "
                            + names.get(j) + " in a smaller unit");
                }
                scale[j] = b[j];
                offset[j] = a[j];
            }
        } else {
            NormalizerMinMaxScaler m = (NormalizerMinMaxScaler) normalizer;
            double t0 = m.getTargetMin();
            // Deeplearning4j widens an empty target range to 1e-5, so it is never empty here
            double target = m.getTargetMax() - t0;
            for (int j = 0; j < a.length; j++) {
                double range = b[j] - a[j];
                // Deeplearning4j widens a zero range to 1e-5 (max = min + 1e-5, rounded): allow for that rounding
                double floor = Nd4j.EPS_THRESHOLD + 2 * Math.ulp((float) Math.max(Math.abs(a[j]), Math.abs(b[j])));
                if (!(range > floor) || !Double.isFinite(range) || !Double.isFinite(a[j])) {
                    throw new IllegalArgumentException(who + ": " + kind + " column " + j + " (" + names.get(j)
                            + ") has min " + a[j] + " and max " + b[j] + " in the normalizer; a range (max - min) of"
                            + " about " + Nd4j.EPS_THRESHOLD + " or less (what Deeplearning4j makes of a zero range)"
                            + " means the column is constant in the data the normalizer was fitted on, so its"
                            + " normalised values cannot be mapped back to physical units; fit the normalizer on data"
                            + " in which " + names.get(j) + " varies, or declare " + names.get(j) + " in a smaller"
                            + " unit");
                }
                scale[j] = range / target;
                offset[j] = a[j] - t0 * scale[j];
            }
        }
        return new Scaling(scale, offset);
    }
}
