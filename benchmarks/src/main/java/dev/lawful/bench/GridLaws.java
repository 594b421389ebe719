package dev.lawful.bench;

/**
 * The law sets of {@link KernelBench}: demo structures of any size, chosen so that a hand-written kernel can be
 * written for them once and every tier solves a genuinely coupled block.
 *
 * <p>With {@code n} laws and {@code F} free outputs, the outputs are {@code y[0..n+F)}; the completed outputs are
 * {@code y[0..n)} and the free outputs z_j = {@code y[n+j]}. With B_kj = {-2, -1, 1, 2}[(7j + 3k) mod 4] and
 * next(k) = (k + 1) mod n, law k reads:
 * <ul>
 *   <li>{@code constant-affine} and {@code projection}: y_k + 0.5·y_next(k) = Σ_j B_kj z_j + x_k (inputs x[n]);</li>
 *   <li>{@code affine}: (1 + x_k)·y_k + 0.5·y_next(k) = Σ_j B_kj z_j + x_(n+k) (inputs x[2n], the completed
 *       outputs' coefficients depend on the inputs);</li>
 *   <li>{@code nonlinear}: y_k³ + y_k + 0.25·y_next(k) = Σ_j B_kj z_j + x_k (inputs x[n], Newton from 0; the
 *       Jacobian is strictly diagonally dominant everywhere, so the root is unique).</li>
 * </ul>
 * The n×n block in the completed outputs is cyclic, so the solve cannot split into n scalar ones.
 */
final class GridLaws {
    private static final int[] COEFFICIENTS = {-2, -1, 1, 2};

    private GridLaws() {
    }

    /** @return B_kj, the coefficient of free output j in law k */
    static int coefficient(int k, int j) {
        return COEFFICIENTS[(7 * j + 3 * k) % 4];
    }

    /** @return the index of the completed output that law k couples to besides its own */
    static int next(int k, int laws) {
        return (k + 1) % laws;
    }

    /** @return the coefficient of y_next(k) in every law of the tier */
    static double coupling(String tier) {
        return tier.equals("nonlinear") ? 0.25 : 0.5;
    }

    /** @return input elements per sample for the tier */
    static int inputWidth(String tier, int laws) {
        return tier.equals("affine") ? 2 * laws : laws;
    }

    /** @return the law text of the tier with {@code laws} laws over {@code free} free outputs */
    static String text(String tier, int free, int laws) {
        int p = laws + free;
        StringBuilder sb = new StringBuilder();
        sb.append("input x[").append(inputWidth(tier, laws)).append("]\n");
        sb.append("output y[").append(p).append("]\n");
        for (int k = 0; k < laws; k++) {
            sb.append("const B").append(k).append(" = [");
            for (int j = 0; j < free; j++) {
                sb.append(j > 0 ? ", " : "").append(coefficient(k, j));
            }
            sb.append("]\n");
        }
        for (int k = 0; k < laws; k++) {
            String own = "y[" + k + "]";
            String other = "y[" + next(k, laws) + "]";
            String lhs;
            String input = "x[" + k + "]";
            if (tier.equals("affine")) {
                lhs = "(1 + x[" + k + "]) * " + own + " + 0.5 * " + other;
                input = "x[" + (laws + k) + "]";
            } else if (tier.equals("nonlinear")) {
                lhs = own + "^3 + " + own + " + 0.25 * " + other;
            } else {
                lhs = own + " + 0.5 * " + other;
            }
            sb.append("law l").append(k).append(": ").append(lhs).append(" = dot(B").append(k).append(", y[")
                    .append(laws).append(':').append(p).append("]) + ").append(input).append('\n');
        }
        sb.append("complete y[0:").append(laws).append("]\n");
        if (tier.equals("nonlinear")) {
            sb.append("guess y[0:").append(laws).append("] = 0\n");
        }
        return sb.toString();
    }
}
