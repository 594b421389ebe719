package dev.lawful.dl4j;

import dev.lawful.enforce.Completion;
import java.util.List;
import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.deeplearning4j.nn.conf.inputs.InputType;
import org.deeplearning4j.nn.conf.inputs.InvalidInputTypeException;
import org.deeplearning4j.nn.conf.memory.LayerMemoryReport;
import org.deeplearning4j.nn.conf.memory.MemoryReport;
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
     *         temporary copies live outside every workspace. A dense row-major float or double array is read with
     *         one bulk copy of its buffer (element-wise access through ND4J's indexers cost about 0.5 ms per
     *         1024 × 56 floats); any other array is first copied into that form.
     */
    static double[] toDouble(INDArray a) {
        return toDouble(a, null);
    }

    /** Per-thread staging buffer for float arrays on their way to double (grown as needed, never shrunk). */
    private static final ThreadLocal<float[]> STAGING = ThreadLocal.withInitial(() -> new float[0]);

    /** @return this thread's staging buffer, at least {@code n} long */
    private static float[] staging(int n) {
        float[] f = STAGING.get();
        if (f.length < n) {
            f = new float[n];
            STAGING.set(f);
        }
        return f;
    }

    /**
     * @return {@code spare} when it has exactly {@code length} elements (a buffer kept from an earlier call),
     *         otherwise a new array
     */
    static double[] reuse(double[] spare, int length) {
        return spare != null && spare.length == length ? spare : new double[length];
    }

    /**
     * {@link #toDouble(INDArray)} into {@code into} when it has exactly the array's length (a layer's buffer from an
     * earlier call, so a training step allocates nothing here); otherwise into a new array.
     */
    static double[] toDouble(INDArray a, double[] into) {
        int n = Math.toIntExact(a.length());
        if (dense(a)) {
            double[] v = reuse(into, n);
            if (a.dataType() == DataType.FLOAT) {
                float[] f = staging(n);
                a.data().asNioFloat().get(f, 0, n);
                for (int i = 0; i < n; i++) {
                    v[i] = f[i];
                }
                return v;
            }
            if (a.dataType() == DataType.DOUBLE) {
                a.data().asNioDouble().get(v, 0, n);
                return v;
            }
        }
        try (MemoryWorkspace ignored = Nd4j.getWorkspaceManager().scopeOutOfWorkspaces()) {
            INDArray d = a.dataType() == DataType.DOUBLE ? a : a.castTo(DataType.DOUBLE);
            INDArray c = d.dup('c');
            if (dense(c)) {
                double[] v = new double[n];
                c.data().asNioDouble().get(v, 0, n);
                return v;
            }
            double[] v = new double[n];
            long cols = c.size(1);
            for (int i = 0; i < v.length; i++) {
                v[i] = c.getDouble(i / cols, i % cols);
            }
            return v;
        }
    }

    /** @return whether {@code a} is a rank-2 row-major array whose buffer holds exactly its elements, in order */
    private static boolean dense(INDArray a) {
        return a.rank() == 2 && a.ordering() == 'c' && a.offset() == 0 && !a.isView()
                && a.data().length() == a.length() && a.data().offset() == 0;
    }

    /**
     * Copies {@code values} (row-major, {@code rows × cols}) into a new array of the workspace manager's
     * {@code type} in the network's data type (rounding to float for float networks).
     */
    static INDArray fromDouble(LayerWorkspaceMgr mgr, ArrayType type, DataType dataType, double[] values, long rows,
                               long cols) {
        INDArray out = mgr.createUninitialized(type, dataType, new long[] {rows, cols}, 'c');
        int n = Math.toIntExact(rows * cols);
        if (n == 0) {
            return out;
        }
        if (dense(out) && dataType == DataType.FLOAT) {
            float[] f = staging(n);
            for (int i = 0; i < n; i++) {
                f[i] = (float) values[i];
            }
            out.data().asNioFloat().put(f, 0, n);
            return out;
        }
        if (dense(out) && dataType == DataType.DOUBLE) {
            out.data().asNioDouble().put(values, 0, n);
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
        s.setCertifyWhileTraining(spec.isCertifyWhileTraining());
        s.setLimitWeights(spec.getLimitWeights());
        return s;
    }

    /**
     * @return the declared output names, the label columns a normalizer must hold
     * @throws IllegalArgumentException when the completion's layout is not the declared order
     */
    static List<String> declaredColumns(Completion c) {
        if (c.layout() != Completion.Layout.DECLARED) {
            throw new IllegalArgumentException("normalised outputs need the declared output order, found layout "
                    + c.layout());
        }
        return c.laws().outputNames();
    }

    /**
     * @return {@code s} (null when there is none) after checking it has {@code width} valid columns
     * @throws IllegalStateException naming the widths
     */
    static Scaling checkScaling(String who, Scaling s, String what, int width) {
        if (s == null) {
            return null;
        }
        s.check();
        if (s.width() != width) {
            throw new IllegalStateException(who + ": its " + what + " scaling has " + s.width() + " columns but the"
                    + " law set has " + width + " " + what + "s; fold the normalizer again with normalizedWith");
        }
        return s;
    }

    /**
     * @param into a buffer from an earlier call, used when it holds exactly {@code batch × free.length} values
     * @return the physical free outputs z = scale·z_n + offset, with the output scaling's free columns
     */
    static double[] physicalFree(Scaling out, int[] free, double[] zn, int batch, double[] into) {
        int nf = free.length;
        double[] z = reuse(into, batch * nf);
        for (int s = 0; s < batch; s++) {
            for (int f = 0; f < nf; f++) {
                int j = free[f];
                z[s * nf + f] = out.scale(j) * zn[s * nf + f] + out.offset(j);
            }
        }
        return z;
    }

    /**
     * @return the normalised outputs, (y − offset)/scale per declared column, except that a free column the
     *         completion left as given takes the normalised free output {@code zn} unchanged (the same value, with no
     *         round trip through physical units); a free output a limit moved is normalised like the others;
     *         written into {@code into} when it holds exactly {@code batch × width} values
     */
    static double[] normalisedOutputs(Scaling out, int[] free, double[] y, double[] zn, int batch, double[] into) {
        int p = out.width();
        int nf = free.length;
        double[] yn = reuse(into, batch * p);
        for (int s = 0; s < batch; s++) {
            for (int j = 0; j < p; j++) {
                yn[s * p + j] = (y[s * p + j] - out.offset(j)) / out.scale(j);
            }
            for (int f = 0; f < nf; f++) {
                int j = free[f];
                double given = zn[s * nf + f];
                // the physical value the completion was given (as physicalFree computes it): unchanged unless moved
                if (y[s * p + j] == out.scale(j) * given + out.offset(j)) {
                    yn[s * p + j] = given;
                }
            }
        }
        return yn;
    }

    /** Divides each column of {@code g} (row-major, {@code s.width()} columns) by its scale, in place. */
    static void divideByScale(Scaling s, double[] g) {
        int w = s.width();
        for (int i = 0; i < g.length; i++) {
            g[i] /= s.scale(i % w);
        }
    }

    /** Multiplies column k of {@code g} (row-major, {@code cols.length} columns) by the scale of {@code cols[k]}. */
    static void multiplyByScale(Scaling s, int[] cols, double[] g) {
        int w = cols.length;
        for (int i = 0; i < g.length; i++) {
            g[i] *= s.scale(cols[i % w]);
        }
    }

    /** Multiplies each column of {@code g} (row-major, {@code s.width()} columns) by its scale, in place. */
    static void multiplyByScale(Scaling s, double[] g) {
        int w = s.width();
        for (int i = 0; i < g.length; i++) {
            g[i] *= s.scale(i % w);
        }
    }

    /**
     * Checks one input type of a vertex: feed-forward, of {@code width} columns.
     *
     * @param who   "law vertex" or similar, the start of the message
     * @param names the element names the columns stand for
     * @param fix   what the user should change, appended to the message
     * @throws InvalidInputTypeException naming both widths and the fix
     */
    static void checkFeedForward(String who, InputType t, int width, String what, List<String> names, String fix) {
        if (t == null || t.getType() != InputType.Type.FF) {
            throw new InvalidInputTypeException(who + ": " + what + " must be feed-forward of width " + width
                    + ", found " + t);
        }
        long found = ((InputType.InputTypeFeedForward) t).getSize();
        if (found != width) {
            throw new InvalidInputTypeException(who + ": " + what + " has " + found + " columns but the law set"
                    + " needs " + width + " (" + String.join(", ", names) + "); " + fix);
        }
    }

    /** @return the memory report of a parameter-free vertex: one activation array of {@code out} per example */
    static MemoryReport vertexMemory(Class<?> type, InputType in, InputType out) {
        return new LayerMemoryReport.Builder(null, type, in, out)
                .standardMemory(0, 0)
                .workingMemory(0, 0, 0, out.arrayElementsPerExample())
                .cacheMemory(MemoryReport.CACHE_MODE_ALL_ZEROS, MemoryReport.CACHE_MODE_ALL_ZEROS)
                .build();
    }
}
