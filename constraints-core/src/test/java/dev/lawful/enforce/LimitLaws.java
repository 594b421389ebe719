package dev.lawful.enforce;

/** Law sets the limit tests share. */
final class LimitLaws {
    /**
     * Element balances of a steam reformer's outlet (atom counts of CH4, H2O, CO, CO2, H2, N2), the four large
     * flows completed, every outlet flow non-negative: the constant-affine tier with a limit on every output.
     */
    static final String REFORMER = String.join("\n",
            "input  feed[6] mol/s",
            "output out[6]  mol/s",
            "const C = [1, 0, 1, 1, 0, 0]",
            "const H = [4, 2, 0, 0, 2, 0]",
            "const O = [0, 1, 1, 2, 0, 0]",
            "const N = [0, 0, 0, 0, 0, 2]",
            "law carbon:   dot(C, out) = dot(C, feed)",
            "law hydrogen: dot(H, out) = dot(H, feed)",
            "law oxygen:   dot(O, out) = dot(O, feed)",
            "law nitrogen: dot(N, out) = dot(N, feed)",
            "complete out[2], out[4], out[1], out[5]",
            "limit flows:  out >= 0",
            "");

    private LimitLaws() {
    }
}
