package dev.lawful.spark;

import dev.lawful.algebra.LawSet;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;

/**
 * Generated rows for the distributed law check, and RDDs of them cut into partitions of chosen sizes. The reference
 * every check compares with is the single-machine report, {@code ResidualReport.of} over the same rows in order.
 */
final class VerifyRows {
    /** A reservoir step and an evaporation share: two laws with inputs, different units and scales. */
    static final String RESERVOIR = String.join("\n",
            "input  inflow   m3/s",
            "input  dt       s",
            "output release  m3/s",
            "output evap     m3/s",
            "output stored   m3",
            "law water: stored = (inflow - release - evap) * dt",
            "law share: evap = 0.02 * inflow",
            "");
    static final LawSet LAWS = LawSet.parse("reservoir.law", RESERVOIR);
    static final int WIDTH = 5;

    private VerifyRows() {
    }

    /**
     * @return {@code n} rows (inputs then outputs): most obey the laws up to rounding, some by 1e-10 to 1e-6
     *         relative, a few have a NaN or infinite value, and the two worst rows of 'water' are equal, far apart,
     *         so the lowest index must win across partitions
     */
    static List<double[]> rows(long seed, int n) {
        SplittableRandom r = new SplittableRandom(seed);
        List<double[]> rows = new ArrayList<>(n);
        for (int s = 0; s < n; s++) {
            double inflow = 1 + 2 * r.nextDouble();
            double dt = 60 + 540 * r.nextDouble();
            double release = 0.6 * inflow + 0.1 * r.nextDouble();
            double evap = 0.02 * inflow;
            double stored = (inflow - release - evap) * dt;
            int kind = r.nextInt(40);
            if (kind == 0) {
                stored *= 1 + Math.pow(10, -6 - 4 * r.nextDouble());
            } else if (kind == 1) {
                evap *= 1 + 1e-9 * r.nextDouble();
            } else if (kind == 2 && s % 3 == 0) {
                release = Double.NaN;
            } else if (kind == 2) {
                inflow = s % 2 == 0 ? Double.POSITIVE_INFINITY : Double.NEGATIVE_INFINITY;
            }
            rows.add(new double[] {inflow, dt, release, evap, stored});
        }
        double[] worst = {2, 100, 1, 0.04, 1e6};
        rows.set(n / 5, worst);
        rows.set(n - 1 - n / 7, worst.clone());
        return rows;
    }

    /** @return the rows' inputs, row-major */
    static double[] inputs(List<double[]> rows) {
        return part(rows, 0, 2);
    }

    /** @return the rows' outputs, row-major */
    static double[] outputs(List<double[]> rows) {
        return part(rows, 2, WIDTH);
    }

    private static double[] part(List<double[]> rows, int from, int to) {
        double[] out = new double[rows.size() * (to - from)];
        for (int s = 0; s < rows.size(); s++) {
            System.arraycopy(rows.get(s), from, out, s * (to - from), to - from);
        }
        return out;
    }

    /**
     * @param sizes the number of rows in each partition, in order (0 for an empty one); they sum to the rows'
     * @return the rows as an RDD of exactly {@code sizes.length} partitions of those sizes, in order
     */
    static JavaRDD<double[]> rdd(JavaSparkContext sc, List<double[]> rows, int... sizes) {
        List<List<double[]>> parts = new ArrayList<>();
        int at = 0;
        for (int size : sizes) {
            parts.add(new ArrayList<>(rows.subList(at, at + size)));
            at += size;
        }
        if (at != rows.size()) {
            throw new IllegalArgumentException("sizes " + Arrays.toString(sizes) + " do not cover " + rows.size());
        }
        // one list per slice, so each partition holds exactly one of them
        return sc.parallelize(parts, parts.size()).flatMap(List::iterator);
    }
}
