package dev.lawful.algebra;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.StringJoiner;

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

    /**
     * Writes a product of units as one unit, each symbol once: {@code ohm} times {@code MW} is {@code ohm MW};
     * {@code kg/s} times {@code kJ/(kg K)} times {@code K} is {@code kJ/s}. Symbols are combined only where they are
     * written alike, so the text reads in the units the user chose; the factor is that of the text as parsed, so it
     * is the true SI factor of what is shown.
     *
     * @param factors each unit with its exponent, in the order the symbols should appear
     * @return the product, or null when a unit does not parse or an exponent exceeds the unit limit
     */
    static Unit product(Map<Unit, Integer> factors) {
        Map<String, Integer> powers = new LinkedHashMap<>();
        for (Map.Entry<Unit, Integer> f : factors.entrySet()) {
            Map<String, Integer> p = UnitParser.powersOf(f.getKey().text());
            if (p == null) {
                return null;
            }
            p.forEach((symbol, k) -> powers.merge(symbol, k * f.getValue(), Integer::sum));
        }
        powers.values().removeIf(k -> k == 0);
        try {
            return Unit.parse(text(powers));
        } catch (LawException tooLarge) {
            return null;
        }
    }

    /**
     * @return {@code ohm MW}; {@code kJ/s} or {@code J/(m2 d)} with one '/' (the grammar allows one, followed by one
     *         factor); {@code s-1} when nothing stays above the line
     */
    private static String text(Map<String, Integer> powers) {
        StringJoiner up = new StringJoiner(" ");
        StringJoiner down = new StringJoiner(" ");
        StringJoiner signed = new StringJoiner(" ");
        int below = 0;
        for (Map.Entry<String, Integer> p : powers.entrySet()) {
            int k = p.getValue();
            (k > 0 ? up : down).add(p.getKey() + (Math.abs(k) == 1 ? "" : Integer.toString(Math.abs(k))));
            signed.add(p.getKey() + k);
            below += k < 0 ? 1 : 0;
        }
        if (below == 0) {
            return up.toString();
        }
        if (below == powers.size()) {
            return signed.toString();
        }
        return up + "/" + (below == 1 ? down.toString() : "(" + down + ")");
    }
}
