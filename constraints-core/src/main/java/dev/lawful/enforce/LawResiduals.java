package dev.lawful.enforce;

import dev.lawful.algebra.Unit;
import java.util.List;

/**
 * What a {@link ResidualReport} found for one scalar law over a batch.
 *
 * <p>Each sample falls in exactly one class: its residual lhs - rhs is NaN ({@link #notANumber()}), infinite
 * ({@link #infinite()}), or finite ({@link #finite()}). The statistics and the histogram cover the finite samples;
 * a NaN or infinite residual is over any tolerance.
 *
 * <p>The relative residual of a finite sample is |lhs - rhs| / scale, scale being the law's natural scale at that
 * sample as {@link dev.lawful.algebra.LawEvaluator#residuals LawEvaluator.residuals} computes it (the magnitude of
 * the residual's terms, in coherent SI units like the residual). A scale of 0 means every term is 0; then the
 * relative residual is 0 when the residual is 0, and positive infinity otherwise (finite terms cannot do that,
 * since a sum of zeros is zero, but the rule keeps every case defined);
 * an infinite relative residual enters the relative statistics (which then are infinite) and the last histogram
 * bin, and is over any finite tolerance.
 *
 * @param name          the scalar law: its name, or {@code name[i]} for element i of a vector law
 * @param law           the name of the declared law it belongs to
 * @param unit          the unit of {@link #absolute()}: the law's unit ({@code LawSet.lawUnit})
 * @param samples       the number of samples in the batch
 * @param notANumber    samples whose residual is NaN
 * @param infinite      samples whose residual is positive or negative infinity
 * @param overTolerance samples whose relative residual is not at most the report's tolerance: those above it, and
 *                      every NaN or infinite residual
 * @param worstSample   0-based index of the sample with the largest relative residual (a NaN or infinite residual
 *                      counts as larger than any finite one; the first of equals), or -1 for an empty batch
 * @param absolute      statistics of |lhs - rhs| in {@code unit}
 * @param relative      statistics of the relative residual
 * @param histogram     the number of finite samples in each bin of {@link ResidualHistogram}
 */
public record LawResiduals(String name, String law, Unit unit, int samples, int notANumber, int infinite,
                           int overTolerance, int worstSample, ResidualStats absolute, ResidualStats relative,
                           List<Integer> histogram) {

    /**
     * Copies the histogram, so a value never changes once made.
     *
     * @param name          the scalar law's name
     * @param law           the declared law's name
     * @param unit          the unit of the absolute statistics
     * @param samples       samples in the batch
     * @param notANumber    samples with a NaN residual
     * @param infinite      samples with an infinite residual
     * @param overTolerance samples over the tolerance
     * @param worstSample   the sample with the largest relative residual, or -1
     * @param absolute      statistics of |lhs - rhs| in {@code unit}
     * @param relative      statistics of the relative residual
     * @param histogram     {@link ResidualHistogram#BINS} counts
     * @throws IllegalArgumentException when the histogram does not have {@link ResidualHistogram#BINS} bins
     */
    public LawResiduals {
        histogram = List.copyOf(histogram);
        if (histogram.size() != ResidualHistogram.BINS) {
            throw new IllegalArgumentException("a histogram has " + ResidualHistogram.BINS + " bins, found "
                    + histogram.size());
        }
    }

    /** @return the samples whose residual is finite: {@code samples - notANumber - infinite} */
    public int finite() {
        return samples - notANumber - infinite;
    }

    /** @return the samples whose residual is NaN or infinite */
    public int nonFinite() {
        return notANumber + infinite;
    }

    /** @return whether every sample's relative residual is within the report's tolerance */
    public boolean withinTolerance() {
        return overTolerance == 0;
    }
}
