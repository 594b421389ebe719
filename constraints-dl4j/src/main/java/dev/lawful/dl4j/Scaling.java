package dev.lawful.dl4j;

import java.util.Arrays;
import java.util.Objects;

/**
 * A per-column affine map between normalised and physical values, folded from a Deeplearning4j normalizer's
 * statistics: physical = scale·normalised + offset, normalised = (physical − offset) / scale, column by column.
 * For {@code NormalizerStandardize} scale is the standard deviation and offset the mean; for
 * {@code NormalizerMinMaxScaler} with target range [t₀, t₁] scale is (max − min)/(t₁ − t₀) and offset is
 * min − t₀·scale. Every scale is finite and positive and every offset finite (checked when folded and when set).
 *
 * <p>Why the adapter folds this map instead of enforcing the laws on normalised values: a law such as
 * q₀ + q₁ = q₂ reads σ₀n₀ + σ₁n₁ − σ₂n₂ = μ₂ − μ₀ − μ₁ in normalised values, a different law unless every column
 * shares one scale and offset; and a projection in normalised space minimises the physical distance weighted by
 * 1/σ_j², a metric chosen silently by the normalizer. Completing in physical units avoids both.
 *
 * <p>Plain double arrays with a public no-argument constructor, getters and setters, so it serialises bit-identically
 * in a network's JSON configuration; {@link #equals} compares the bits. Build one with
 * {@link LawLayer#normalizedWith} or {@link LawVertex#normalizedWith}, which check it against the law set.
 */
public final class Scaling implements java.io.Serializable {
    private static final long serialVersionUID = 1L;

    private double[] scale;
    private double[] offset;

    /** For the JSON mapper; {@link LawLayer#normalizedWith} and {@link LawVertex#normalizedWith} build scalings. */
    public Scaling() {
    }

    /**
     * @param scale  per-column scale (finite, positive); copied
     * @param offset per-column offset (finite), same length; copied
     * @throws IllegalArgumentException when the lengths differ or a value is out of range
     */
    public Scaling(double[] scale, double[] offset) {
        setScale(scale);
        setOffset(offset);
        check();
    }

    /** @return the per-column scales (a copy) */
    public double[] getScale() {
        return scale == null ? null : scale.clone();
    }

    /** Sets the per-column scales (copied); for the JSON mapper. */
    public void setScale(double[] scale) {
        this.scale = Objects.requireNonNull(scale, "scale").clone();
    }

    /** @return the per-column offsets (a copy) */
    public double[] getOffset() {
        return offset == null ? null : offset.clone();
    }

    /** Sets the per-column offsets (copied); for the JSON mapper. */
    public void setOffset(double[] offset) {
        this.offset = Objects.requireNonNull(offset, "offset").clone();
    }

    /** @return the number of columns */
    public int width() {
        return scale == null ? 0 : scale.length;
    }

    /** @return the scale of column {@code j} */
    public double scale(int j) {
        return scale[j];
    }

    /** @return the offset of column {@code j} */
    public double offset(int j) {
        return offset[j];
    }

    /**
     * Checks both arrays are set, of one length, with finite positive scales and finite offsets.
     *
     * @return this
     * @throws IllegalStateException when not
     */
    Scaling check() {
        if (scale == null || offset == null || scale.length != offset.length) {
            throw new IllegalStateException("a scaling needs scale and offset arrays of one length, found "
                    + (scale == null ? "no scale" : scale.length + " scales") + " and "
                    + (offset == null ? "no offset" : offset.length + " offsets"));
        }
        for (int j = 0; j < scale.length; j++) {
            if (!(scale[j] > 0 && scale[j] < Double.POSITIVE_INFINITY && Double.isFinite(offset[j]))) {
                throw new IllegalStateException("scaling column " + j + " has scale " + scale[j] + " and offset "
                        + offset[j] + "; a scale must be finite and positive and an offset finite");
            }
        }
        return this;
    }

    /**
     * @param normalised row-major {@code batch × width()} normalised values
     * @param batch      number of rows
     * @return a new array of the physical values, scale·normalised + offset per column, in double
     */
    public double[] toPhysical(double[] normalised, int batch) {
        return toPhysical(normalised, batch, null);
    }

    /**
     * {@link #toPhysical(double[], int)} into {@code into} when it holds exactly {@code batch × width()} values (a
     * buffer from an earlier call), else into a new array.
     *
     * @return the array written
     */
    double[] toPhysical(double[] normalised, int batch, double[] into) {
        int w = width();
        double[] out = NdArrays.reuse(into, batch * w);
        for (int i = 0; i < out.length; i++) {
            int j = i % w;
            out[i] = scale[j] * normalised[i] + offset[j];
        }
        return out;
    }

    /**
     * @param physical row-major {@code batch × width()} physical values
     * @param batch    number of rows
     * @return a new array of the normalised values, (physical − offset) / scale per column, in double
     */
    public double[] toNormalised(double[] physical, int batch) {
        int w = width();
        double[] out = new double[batch * w];
        for (int i = 0; i < out.length; i++) {
            int j = i % w;
            out[i] = (physical[i] - offset[j]) / scale[j];
        }
        return out;
    }

    /**
     * Error bounds for {@link dev.lawful.enforce.RoundingBound} when a float network emitted these outputs normalised:
     * per value v (widened from float) of column j, e = ½·σ_j·ulp_f32(v) + 2⁻⁵¹·(|σ_j·v + μ_j| + |μ_j| + |σ_j·v|),
     * the float rounding of the normalised value mapped to physical units plus the double rounding of the two affine
     * maps.
     *
     * @param normalised row-major {@code batch × width()} normalised outputs, widened from float
     * @param batch      number of rows
     * @return a new array of the bounds, physical units
     */
    public double[] floatOutputError(double[] normalised, int batch) {
        int w = width();
        double[] e = new double[batch * w];
        for (int i = 0; i < e.length; i++) {
            int j = i % w;
            double v = normalised[i];
            double sv = scale[j] * v;
            e[i] = 0.5 * scale[j] * Math.ulp((float) v)
                    + 0x1p-51 * (Math.abs(sv + offset[j]) + Math.abs(offset[j]) + Math.abs(sv));
        }
        return e;
    }

    /** @return a copy of this scaling, unchecked (arrays copied) */
    Scaling copy() {
        Scaling s = new Scaling();
        s.scale = scale == null ? null : scale.clone();
        s.offset = offset == null ? null : offset.clone();
        return s;
    }

    /** @return the scaling of the given columns, in the given order */
    Scaling columns(int[] which) {
        double[] s = new double[which.length];
        double[] o = new double[which.length];
        for (int k = 0; k < which.length; k++) {
            s[k] = scale[which[k]];
            o[k] = offset[which[k]];
        }
        return new Scaling(s, o);
    }

    /** Equal when both arrays are equal bit for bit. */
    @Override
    public boolean equals(Object o) {
        return o instanceof Scaling s && Arrays.equals(scale, s.scale) && Arrays.equals(offset, s.offset);
    }

    /** @return a hash of both arrays */
    @Override
    public int hashCode() {
        return 31 * Arrays.hashCode(scale) + Arrays.hashCode(offset);
    }

    /** @return the scales and offsets */
    @Override
    public String toString() {
        return "Scaling{scale " + Arrays.toString(scale) + ", offset " + Arrays.toString(offset) + "}";
    }
}
