package dev.lawful.examples.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;
import org.apache.commons.math3.ml.distance.EuclideanDistance;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.apache.commons.math3.stat.descriptive.moment.SecondMoment;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.apache.commons.math3.stat.regression.SimpleRegression;
import org.junit.jupiter.api.Test;

class MetricsTest {
    private static final double TIGHT = 1e-13;

    /** A rows × width matrix of random values of very different scales per column. */
    private static double[] matrix(SplittableRandom random, int rows, int width) {
        double[] m = new double[rows * width];
        for (int i = 0; i < m.length; i++) {
            m[i] = random.nextGaussian() * Math.pow(10, i % width) + 3 * (i % width);
        }
        return m;
    }

    private static double[] block(double[] m, int width, int first, int count) {
        int rows = m.length / width;
        double[] out = new double[rows * count];
        for (int r = 0; r < rows; r++) {
            System.arraycopy(m, r * width + first, out, r * count, count);
        }
        return out;
    }

    private static double[] column(double[] m, int width, int c) {
        return block(m, width, c, 1);
    }

    @Test
    void rmseIsTheEuclideanDistanceOverTheSquareRootOfTheCount() {
        SplittableRandom random = new SplittableRandom(1);
        double[] truth = matrix(random, 40, 5);
        double[] predicted = truth.clone();
        for (int i = 0; i < predicted.length; i++) {
            predicted[i] += random.nextGaussian() * 0.1;
        }
        double d = new EuclideanDistance().compute(block(predicted, 5, 1, 3), block(truth, 5, 1, 3));
        // Source: Apache Commons Math 3.6.1 EuclideanDistance (RMSE = distance / sqrt(n))
        assertEquals(d / Math.sqrt(40 * 3), Metrics.rmse(predicted, truth, 5, 1, 3), TIGHT * d);
    }

    @Test
    void rSquaredIsOneMinusSseOverSstPooledWithEachColumnsOwnMean() {
        SplittableRandom random = new SplittableRandom(2);
        double[] truth = matrix(random, 30, 4);
        double[] predicted = truth.clone();
        for (int i = 0; i < predicted.length; i++) {
            predicted[i] += random.nextGaussian() * 0.3;
        }
        double sse = Math.pow(new EuclideanDistance().compute(block(predicted, 4, 0, 3), block(truth, 4, 0, 3)), 2);
        double sst = 0;
        for (int c = 0; c < 3; c++) {
            SecondMoment m2 = new SecondMoment();
            m2.incrementAll(column(truth, 4, c));
            sst += m2.getResult();
        }
        // Source: Apache Commons Math 3.6.1 EuclideanDistance and SecondMoment (sum of squared deviations from the
        // column's mean)
        assertEquals(1 - sse / sst, Metrics.rSquared(predicted, truth, 4, 0, 3), TIGHT);
        // pooling is not the mean of the per-column R² when columns differ in scale
        double meanOfColumns = 0;
        for (int c = 0; c < 3; c++) {
            meanOfColumns += Metrics.rSquared(predicted, truth, 4, c, 1) / 3;
        }
        assertNotEquals(meanOfColumns, Metrics.rSquared(predicted, truth, 4, 0, 3), 1e-3);
    }

    @Test
    void rSquaredOfLeastSquaresFittedValuesIsTheRegressionsRSquare() {
        SplittableRandom random = new SplittableRandom(3);
        int n = 60;
        double[] x = new double[n];
        double[] truth = new double[n];
        SimpleRegression regression = new SimpleRegression();
        for (int i = 0; i < n; i++) {
            x[i] = random.nextDouble(-2, 5);
            truth[i] = 1.5 * x[i] - 0.7 + random.nextGaussian();
            regression.addData(x[i], truth[i]);
        }
        double[] fitted = new double[n];
        for (int i = 0; i < n; i++) {
            fitted[i] = regression.predict(x[i]);
        }
        // Source: Apache Commons Math 3.6.1 SimpleRegression.getRSquare (for fitted values with an intercept,
        // 1 - SSE/SST equals the regression's R²)
        assertEquals(regression.getRSquare(), Metrics.rSquared(fitted, truth, 1, 0, 1), 1e-12);
    }

    @Test
    void rSquaredIsNotDefinedForConstantTruthAndNegativeForBadPredictions() {
        double[] truth = {2, 2, 2};
        assertTrue(Double.isNaN(Metrics.rSquared(new double[] {1, 2, 3}, truth, 1, 0, 1)));
        double[] t = {1, 2, 3, 4};
        double[] reversed = {4, 3, 2, 1};
        SecondMoment m2 = new SecondMoment();
        m2.incrementAll(t);
        double sse = Math.pow(new EuclideanDistance().compute(reversed, t), 2);
        // Source: Apache Commons Math 3.6.1 EuclideanDistance and SecondMoment
        assertEquals(1 - sse / m2.getResult(), Metrics.rSquared(reversed, t, 1, 0, 1), TIGHT);
        assertTrue(Metrics.rSquared(reversed, t, 1, 0, 1) < 0);
    }

    @Test
    void maxMeanAndPercentileAgreeWithDescriptiveStatistics() {
        SplittableRandom random = new SplittableRandom(4);
        for (int n : new int[] {1, 2, 7, 99, 100, 101, 1000, 1234}) {
            double[] v = new double[n];
            for (int i = 0; i < n; i++) {
                // magnitudes over many decades, some exact zeros and ties
                v[i] = i % 11 == 0 ? 0 : i % 13 == 0 ? 0.5 : Math.pow(10, random.nextDouble(-18, 2));
            }
            DescriptiveStatistics stats = new DescriptiveStatistics(v);
            // Source: Apache Commons Math 3.6.1 DescriptiveStatistics (getMax, getMean)
            assertEquals(stats.getMax(), Metrics.max(v), 0, "n = " + n);
            assertEquals(stats.getMean(), Metrics.mean(v), 1e-14 * stats.getMean(), "n = " + n);
            for (double p : new double[] {1, 50, 99, 100}) {
                Percentile reference = new Percentile(p).withEstimationType(EstimationType.R_1);
                // Source: Apache Commons Math 3.6.1 Percentile, estimation type R_1 (nearest rank)
                assertEquals(reference.evaluate(v), Metrics.percentile(v, p), 0, "n = " + n + ", p = " + p);
            }
        }
    }

    @Test
    void theNinetyNinthPercentileIsAValueNotAnInterpolation() {
        double[] v = new double[100];
        for (int i = 0; i < 100; i++) {
            v[i] = i + 1;
        }
        // Source: Apache Commons Math 3.6.1 Percentile, R_1 (rank ceil(0.99 * 100) = 99) against the default
        // estimator, which interpolates
        assertEquals(new Percentile(99).withEstimationType(EstimationType.R_1).evaluate(v),
                Metrics.percentile(v, 99), 0);
        assertNotEquals(new Percentile(99).evaluate(v), Metrics.percentile(v, 99), 0);
    }

    @Test
    void magnitudesZerosAndAboveCountByColumn() {
        double[] m = {0, -3, -0.0, 2, 1e-20, -1e-3};
        double[] a = Metrics.magnitudes(m, 2, 1);
        DescriptiveStatistics stats = new DescriptiveStatistics(a);
        // Source: Apache Commons Math 3.6.1 DescriptiveStatistics (the magnitudes of column 1 are 3, 2, 1e-3)
        assertEquals(3, stats.getMax(), 0);
        assertEquals(3, a.length);
        assertEquals(2, Metrics.zeros(Metrics.magnitudes(m, 2, 0)));
        assertEquals(2, Metrics.above(a, 1e-3));
    }

    @Test
    void badInputIsRefusedWithTheReason() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> Metrics.rmse(new double[] {1, 2}, new double[] {1, 2, 3}, 1, 0, 1));
        assertEquals("predicted has 2 values but truth has 3; both must hold the same rows and columns",
                e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Metrics.mean(new double[] {1, Double.NaN}));
        assertEquals("value 1 is NaN; expected finite values", e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> Metrics.max(new double[0]));
        assertEquals("a statistic needs at least one value, found none", e.getMessage());
        e = assertThrows(IllegalArgumentException.class,
                () -> Metrics.rSquared(new double[] {1, 2, 3, 4}, new double[] {1, 2, 3, 4}, 2, 1, 2));
        assertEquals("columns 1 .. 2 are not inside a row of 2 values (count must be at least 1)", e.getMessage());
    }
}
