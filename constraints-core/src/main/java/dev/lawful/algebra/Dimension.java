package dev.lawful.algebra;

import java.util.Arrays;

/**
 * A physical dimension as integer exponents of the seven SI base quantities, in the order length (m), mass (kg),
 * time (s), electric current (A), thermodynamic temperature (K), amount of substance (mol) and luminous
 * intensity (cd). Immutable; equal dimensions are equal values.
 */
public final class Dimension {
    /** SI symbols of the base units, in exponent order. */
    static final String[] BASE_SYMBOLS = {"m", "kg", "s", "A", "K", "mol", "cd"};

    /** The dimension of a pure number. */
    public static final Dimension NONE = new Dimension(new int[7]);

    private final int[] exponents;

    private Dimension(int[] exponents) {
        this.exponents = exponents;
    }

    /**
     * @param exponents seven exponents in base-quantity order (m, kg, s, A, K, mol, cd); copied
     * @return the dimension
     */
    public static Dimension of(int... exponents) {
        if (exponents.length != 7) {
            throw new IllegalArgumentException("a dimension has 7 exponents (m kg s A K mol cd), found "
                    + exponents.length);
        }
        return new Dimension(exponents.clone());
    }

    /** @return the base dimension with index {@code base} raised to the first power */
    static Dimension base(int base) {
        int[] e = new int[7];
        e[base] = 1;
        return new Dimension(e);
    }

    /** @return the exponent of base quantity {@code i} (0 = m ... 6 = cd) */
    public int exponent(int i) {
        return exponents[i];
    }

    /** @return this times {@code other} (exponents added) */
    public Dimension times(Dimension other) {
        int[] e = new int[7];
        for (int i = 0; i < 7; i++) {
            e[i] = exponents[i] + other.exponents[i];
        }
        return new Dimension(e);
    }

    /** @return this divided by {@code other} (exponents subtracted) */
    public Dimension over(Dimension other) {
        int[] e = new int[7];
        for (int i = 0; i < 7; i++) {
            e[i] = exponents[i] - other.exponents[i];
        }
        return new Dimension(e);
    }

    /** @return this raised to the integer power {@code k} */
    public Dimension pow(int k) {
        int[] e = new int[7];
        for (int i = 0; i < 7; i++) {
            e[i] = exponents[i] * k;
        }
        return new Dimension(e);
    }

    /** @return whether every exponent is even, so {@link #root2()} exists */
    public boolean hasSquareRoot() {
        for (int e : exponents) {
            if (e % 2 != 0) {
                return false;
            }
        }
        return true;
    }

    /** @return the square root (exponents halved); only when {@link #hasSquareRoot()} */
    public Dimension root2() {
        int[] e = new int[7];
        for (int i = 0; i < 7; i++) {
            e[i] = exponents[i] / 2;
        }
        return new Dimension(e);
    }

    /** @return the largest exponent magnitude */
    public int maxAbsExponent() {
        int m = 0;
        for (int e : exponents) {
            m = Math.max(m, Math.abs(e));
        }
        return m;
    }

    /** @return whether this is the dimension of a pure number */
    public boolean isNone() {
        return equals(NONE);
    }

    /**
     * @return the dimension in SI base symbols with exponents, such as {@code kg m2 s-3}, or {@code 1} for a pure
     *         number: positive exponents first, each group in the order kg m s A K mol cd
     */
    @Override
    public String toString() {
        StringBuilder sb = new StringBuilder();
        int[] order = {1, 0, 2, 3, 4, 5, 6};
        for (int pass = 0; pass < 2; pass++) {
            for (int i : order) {
                int e = exponents[i];
                if (e == 0 || (pass == 0) != (e > 0)) {
                    continue;
                }
                if (sb.length() > 0) {
                    sb.append(' ');
                }
                sb.append(BASE_SYMBOLS[i]);
                if (e != 1) {
                    sb.append(e);
                }
            }
        }
        return sb.length() == 0 ? "1" : sb.toString();
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof Dimension d && Arrays.equals(exponents, d.exponents);
    }

    @Override
    public int hashCode() {
        return Arrays.hashCode(exponents);
    }
}
