package dev.lawful.spark;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.ResidualAccumulator;
import dev.lawful.enforce.ResidualReport;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Iterator;
import java.util.List;
import java.util.Objects;
import org.apache.spark.api.java.JavaRDD;

/**
 * The distributed law check behind {@link LawfulSpark}'s verify methods: one pass
 * counts the rows of each partition (so every row gets its index in the whole, as one machine would number them),
 * a second feeds each partition's rows in blocks to one {@link ResidualAccumulator}, and the partial reports are
 * merged by {@code treeAggregate} to the driver. The merge is exact in any order and the row indices are global,
 * so the report has the bits of {@link ResidualReport#of} over the same rows in the RDD's order, however they are
 * partitioned.
 */
final class DistributedCheck {
    /** Rows per block fed to an accumulator. */
    static final int BLOCK = 1024;

    /** What an RDD's elements hold: how many rows each, and how a partition's rows reach an accumulator. */
    interface Rows<T> extends Serializable {
        /** @return the number of rows {@code element} holds */
        long count(T element);

        /**
         * Adds the rows of one partition's elements to {@code a}.
         *
         * @param first the index of the partition's first row in the whole RDD
         */
        void feed(Iterator<T> elements, long first, LawSet laws, ResidualAccumulator a);
    }

    private DistributedCheck() {
    }

    static <T> ResidualReport verify(String where, String lawText, JavaRDD<T> data, double tolerance, Rows<T> rows) {
        Objects.requireNonNull(lawText, where + ": lawText");
        Objects.requireNonNull(data, where + ": the RDD");
        if (!(tolerance >= 0) || Double.isInfinite(tolerance)) {
            throw new IllegalArgumentException(where + ": the tolerance must be a finite number >= 0, found "
                    + tolerance);
        }
        LawTexts.parse(lawText);   // law-text errors on the driver, before any job
        List<Long> counts = data.mapPartitions((Iterator<T> it) -> {
            long n = 0;
            while (it.hasNext()) {
                n += rows.count(it.next());
            }
            return Collections.singletonList(n).iterator();
        }).collect();
        long[] first = new long[counts.size()];
        long total = 0;
        for (int p = 0; p < first.length; p++) {
            first[p] = total;
            total += counts.get(p);
        }
        if (total > Integer.MAX_VALUE) {
            throw new IllegalArgumentException(where + ": the RDD holds " + total + " rows, more than a residual"
                    + " report counts (" + Integer.MAX_VALUE + "); verify it in parts, for example by key ranges");
        }
        PartialReport all = data.mapPartitionsWithIndex((Integer p, Iterator<T> it) -> {
            LawSet laws = LawTexts.parse(lawText);
            ResidualAccumulator a = new ResidualAccumulator(laws, tolerance);
            rows.feed(it, first[p], laws, a);
            return Collections.singletonList(PartialReport.of(lawText, a, tolerance)).iterator();
        }, false).treeAggregate(PartialReport.empty(lawText, tolerance), PartialReport::merge, PartialReport::merge);
        ResidualReport report = all.accumulator().report();
        if (report.samples() != total) {
            throw new IllegalStateException(where + ": the RDD gave " + total + " rows when counted and "
                    + report.samples() + " when checked; its contents must be the same each time it is computed"
                    + " (persist it first, or make it deterministic)");
        }
        return report;
    }

    /** @return the law set's columns in the order a row holds them, for messages (at most 12 named) */
    static String layout(LawSet laws) {
        List<String> names = new ArrayList<>(laws.inputNames());
        names.addAll(laws.outputNames());
        String shown = String.join(", ", names.subList(0, Math.min(12, names.size())));
        return names.size() > 12 ? shown + ", ..." : shown;
    }

    /** Rows as {@code double[]}: the inputs, then the outputs, in the law set's declared order. */
    static final class ArrayRows implements Rows<double[]> {
        private static final long serialVersionUID = 1L;

        @Override
        public long count(double[] row) {
            return 1;
        }

        @Override
        public void feed(Iterator<double[]> rows, long first, LawSet laws, ResidualAccumulator a) {
            int in = laws.inputWidth();
            int out = laws.outputWidth();
            double[] x = new double[BLOCK * in];
            double[] y = new double[BLOCK * out];
            long start = first;
            int m = 0;
            while (rows.hasNext()) {
                double[] row = rows.next();
                if (row == null || row.length != in + out) {
                    throw new IllegalArgumentException("LawfulSpark.verify: row " + (start + m)
                            + " (counted from 0 in the RDD's order) " + (row == null ? "is null" : "has "
                            + row.length + " values") + "; the law set needs " + (in + out)
                            + " values per row, its inputs then its outputs in declared order: " + layout(laws));
                }
                System.arraycopy(row, 0, x, m * in, in);
                System.arraycopy(row, in, y, m * out, out);
                if (++m == BLOCK) {
                    a.add(x, y, m, start, null);
                    start += m;
                    m = 0;
                }
            }
            a.add(x, y, m, start, null);
        }
    }
}
