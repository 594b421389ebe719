package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.List;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.memory.MemoryWorkspace;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;

/**
 * Conversions between ND4J arrays and the core's flat row-major double batches, and the shape checks with the
 * messages that say what to change. Package-private: the layer and the vertex share it.
 */
final class NdArrays {
    private NdArrays() {
    }

    /**
     * @return the values of a rank-2 array as a fresh row-major double array (float values widen exactly); the
     *         temporary copies live outside every workspace
     */
    static double[] toDouble(INDArray a) {
        try (MemoryWorkspace ignored = Nd4j.getWorkspaceManager().scopeOutOfWorkspaces()) {
            INDArray d = a.dataType() == DataType.DOUBLE ? a : a.castTo(DataType.DOUBLE);
            INDArray c = d.dup('c');
            long n = c.length();
            if (c.data().length() == n && c.offset() == 0) {
                return c.data().asDouble();
            }
            double[] v = new double[Math.toIntExact(n)];
            long cols = c.size(1);
            for (int i = 0; i < v.length; i++) {
                v[i] = c.getDouble(i / cols, i % cols);
            }
            return v;
        }
    }

    /**
     * Copies {@code values} (row-major, {@code rows × cols}) into a new array of the workspace manager's
     * {@code type} in the network's data type (rounding to float for float networks).
     */
    static INDArray fromDouble(LayerWorkspaceMgr mgr, ArrayType type, DataType dataType, double[] values, long rows,
                               long cols) {
        INDArray out = mgr.createUninitialized(type, dataType, new long[] {rows, cols}, 'c');
        if (rows * cols == 0) {
            return out;
        }
        try (MemoryWorkspace ignored = Nd4j.getWorkspaceManager().scopeOutOfWorkspaces()) {
            out.assign(Nd4j.create(values, new long[] {rows, cols}, 'c'));
        }
        return out;
    }

    /**
     * Checks that {@code a} is a rank-2 batch with {@code expected} columns.
     *
     * @param who     "law layer 'name'" or similar, the start of the message
     * @param what    what the array is, e.g. "its input (the head's free outputs)"
     * @param names   the element names the columns stand for
     * @param fix     what the user should change, appended to the message
     * @return the batch size
     * @throws IllegalArgumentException naming both widths and the fix
     */
    static int batch(INDArray a, String who, String what, int expected, List<String> names, String fix) {
        if (a.rank() != 2) {
            throw new IllegalArgumentException(who + ": " + what + " must be a rank-2 array [batch, " + expected
                    + "], found shape " + java.util.Arrays.toString(a.shape()) + "; " + fix);
        }
        if (a.size(1) != expected) {
            throw new IllegalArgumentException(who + ": " + what + " has " + a.size(1) + " columns but the law set"
                    + " needs " + expected + " (" + String.join(", ", names) + "); " + fix);
        }
        return Math.toIntExact(a.size(0));
    }

    /** @return the message fix for a head of the wrong width */
    static String headFix(Completion c) {
        return "set nOut of the head (the layer that feeds it) to " + c.freeWidth() + ", the number of free outputs";
    }

    /** Copies a spec field by field, so that a cloned configuration never shares a mutable spec. */
    static LawSpec copy(LawSpec spec) {
        if (spec == null) {
            return null;
        }
        LawSpec s = new LawSpec();
        if (spec.getLawText() != null) {
            s.setLawText(spec.getLawText());
        }
        s.setSourceName(spec.getSourceName());
        s.setCompleted(spec.getCompleted());
        s.setMaskBadSamples(spec.isMaskBadSamples());
        return s;
    }
}
