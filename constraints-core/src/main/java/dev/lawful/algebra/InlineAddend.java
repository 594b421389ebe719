package dev.lawful.algebra;

/**
 * A sum's cheap addend, read in place from the register of another node rather than computed into a register of
 * its own: {@code factor·base}, {@code factor·|base|}, {@code |base|}, or the factor alone when {@code base} is
 * null. The value is the same bits as the addend node's: c·v is one rounded product either way (IEEE
 * multiplication commutes), −v is (−1)·v and |v| is exact.
 *
 * @param base      the node whose register is read, or null for a constant addend
 * @param hasFactor whether a constant factor is applied (without one the factor is 1)
 * @param factor    the constant factor, or the constant itself when {@code base} is null
 * @param abs       whether the magnitude of the base is taken
 */
record InlineAddend(Term base, boolean hasFactor, double factor, boolean abs) {

    /**
     * @param a an addend of a sum
     * @return how a sum reads {@code a} in place, or null when {@code a} needs a register of its own (a variable,
     *         a sum, anything not cheap)
     */
    static InlineAddend of(Term a) {
        if (a.kind == Term.Kind.CONST) {
            return new InlineAddend(null, true, a.value, false);
        }
        boolean hasFactor = true;
        double c;
        Term x;
        if (isScaled(a, 0)) {
            c = a.args[0].value;
            x = a.args[1];
        } else if (isScaled(a, 1)) {
            c = a.args[1].value;
            x = a.args[0];
        } else if (a.kind == Term.Kind.NEG) {
            c = -1;
            x = a.args[0];
        } else {
            hasFactor = false;
            c = 1;
            x = a;
        }
        boolean abs = x.kind == Term.Kind.FN && x.function == Function.ABS;
        if (abs) {
            x = x.args[0];
        }
        if (!hasFactor && !abs || x.kind == Term.Kind.CONST) {
            return null;
        }
        return new InlineAddend(x, hasFactor, c, abs);
    }

    /** @return whether {@code a} is a product of two factors whose factor {@code constant} is a constant */
    private static boolean isScaled(Term a, int constant) {
        return a.kind == Term.Kind.MUL && a.args.length == 2 && a.args[constant].kind == Term.Kind.CONST;
    }
}
