package dev.lawful.algebra;

import java.util.Objects;

/**
 * A physical unit as written by the user, with its meaning: value_in_SI = factor × value_in_this_unit.
 *
 * <p>Lawful converts every declared value to coherent SI units before it evaluates a law, so terms written in
 * different units of the same dimension (kJ and J) add correctly. Units with an offset (degrees Celsius) are
 * rejected: write temperatures in K.
 *
 * @param text      the unit as written, white space normalised; empty for a pure number
 * @param factor    the SI value of one of this unit (1000 for kJ)
 * @param dimension the SI dimension
 */
public record Unit(String text, double factor, Dimension dimension) {

    /** The unit of a pure number. */
    public static final Unit NONE = new Unit("", 1.0, Dimension.NONE);

    /**
     * @throws NullPointerException     when the text or dimension is null
     * @throws IllegalArgumentException when the factor is not positive and finite
     */
    public Unit {
        Objects.requireNonNull(text, "text");
        Objects.requireNonNull(dimension, "dimension");
        if (!(factor > 0) || Double.isInfinite(factor)) {
            throw new IllegalArgumentException("a unit factor must be positive and finite, found " + factor);
        }
    }

    /**
     * Parses a unit such as {@code mol/s}, {@code W m-2}, {@code J/(kg K)}, {@code kg m^2 s^-3} or {@code km/h}.
     * See {@link UnitParser} for the grammar.
     *
     * @param text the unit
     * @return the unit
     * @throws LawException naming the place in {@code text} and what was wrong
     */
    public static Unit parse(String text) {
        Diagnostics d = new Diagnostics(new SourceText("unit", text));
        Unit u = new UnitParser(d, 0, text.length()).parse();
        d.throwIfErrors();
        return u;
    }

    /** @return whether this is the unit of a pure number */
    public boolean isNone() {
        return dimension.isNone() && factor == 1.0;
    }

    /** @return {@link #text()}, or {@code 1} for a pure number */
    public String display() {
        return text.isEmpty() ? "1" : text;
    }
}
