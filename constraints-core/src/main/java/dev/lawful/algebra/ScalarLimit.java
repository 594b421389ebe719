package dev.lawful.algebra;

import java.util.Objects;

/**
 * One scalar limit of a law set, {@code g(x, y) >= 0}: an element of a {@code limit} statement after vectors are
 * expanded, in coherent SI units of the limit's dimension. {@code a >= b} gives {@code g = a - b}, {@code a <= b}
 * gives {@code g = b - a}, and a two-sided {@code lo <= e <= hi} gives two scalar limits, {@code e - lo} (lower)
 * and {@code hi - e} (upper).
 *
 * <p>Names follow the laws' scalar names: {@code rain} for a scalar limit, {@code dry[3]} for element 3 of a
 * vector limit, and a two-sided limit's pieces are {@code share (lower)} and {@code share (upper)}, or
 * {@code share[2] (lower)} and {@code share[2] (upper)} for a vector one.
 *
 * @param name         the scalar limit's name, as above
 * @param declaration  the {@code limit} statement it belongs to
 * @param value        the term g over the law set's variables (inputs then outputs, in declared units); g &ge; 0
 *                     means the sample is inside the limit. Its value is in coherent SI units, so in the
 *                     reporting unit it is {@code g / unit.factor()}
 * @param unit         the unit g is reported in (the declared unit of the limited part where one applies, as for
 *                     laws, else the coherent SI unit of its dimension)
 * @param outputs      the sorted output element indices g involves (at least one)
 * @param singleOutput the output element index when {@code g = c·y_k + r} with c a nonzero constant and r free of
 *                     outputs (inputs allowed), else -1; {@code P >= 0} has P's index
 * @param bound        when {@code singleOutput >= 0} and r is a constant: the value of that output, in its
 *                     declared unit, where g is 0 (so the limit reads {@code y_k >= bound} or
 *                     {@code y_k <= bound}); NaN otherwise
 * @param lower        for a single-output limit, whether it bounds the output from below (c &gt; 0); otherwise
 *                     whether it bounds the limited part from below: the lower piece of a two-sided limit, or a
 *                     one-sided limit written {@code a >= b}
 */
public record ScalarLimit(String name, Declaration.Limit declaration, Term value, Unit unit, int[] outputs,
                          int singleOutput, double bound, boolean lower) {
    /**
     * Keeps a copy of the outputs.
     *
     * @throws NullPointerException when the name, declaration, value, unit or outputs are null
     */
    public ScalarLimit {
        Objects.requireNonNull(name, "name");
        Objects.requireNonNull(declaration, "declaration");
        Objects.requireNonNull(value, "value");
        Objects.requireNonNull(unit, "unit");
        outputs = outputs.clone();
    }

    /** @return the sorted output element indices g involves (a copy) */
    @Override
    public int[] outputs() {
        return outputs.clone();
    }

    /** @return whether g is a constant bound on one output ({@code singleOutput >= 0} and a finite bound) */
    public boolean isConstantBound() {
        return singleOutput >= 0 && !Double.isNaN(bound);
    }
}
