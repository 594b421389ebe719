package dev.lawful.examples.report;

import dev.lawful.enforce.NearestRank;
import java.util.Arrays;

/**
 * The statistics of a report, on plain arrays. Matrices are row-major with {@code width} values per row, and a
 * block of columns is given by its first column and count, like a {@link dev.lawful.examples.TruthModel.ColumnGroup}.
 * Sums are compensated (Neumaier), so results do not depend on the magnitude spread of the values.
 *
 * <p>Every method refuses non-finite input with an {@link IllegalArgumentException} naming the index, because a
 * single NaN would silently turn a statistic into NaN.
 */
public final class Metrics {
    private Metrics() {
    }

    /**
     * Root-mean-square error over a block of columns:
     * RMSE = sqrt( Σ_r Σ_{c in block} (predicted[r, c] − truth[r, c])² / (rows · count) ), in the columns' unit.
     *
     * @param predicted predicted values, row-major (not modified)
     * @param truth     true values, same shape (not modified)
     * @param width     values per row
     * @param first     first column of the block
     * @param count     number of columns in the block, at least 1
     * @return the RMSE, ≥ 0
     * @throws IllegalArgumentException when the shapes disagree, the block is not inside a row, there are no rows,
     *                                  or a value in the block is not finite
     */
    public static double rmse(double[] predicted, double[] truth, int width, int first, int count) {
        int rows = checkBlock(predicted, truth, width, first, count);
        return Math.sqrt(sse(predicted, truth, width, first, count) / ((double) rows * count));
    }

    /**
     * Coefficient of determination pooled over a block of columns: R² = 1 − SSE / SST with
     * SSE = Σ_r Σ_c (predicted[r, c] − truth[r, c])² and SST = Σ_r Σ_c (truth[r, c] − mean_c)², where mean_c is
     * the mean of column c's true values (each column about its own mean, so a column's offset does not count as
     * explained variation). It is 1 for perfect predictions, 0 for predicting each column's mean, and negative for
     * predictions worse than that. Pooling weights each column by its variation, so in a group with one large and
     * one small column the large one dominates; that is meant, the columns of a group share a unit.
     *
     * @param predicted predicted values, row-major (not modified)
     * @param truth     true values, same shape (not modified)
     * @param width     values per row
     * @param first     first column of the block
     * @param count     number of columns in the block, at least 1
     * @return R², or NaN when SST = 0 (every column of the block constant: R² is not defined)
     * @throws IllegalArgumentException as {@link #rmse}
     */
    public static double rSquared(double[] predicted, double[] truth, int width, int first, int count) {
        int rows = checkBlock(predicted, truth, width, first, count);
        Sum sst = new Sum();
        for (int c = first; c < first + count; c++) {
            Sum s = new Sum();
            for (int r = 0; r < rows; r++) {
                s.add(truth[r * width + c]);
            }
            double mean = s.value() / rows;
            for (int r = 0; r < rows; r++) {
                double d = truth[r * width + c] - mean;
                sst.add(d * d);
            }
        }
        double total = sst.value();
        return total == 0 ? Double.NaN : 1 - sse(predicted, truth, width, first, count) / total;
    }

    /**
     * The magnitudes of one column of a row-major matrix.
     *
     * @param matrix row-major values (not modified)
     * @param width  values per row
     * @param column the column, 0 .. width − 1
     * @return |matrix[r, column]| for every row r, a new array
     * @throws IllegalArgumentException when the length is not a multiple of {@code width} or the column is outside
     */
    public static double[] magnitudes(double[] matrix, int width, int column) {
        if (width < 1 || matrix.length % width != 0 || column < 0 || column >= width) {
            throw new IllegalArgumentException("expected a row-major matrix of width " + width + " and a column in 0 .. "
                    + (width - 1) + ", found " + matrix.length + " values and column " + column);
        }
        double[] out = new double[matrix.length / width];
        for (int r = 0; r < out.length; r++) {
            out[r] = Math.abs(matrix[r * width + column]);
        }
        return out;
    }

    /**
     * @param values at least one value, all finite (not modified)
     * @return the largest value
     * @throws IllegalArgumentException when there are no values or one is not finite
     */
    public static double max(double[] values) {
        checkValues(values);
        double m = values[0];
        for (double v : values) {
            m = Math.max(m, v);
        }
        return m;
    }

    /**
     * @param values at least one value, all finite (not modified)
     * @return the arithmetic mean Σ v / n, with a compensated sum
     * @throws IllegalArgumentException when there are no values or one is not finite
     */
    public static double mean(double[] values) {
        checkValues(values);
        Sum s = new Sum();
        for (double v : values) {
            s.add(v);
        }
        return s.value() / values.length;
    }

    /**
     * The p-th percentile by the nearest-rank method: with the n values sorted ascending, v_1 ≤ ... ≤ v_n, the value
     * of rank k = ⌈p·n/100⌉ (v_1 for p = 0). It is always one of the values, never interpolated: at least p % of
     * the values are at or below it. (Hyndman and Fan's definition 1; Apache Commons Math's {@code R_1}
     * estimation type; the method of {@link NearestRank}, which the core's residual reports use too.)
     *
     * @param values  at least one value, all finite (not modified)
     * @param percent p, from 0 to 100
     * @return the percentile
     * @throws IllegalArgumentException when there are no values, one is not finite, or p is outside [0, 100]
     */
    public static double percentile(double[] values, double percent) {
        checkValues(values);
        double[] sorted = values.clone();
        Arrays.sort(sorted);
        return NearestRank.of(sorted, sorted.length, percent);
    }

    /**
     * @param values any values (not modified)
     * @return how many are exactly zero (either sign)
     */
    public static int zeros(double[] values) {
        int n = 0;
        for (double v : values) {
            if (v == 0) {
                n++;
            }
        }
        return n;
    }

    /**
     * @param values any values (not modified)
     * @param limit  the threshold
     * @return how many values are strictly greater than {@code limit}
     */
    public static int above(double[] values, double limit) {
        int n = 0;
        for (double v : values) {
            if (v > limit) {
                n++;
            }
        }
        return n;
    }

    private static double sse(double[] predicted, double[] truth, int width, int first, int count) {
        Sum s = new Sum();
        for (int r = 0; r < truth.length / width; r++) {
            for (int c = first; c < first + count; c++) {
                double d = predicted[r * width + c] - truth[r * width + c];
                s.add(d * d);
            }
        }
        return s.value();
    }

    /** @return the number of rows, after checking shapes and finiteness of the block */
    private static int checkBlock(double[] predicted, double[] truth, int width, int first, int count) {
        if (predicted.length != truth.length) {
            throw new IllegalArgumentException("predicted has " + predicted.length + " values but truth has "
                    + truth.length + "; both must hold the same rows and columns");
        }
        if (width < 1 || truth.length % width != 0 || truth.length == 0) {
            throw new IllegalArgumentException("expected at least one row of " + width + " values, found "
                    + truth.length + " values, which is not a positive multiple of " + width);
        }
        if (first < 0 || count < 1 || (long) first + count > width) {
            throw new IllegalArgumentException("columns " + first + " .. " + ((long) first + count - 1)
                    + " are not inside a row of " + width + " values (count must be at least 1)");
        }
        int rows = truth.length / width;
        for (int r = 0; r < rows; r++) {
            for (int c = first; c < first + count; c++) {
                int i = r * width + c;
                if (!Double.isFinite(predicted[i]) || !Double.isFinite(truth[i])) {
                    throw new IllegalArgumentException("row " + r + ", column " + c + " is not finite (predicted "
                            + predicted[i] + ", truth " + truth[i] + ")");
                }
            }
        }
        return rows;
    }

    private static void checkValues(double[] values) {
        if (values.length == 0) {
            throw new IllegalArgumentException("a statistic needs at least one value, found none");
        }
        for (int i = 0; i < values.length; i++) {
            if (!Double.isFinite(values[i])) {
                throw new IllegalArgumentException("value " + i + " is " + values[i] + "; expected finite values");
            }
        }
    }

    /** Neumaier's compensated sum. */
    private static final class Sum {
        private double sum;
        private double compensation;

        void add(double v) {
            double t = sum + v;
            compensation += Math.abs(sum) >= Math.abs(v) ? (sum - t) + v : (v - t) + sum;
            sum = t;
        }

        double value() {
            return sum + compensation;
        }
    }
}
