package dev.lawful.algebra;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The unit symbols and SI prefixes the law language knows.
 *
 * <p>Definitions follow the SI Brochure (BIPM, 9th edition, 2019): the seven base units, the 22 coherent derived
 * units with special names, the SI prefixes from quecto to quetta, and the non-SI units accepted for use with the
 * SI (minute, hour, day, litre, tonne, electronvolt) plus bar. A symbol is looked up as written first, then as a
 * prefix followed by a prefixable unit, so {@code min} is the minute and {@code ms} the millisecond.
 */
final class UnitTable {

    /** One named unit: its SI factor, its dimension and whether SI prefixes may precede it. */
    record Entry(double factor, Dimension dimension, boolean prefixable) {
    }

    private static final Map<String, Entry> UNITS = new LinkedHashMap<>();
    private static final Map<String, Double> PREFIXES = new LinkedHashMap<>();

    private static Dimension dim(int m, int kg, int s, int a, int k, int mol, int cd) {
        return Dimension.of(m, kg, s, a, k, mol, cd);
    }

    private static void unit(String symbol, double factor, Dimension dimension, boolean prefixable) {
        UNITS.put(symbol, new Entry(factor, dimension, prefixable));
    }

    static {
        // base units; the kilogram is prefixed through the gram
        unit("m", 1, dim(1, 0, 0, 0, 0, 0, 0), true);
        unit("g", 1e-3, dim(0, 1, 0, 0, 0, 0, 0), true);
        unit("kg", 1, dim(0, 1, 0, 0, 0, 0, 0), false);
        unit("s", 1, dim(0, 0, 1, 0, 0, 0, 0), true);
        unit("A", 1, dim(0, 0, 0, 1, 0, 0, 0), true);
        unit("K", 1, dim(0, 0, 0, 0, 1, 0, 0), true);
        unit("mol", 1, dim(0, 0, 0, 0, 0, 1, 0), true);
        unit("cd", 1, dim(0, 0, 0, 0, 0, 0, 1), true);
        // coherent derived units with special names
        unit("rad", 1, Dimension.NONE, true);
        unit("sr", 1, Dimension.NONE, true);
        unit("Hz", 1, dim(0, 0, -1, 0, 0, 0, 0), true);
        unit("N", 1, dim(1, 1, -2, 0, 0, 0, 0), true);
        unit("Pa", 1, dim(-1, 1, -2, 0, 0, 0, 0), true);
        unit("J", 1, dim(2, 1, -2, 0, 0, 0, 0), true);
        unit("W", 1, dim(2, 1, -3, 0, 0, 0, 0), true);
        unit("C", 1, dim(0, 0, 1, 1, 0, 0, 0), true);
        unit("V", 1, dim(2, 1, -3, -1, 0, 0, 0), true);
        unit("F", 1, dim(-2, -1, 4, 2, 0, 0, 0), true);
        unit("ohm", 1, dim(2, 1, -3, -2, 0, 0, 0), true);
        unit("\u03a9", 1, dim(2, 1, -3, -2, 0, 0, 0), true);
        unit("S", 1, dim(-2, -1, 3, 2, 0, 0, 0), true);
        unit("Wb", 1, dim(2, 1, -2, -1, 0, 0, 0), true);
        unit("T", 1, dim(0, 1, -2, -1, 0, 0, 0), true);
        unit("H", 1, dim(2, 1, -2, -2, 0, 0, 0), true);
        unit("lm", 1, dim(0, 0, 0, 0, 0, 0, 1), true);
        unit("lx", 1, dim(-2, 0, 0, 0, 0, 0, 1), true);
        unit("Bq", 1, dim(0, 0, -1, 0, 0, 0, 0), true);
        unit("Gy", 1, dim(2, 0, -2, 0, 0, 0, 0), true);
        unit("Sv", 1, dim(2, 0, -2, 0, 0, 0, 0), true);
        unit("kat", 1, dim(0, 0, -1, 0, 0, 1, 0), true);
        // non-SI units accepted for use with the SI (SI Brochure table 8), and the bar
        unit("min", 60, dim(0, 0, 1, 0, 0, 0, 0), false);
        unit("h", 3600, dim(0, 0, 1, 0, 0, 0, 0), false);
        unit("d", 86400, dim(0, 0, 1, 0, 0, 0, 0), false);
        unit("L", 1e-3, dim(3, 0, 0, 0, 0, 0, 0), true);
        unit("l", 1e-3, dim(3, 0, 0, 0, 0, 0, 0), true);
        unit("t", 1e3, dim(0, 1, 0, 0, 0, 0, 0), false);
        unit("eV", 1.602176634e-19, dim(2, 1, -2, 0, 0, 0, 0), true);
        unit("bar", 1e5, dim(-1, 1, -2, 0, 0, 0, 0), true);

        PREFIXES.put("Q", 1e30);
        PREFIXES.put("R", 1e27);
        PREFIXES.put("Y", 1e24);
        PREFIXES.put("Z", 1e21);
        PREFIXES.put("E", 1e18);
        PREFIXES.put("P", 1e15);
        PREFIXES.put("T", 1e12);
        PREFIXES.put("G", 1e9);
        PREFIXES.put("M", 1e6);
        PREFIXES.put("k", 1e3);
        PREFIXES.put("h", 1e2);
        PREFIXES.put("da", 1e1);
        PREFIXES.put("d", 1e-1);
        PREFIXES.put("c", 1e-2);
        PREFIXES.put("m", 1e-3);
        PREFIXES.put("u", 1e-6);
        PREFIXES.put("\u00b5", 1e-6);
        PREFIXES.put("\u03bc", 1e-6);
        PREFIXES.put("n", 1e-9);
        PREFIXES.put("p", 1e-12);
        PREFIXES.put("f", 1e-15);
        PREFIXES.put("a", 1e-18);
        PREFIXES.put("z", 1e-21);
        PREFIXES.put("y", 1e-24);
        PREFIXES.put("r", 1e-27);
        PREFIXES.put("q", 1e-30);
    }

    private UnitTable() {
    }

    /** @return the unit for {@code symbol} (with an optional prefix), or null when unknown */
    static Entry lookup(String symbol) {
        Entry e = UNITS.get(symbol);
        if (e != null) {
            return e;
        }
        for (Map.Entry<String, Double> p : PREFIXES.entrySet()) {
            String prefix = p.getKey();
            if (symbol.length() > prefix.length() && symbol.startsWith(prefix)) {
                Entry base = UNITS.get(symbol.substring(prefix.length()));
                if (base != null && base.prefixable()) {
                    return new Entry(p.getValue() * base.factor(), base.dimension(), false);
                }
            }
        }
        return null;
    }

    /** @return every unit symbol, and every prefixed form of the prefixable ones, for suggestions */
    static Iterable<String> symbols() {
        java.util.List<String> all = new java.util.ArrayList<>(UNITS.keySet());
        for (Map.Entry<String, Entry> u : UNITS.entrySet()) {
            if (u.getValue().prefixable()) {
                for (String p : PREFIXES.keySet()) {
                    all.add(p + u.getKey());
                }
            }
        }
        return all;
    }
}
