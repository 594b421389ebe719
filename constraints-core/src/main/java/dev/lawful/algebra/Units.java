package dev.lawful.algebra;

import java.util.List;

/** Unit helpers shared by the checker and reports. */
public final class Units {
    private static final List<String> NAMED = List.of("N", "Pa", "J", "W", "C", "V", "F", "ohm", "S", "Wb", "T", "H",
            "Hz");

    private Units() {
    }

    /**
     * @return the coherent SI unit (factor 1) of {@code dimension}, written as a named derived unit where one
     *         matches exactly (W, J, Pa, ...), otherwise as base symbols with exponents ({@code kg s-3}); the
     *         empty unit for a pure number
     */
    public static Unit coherent(Dimension dimension) {
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
