package dev.lawful.enforce;

/** How a law set is solved for its completed outputs; the hardest tier any law needs decides. */
public enum Tier {
    /** Every partial derivative is a constant: y_c = M z + N x + k, folded at build time. */
    CONSTANT_AFFINE("constant-affine"),
    /** Linear in the completed outputs with coefficients that depend on x or z: one n×n LU solve per sample. */
    AFFINE("affine"),
    /** Nonlinear in the completed outputs: damped Newton per sample, gradients by the implicit function theorem. */
    NONLINEAR("nonlinear");

    private final String label;

    Tier(String label) {
        this.label = label;
    }

    /** @return the name used in reports and JSON: {@code constant-affine}, {@code affine} or {@code nonlinear} */
    public String label() {
        return label;
    }
}
