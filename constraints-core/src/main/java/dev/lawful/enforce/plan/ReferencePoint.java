package dev.lawful.enforce.plan;

import dev.lawful.algebra.Declaration;
import dev.lawful.algebra.LawSet;
import java.util.List;
import java.util.SplittableRandom;

/**
 * The point (inputs and outputs, in declared units) where build-time decisions are made: the rank check, the
 * automatic choice of completed outputs and the condition number. Completion and projection use the same point.
 *
 * <p>The default point is generic and does not depend on the units a user declares: every element is a fixed
 * pseudo-random value in [0.5, 1.5) of the coherent SI unit of its dimension (1 Pa, 1 m², 1 kg s⁻¹; the same
 * values on every run), expressed in the declared unit. A law set written in cm² and kPa therefore meets the same
 * physical point as the same set written in m² and Pa, and special points where laws happen to be dependent (equal
 * velocities in a collision, a symmetric mixture) are not met by accident. Immutable.
 */
public final class ReferencePoint {
    private static final long INPUT_SEED = 0x5EED1L;
    private static final long OUTPUT_SEED = 0x5EED2L;

    private final double[] x;
    private final double[] y;

    private ReferencePoint(double[] x, double[] y) {
        this.x = x;
        this.y = y;
    }

    /**
     * @param laws the law set
     * @return the generic point of {@code laws}
     */
    public static ReferencePoint generic(LawSet laws) {
        return generic(laws, 0);
    }

    /**
     * @param laws    the law set
     * @param variant 0 for the default point; other values give other generic points drawn the same way (used to
     *                tell a law that follows from others everywhere from one that does so at one point only)
     * @return a generic point of {@code laws}
     */
    public static ReferencePoint generic(LawSet laws, int variant) {
        long shift = 0x9E3779B97F4A7C15L * variant;
        return new ReferencePoint(generic(laws.inputs(), INPUT_SEED + shift),
                generic(laws.outputs(), OUTPUT_SEED + shift));
    }

    /**
     * @param laws the law set (for the widths)
     * @param x    inputs in declared units, {@code laws.inputWidth()} values (copied)
     * @param y    outputs in declared units, {@code laws.outputWidth()} values (copied)
     * @return the point given by a user
     * @throws IllegalArgumentException when a length does not match the law set
     */
    public static ReferencePoint of(LawSet laws, double[] x, double[] y) {
        if (x.length != laws.inputWidth() || y.length != laws.outputWidth()) {
            throw new IllegalArgumentException("the reference point needs " + laws.inputWidth() + " inputs and "
                    + laws.outputWidth() + " outputs, found " + x.length + " and " + y.length);
        }
        return new ReferencePoint(x.clone(), y.clone());
    }

    /** @return a copy of the inputs, declared units */
    public double[] x() {
        return x.clone();
    }

    /** @return a copy of the outputs, declared units */
    public double[] y() {
        return y.clone();
    }

    /** @return input {@code i}, declared unit */
    public double input(int i) {
        return x[i];
    }

    /** @return output {@code o}, declared unit */
    public double output(int o) {
        return y[o];
    }

    /** Draws one value per element, in the order the elements are declared, SI value divided by the unit factor. */
    private static double[] generic(List<Declaration.Variable> variables, long seed) {
        SplittableRandom random = new SplittableRandom(seed);
        int width = 0;
        for (Declaration.Variable v : variables) {
            width += v.size();
        }
        double[] values = new double[width];
        int at = 0;
        for (Declaration.Variable v : variables) {
            for (int i = 0; i < v.size(); i++) {
                values[at++] = (0.5 + random.nextDouble()) / v.unit().factor();
            }
        }
        return values;
    }
}
