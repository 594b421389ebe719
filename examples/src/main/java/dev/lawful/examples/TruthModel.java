package dev.lawful.examples;

import java.util.List;
import java.util.SplittableRandom;

/**
 * The physical computation that makes a scenario's data: it draws inputs in the scenario's demo ranges and
 * computes the true outputs, which obey the scenario's laws to rounding.
 *
 * <p>Inputs and outputs are flat rows in the order the scenario's law file declares them (a vector
 * declaration contributes its elements in index order), in the units the law file declares, so a row of
 * {@code x} and {@code y} can be given to the law set as it is. Implementations are immutable and
 * thread-safe.
 */
public interface TruthModel {

    /** The law file's name in {@code examples/laws} (also on the class path under {@code /laws/}). */
    String lawFile();

    /** Number of input columns: the flattened width of the law file's inputs. */
    int inputWidth();

    /** Number of output columns: the flattened width of the law file's outputs. */
    int outputWidth();

    /**
     * Draws one input row into {@code x[offset .. offset + inputWidth())}. The same generator state gives
     * the same row.
     *
     * @param random the only source of randomness
     * @param x receives the row (modified)
     * @param offset first index written
     */
    void sample(SplittableRandom random, double[] x, int offset);

    /**
     * Computes the true outputs of one input row.
     *
     * @param x input rows; the row read is {@code x[xOffset .. xOffset + inputWidth())}
     * @param xOffset first index of the row
     * @param y receives the outputs in {@code y[yOffset .. yOffset + outputWidth())} (modified)
     * @param yOffset first index written
     * @throws IllegalStateException if the computation does not converge for this input
     */
    void solve(double[] x, int xOffset, double[] y, int yOffset);

    /** The output columns grouped as a user reads them (one group per physical quantity), for error tables. */
    List<ColumnGroup> outputGroups();

    /**
     * For each law of the law file, in declaration order, the size of a signal a user of the scenario cares
     * about, in the law's SI unit, against which its residuals are judged on the plots.
     */
    List<LawMark> lawMarks();

    /** A contiguous block of output columns that hold one physical quantity. */
    record ColumnGroup(String name, String unit, int first, int count) {
    }

    /**
     * The scale a law's residual is compared with: {@code value} in the law's SI unit, described by
     * {@code label} (for example "1 ppm of the carbon feed").
     */
    record LawMark(String law, double value, String label) {
    }
}
