package dev.lawful.spark;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.ResidualAccumulator;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.Serializable;
import java.io.UncheckedIOException;

/**
 * A residual report over some rows, in the form that travels between executors and the driver: the law text, the
 * tolerance and the accumulator's state ({@link ResidualAccumulator#writeTo}), or no state for no rows. Merging two
 * reads both back (the law set from {@link LawTexts}, parsed once per JVM) and writes the merge; the merge is exact
 * in any order, so the tree Spark merges in does not change the result.
 */
final class PartialReport implements Serializable {
    private static final long serialVersionUID = 1L;

    private final String lawText;
    private final double tolerance;
    /** The accumulator's state, or null for a report over no rows. */
    private final byte[] state;

    private PartialReport(String lawText, double tolerance, byte[] state) {
        this.lawText = lawText;
        this.tolerance = tolerance;
        this.state = state;
    }

    /** @return the report over no rows */
    static PartialReport empty(String lawText, double tolerance) {
        return new PartialReport(lawText, tolerance, null);
    }

    /** @return the report of what {@code a} holds, for law text {@code lawText} */
    static PartialReport of(String lawText, ResidualAccumulator a, double tolerance) {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        try (DataOutputStream out = new DataOutputStream(bytes)) {
            a.writeTo(out);
        } catch (IOException e) {
            throw new UncheckedIOException("writing a partial residual report to memory", e);
        }
        return new PartialReport(lawText, tolerance, bytes.toByteArray());
    }

    /** @return an accumulator holding this report's rows (a new, empty one for none) */
    ResidualAccumulator accumulator() {
        LawSet laws = LawTexts.parse(lawText);
        if (state == null) {
            return new ResidualAccumulator(laws, tolerance);
        }
        try {
            return ResidualAccumulator.readFrom(laws, new DataInputStream(new ByteArrayInputStream(state)));
        } catch (IOException e) {
            throw new UncheckedIOException("reading a partial residual report: " + e.getMessage()
                    + " (the driver and every executor must run the same version of Lawful)", e);
        }
    }

    /** @return the report over the rows of both (neither is modified) */
    static PartialReport merge(PartialReport a, PartialReport b) {
        if (b.state == null) {
            return a;
        }
        if (a.state == null) {
            return b;
        }
        ResidualAccumulator merged = a.accumulator();
        merged.merge(b.accumulator());
        return of(a.lawText, merged, a.tolerance);
    }
}
