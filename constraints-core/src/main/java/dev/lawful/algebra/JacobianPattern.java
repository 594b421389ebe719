package dev.lawful.algebra;

import java.util.Arrays;
import java.util.List;

/**
 * Which Jacobian entries of a list of scalar terms are stored, and where: term after term, the output columns and
 * then, separately, the input columns each term involves. The pattern is structural (it keeps an entry even
 * when its derivative is identically zero), so it is known without differentiating. Immutable.
 */
final class JacobianPattern {
    private final int[] outStart;
    private final int[] outColumns;
    private final int[] inStart;
    private final int[] inColumns;

    private JacobianPattern(int[][] outputs, int[][] inputs) {
        this.outStart = starts(outputs);
        this.outColumns = concat(outputs, outStart);
        this.inStart = starts(inputs);
        this.inColumns = concat(inputs, inStart);
    }

    /**
     * @param outputs per term, the output columns it involves, in storage order (not modified)
     * @param inputs  per term, the input columns it involves, in storage order (not modified)
     * @return the pattern storing those entries
     */
    static JacobianPattern of(int[][] outputs, int[][] inputs) {
        return new JacobianPattern(outputs, inputs);
    }

    /** @return the pattern of every variable each term depends on, in ascending order */
    static JacobianPattern ofVariables(List<Term> terms, int inputWidth) {
        int[][] outputs = new int[terms.size()][];
        int[][] inputs = new int[terms.size()][];
        for (int i = 0; i < outputs.length; i++) {
            int[] vars = terms.get(i).variables();
            inputs[i] = Arrays.stream(vars).filter(v -> v < inputWidth).toArray();
            outputs[i] = Arrays.stream(vars).filter(v -> v >= inputWidth).map(v -> v - inputWidth).toArray();
        }
        return new JacobianPattern(outputs, inputs);
    }

    /** @return the pattern of {@code count} terms without any Jacobian entry */
    static JacobianPattern none(int count) {
        int[][] empty = new int[count][0];
        return new JacobianPattern(empty, empty);
    }

    private static int[] starts(int[][] columns) {
        int[] start = new int[columns.length + 1];
        for (int i = 0; i < columns.length; i++) {
            start[i + 1] = start[i] + columns[i].length;
        }
        return start;
    }

    private static int[] concat(int[][] columns, int[] start) {
        int[] all = new int[start[columns.length]];
        for (int i = 0; i < columns.length; i++) {
            System.arraycopy(columns[i], 0, all, start[i], columns[i].length);
        }
        return all;
    }

    /** @return stored dC/dy entries per sample */
    int outputNonzeros() {
        return outColumns.length;
    }

    /** @return stored dC/dx entries per sample */
    int inputNonzeros() {
        return inColumns.length;
    }

    /** @return the position of term {@code i}'s first dC/dy entry (its last is before that of {@code i + 1}) */
    int outputOffset(int i) {
        return outStart[i];
    }

    /** @return the position of term {@code i}'s first dC/dx entry (its last is before that of {@code i + 1}) */
    int inputOffset(int i) {
        return inStart[i];
    }

    /** @return the output column of dC/dy entry {@code k} */
    int outputColumn(int k) {
        return outColumns[k];
    }

    /** @return the input column of dC/dx entry {@code k} */
    int inputColumn(int k) {
        return inColumns[k];
    }

    /** @return the output columns of term {@code i}'s dC/dy entries, in storage order (a copy) */
    int[] outputColumns(int i) {
        return Arrays.copyOfRange(outColumns, outStart[i], outStart[i + 1]);
    }

    /** @return the input columns of term {@code i}'s dC/dx entries, in storage order (a copy) */
    int[] inputColumns(int i) {
        return Arrays.copyOfRange(inColumns, inStart[i], inStart[i + 1]);
    }
}
