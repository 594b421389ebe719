package dev.lawful.enforce;

/**
 * Per-sample outcome codes written to a caller's {@code byte[] status} mask (one byte per sample) when an enforcer
 * runs with {@link OnBadSample#MASK}.
 */
public final class SampleStatus {
    /** Every law holds to the documented bound. */
    public static final byte OK = 0;
    /** An input or free output was NaN or infinite. */
    public static final byte NOT_FINITE = 1;
    /** The system for the completed outputs was singular (or numerically so) at this sample. */
    public static final byte SINGULAR = 2;
    /** Newton reached its iteration cap before the residuals reached rounding level. */
    public static final byte NOT_CONVERGED = 3;
    /** No outputs satisfy both the laws and the limits at this sample (or the limit step did not reach them). */
    public static final byte OUTSIDE_LIMITS = 4;

    private SampleStatus() {
    }

    /** @return a readable name for a status code */
    public static String describe(byte status) {
        switch (status) {
            case OK: return "ok";
            case NOT_FINITE: return "non-finite input";
            case SINGULAR: return "singular system";
            case NOT_CONVERGED: return "Newton did not converge";
            case OUTSIDE_LIMITS: return "outside limits";
            default: return "unknown status " + status;
        }
    }
}
