package dev.lawful.examples.demo;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.algebra.ScalarLimit;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * How a network's test outputs sit against the law file's limits: per {@code limit} statement, the test rows with
 * an element outside it and the worst violation in the limit's unit. A network's outputs are float32 normalised
 * values mapped back to physical units, and it saw float32 normalised inputs, so a row counts as outside only beyond
 * that rounding: Σ_o |∂g/∂y_o|·e_o + Σ_i |∂g/∂x_i|·e_i with e the rounding of each output and input, plus three
 * double ulps of g's natural scale (the same allowance {@code RoundingBound} gives the laws).
 *
 * @param names     the limit statements, in declaration order
 * @param outside   per statement, the test rows outside it
 * @param worst     per statement, the most negative value of g over its elements and the rows, in its unit (0 when
 *                  no row is outside)
 * @param units     per statement, its unit as text
 */
record LimitTally(List<String> names, int[] outside, double[] worst, List<String> units) {
    /**
     * @param laws      the scenario's law set
     * @param x         test inputs, physical, {@code rows × inputWidth}
     * @param y         a network's test outputs, physical, {@code rows × outputWidth}
     * @param yRounding the rounding of each output value, same layout as y
     * @param xRounding the rounding of each input value, same layout as x
     * @param rows      number of test rows
     * @return the tally (empty when the law set has no limits)
     */
    static LimitTally of(LawSet laws, double[] x, double[] y, double[] yRounding, double[] xRounding, int rows) {
        ExpandedLaws e = laws.expand();
        int m = e.limitCount();
        Map<String, Integer> statement = new LinkedHashMap<>();
        List<String> units = new ArrayList<>();
        int[] of = new int[m];
        for (int j = 0; j < m; j++) {
            ScalarLimit l = e.limit(j);
            Integer at = statement.get(l.declaration().name());
            if (at == null) {
                at = statement.size();
                statement.put(l.declaration().name(), at);
                units.add(l.unit().text());
            }
            of[j] = at;
        }
        int groups = statement.size();
        int[] outside = new int[groups];
        double[] worst = new double[groups];
        if (m == 0) {
            return new LimitTally(List.of(), outside, worst, List.of());
        }
        LawEvaluator ev = e.limitEvaluator();
        int p = laws.outputWidth();
        double[] g = new double[rows * m];
        double[] scale = new double[rows * m];
        double[] jy = new double[rows * ev.outputNonzeros()];
        double[] jx = new double[rows * ev.inputNonzeros()];
        ev.evaluate(x, y, rows, g, scale, jy, jx);
        int k = laws.inputWidth();
        for (int s = 0; s < rows; s++) {
            boolean[] out = new boolean[groups];
            for (int j = 0; j < m; j++) {
                double slack = 3 * 0x1p-53 * scale[s * m + j];
                int[] cols = ev.outputColumns(j);
                for (int q = 0; q < cols.length; q++) {
                    slack += Math.abs(jy[s * ev.outputNonzeros() + ev.outputOffset(j) + q])
                            * yRounding[s * p + cols[q]];
                }
                int[] in = ev.inputColumns(j);
                for (int q = 0; q < in.length; q++) {
                    slack += Math.abs(jx[s * ev.inputNonzeros() + ev.inputOffset(j) + q]) * xRounding[s * k + in[q]];
                }
                double v = g[s * m + j];
                if (!(v >= -slack)) {
                    out[of[j]] = true;
                    worst[of[j]] = Math.min(worst[of[j]], v / e.limit(j).unit().factor());
                }
            }
            for (int c = 0; c < groups; c++) {
                outside[c] += out[c] ? 1 : 0;
            }
        }
        return new LimitTally(List.copyOf(statement.keySet()), outside, worst, List.copyOf(units));
    }
}
