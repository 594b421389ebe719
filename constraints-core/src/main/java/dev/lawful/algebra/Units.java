package dev.lawful.algebra;

import java.util.List;

/** Unit helpers shared by the checker and reports. */
public final class Units {
    private static final List<String> NAMED = List.of("N", "Pa", "J", "W", "C", "V", "F", "ohm", "S", "Wb", "T", "H",
            "Hz");
    /** Named units that read well with a power of the metre: energy fluxes (W m-2), energy per area (J m-2). */
    private static final List<String> PER_LENGTH = List.of("W", "J", "N");
    private static final Dimension METRE = Dimension.of(1, 0, 0, 0, 0, 0, 0);

    private Units() {
    }

    /**
     * @return the coherent SI unit (factor 1) of {@code dimension}, written as a named derived unit where one
     *         matches exactly (W, J, Pa, ...), else as W, J or N times a power of the metre where that matches
     *         ({@code W m-2} for kg s-3, {@code J m-2} for kg s-2), otherwise as base symbols with exponents
     *         ({@code kg m-2 s-1}); the empty unit for a pure number
     */
    public static Unit coherent(Dimension dimension) {
        Unit named = named(dimension);
        if (named.isNone() || !named.text().equals(dimension.toString())) {
            return named;
        }
        for (String n : PER_LENGTH) {
            Dimension base = UnitTable.lookup(n).dimension();
            for (int k = -3; k <= 3; k++) {
                if (k != 0 && base.times(METRE.pow(k)).equals(dimension)) {
                    return new Unit(n + (k == 1 ? " m" : " m" + k), 1.0, dimension);
                }
            }
        }
        return named;
    }

    /**
     * @return the coherent SI unit of {@code dimension} as a named derived unit where one matches exactly, otherwise
     *         in base symbols: the form diagnostics print beside a declared unit, to compare dimensions
     */
    static Unit named(Dimension dimension) {
        if (dimension.isNone()) {
            return Unit.NONE;
        }
        for (String n : NAMED) {
            UnitTable.Entry e = UnitTable.lookup(n);
            if (e.dimension().equals(dimension) && !dimension.equals(Dimension.of(0, 0, -1, 0, 0, 0, 0))) {
                return new Unit(n, 1.0, dimension);
            }
        }
        return new Unit(dimension.toString(), 1.0, dimension);
    }
}
