package dev.lawful.enforce;

import java.util.List;

/**
 * A sample could not be enforced and the enforcer runs with {@link OnBadSample#THROW}. Says which sample, why and
 * which laws are involved.
 */
public final class EnforcementException extends RuntimeException {
    private static final long serialVersionUID = 1L;
    private final int sample;
    private final byte status;
    private final transient List<String> laws;

    /**
     * @param sample  zero-based index of the sample in the batch
     * @param status  a {@link SampleStatus} code
     * @param laws    names of the laws involved (scalar law names, {@code name} or {@code name[i]})
     * @param message the whole message, which names the sample, the cause and the laws
     */
    public EnforcementException(int sample, byte status, List<String> laws, String message) {
        super(message);
        this.sample = sample;
        this.status = status;
        this.laws = List.copyOf(laws);
    }

    /** @return the zero-based index of the bad sample in its batch */
    public int sample() {
        return sample;
    }

    /** @return its {@link SampleStatus} code */
    public byte status() {
        return status;
    }

    /** @return the laws involved */
    public List<String> laws() {
        return laws;
    }
}
