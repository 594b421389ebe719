package dev.lawful.algebra;

/**
 * The shape and unit rules that operators and function calls share: element-wise broadcasting of a scalar over a
 * vector, and what a power does to units. A broken rule is reported to the {@link Diagnostics} and the result is
 * then -1 or null, so the caller skips the expression without a second message.
 */
final class ExprRules {
    private final Diagnostics diagnostics;

    /** @param diagnostics receives the errors of broken rules */
    ExprRules(Diagnostics diagnostics) {
        this.diagnostics = diagnostics;
    }

    /**
     * @param what    the combination, for the message ("in '+'", "between the sides of law 'x'")
     * @param at      where the combination is written
     * @param context the prefix naming the law or definition being checked; a message about the two sides of a
     *                law names the law itself, so it does not take the prefix
     * @return the shape of an element-wise combination of {@code l} and {@code r}, or -1 after reporting a
     *         mismatch
     */
    int broadcast(Checker.Info l, Checker.Info r, String what, Span at, String context) {
        if (l.shape() == 0) {
            return r.shape();
        }
        if (r.shape() == 0 || r.shape() == l.shape()) {
            return l.shape();
        }
        String prefix = what.startsWith("between") ? "" : context;
        diagnostics.error(at, prefix + "vector length mismatch " + what + ": left is " + shapeText(l.shape())
                + ", right is " + shapeText(r.shape()));
        return -1;
    }

    /**
     * A power {@code base ^ exponent} (or {@code pow(base, exponent)}): the exponent must be a pure number, and a
     * base with a unit needs a constant scalar exponent that gives whole unit powers.
     *
     * @param at       where the power is written
     * @param shape    the shape of the result, already broadcast
     * @param mentions whether an output takes part
     * @param context  the prefix naming the law or definition being checked
     * @return what the power is, or null after reporting an error
     */
    Checker.Info power(Span at, Checker.Info base, Checker.Info exponent, int shape, boolean mentions,
                       String context) {
        Dimension ed = exponent.dimension() == null ? Dimension.NONE : exponent.dimension();
        if (!ed.isNone()) {
            diagnostics.error(at, context + "the exponent must be dimensionless, found " + describe(exponent));
            return null;
        }
        Double v = base.value() != null && exponent.value() != null ? Math.pow(base.value(), exponent.value()) : null;
        Dimension bd = base.dimension() == null ? Dimension.NONE : base.dimension();
        if (bd.isNone()) {
            return new Checker.Info(shape, Dimension.NONE, null, mentions, v);
        }
        if (exponent.value() == null || exponent.shape() != 0) {
            diagnostics.error(at, context + "a quantity in " + describe(base)
                    + " can only be raised to a constant scalar exponent");
            return null;
        }
        double k = exponent.value();
        if (!Double.isFinite(k)) {
            diagnostics.error(at, context + "the exponent of a quantity in " + describe(base)
                    + " evaluates to " + k + ", not a finite number");
            return null;
        }
        int[] e = new int[7];
        for (int i = 0; i < 7; i++) {
            double x = bd.exponent(i) * k;
            if (Math.abs(x - Math.rint(x)) > 1e-9 || Math.abs(x) > Limits.MAX_UNIT_EXPONENT) {
                diagnostics.error(at, context + "exponent " + ExprPrinter.number(k) + " does not give whole unit powers"
                        + " of " + describe(base) + (Math.abs(x) > Limits.MAX_UNIT_EXPONENT ? " within the limit of "
                        + Limits.MAX_UNIT_EXPONENT : ""));
                return null;
            }
            e[i] = (int) Math.rint(x);
        }
        return new Checker.Info(shape, Dimension.of(e), null, mentions, v);
    }

    /** @return "a scalar" or "a vector of length n", for messages */
    static String shapeText(int shape) {
        return shape == 0 ? "a scalar" : "a vector of length " + shape;
    }

    /** @return the unit of {@code i} for messages: its declared unit with the SI unit beside it when they differ */
    static String describe(Checker.Info i) {
        Dimension d = i.dimension() == null ? Dimension.NONE : i.dimension();
        if (d.isNone()) {
            return "dimensionless";
        }
        String si = Units.named(d).display();
        if (i.unit() != null && !i.unit().text().isEmpty() && !i.unit().text().equals(si)) {
            return i.unit().text() + " (" + si + ")";
        }
        return si;
    }
}
