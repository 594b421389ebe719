package dev.lawful.dl4j;

import dev.lawful.enforce.BoundCheck;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Penalty;
import java.io.Serializable;
import java.util.Arrays;
import org.nd4j.linalg.api.ndarray.INDArray;

/**
 * What a running law layer or vertex keeps from one call to the next: the core's workspace, the last solution with
 * the inputs it was solved from, and the double buffers that conversions, solutions and gradients are written into,
 * so that a training step allocates none of them. The float staging of the conversions is per thread and lives in
 * {@link NdArrays}.
 *
 * <p><b>The solution cache.</b> Deeplearning4j runs the forward pass and then the backward pass on the same input,
 * and the backward pass needs the solution; {@link #solution} hands the last one back instead of solving again when
 * the same completion solved it from inputs equal by value (not by identity: a workspace may hand the same array
 * back with new contents), and when it was checked at least as strictly as asked: a solution computed with
 * {@link BoundCheck#SKIP} (a training pass) never answers an {@link BoundCheck#EVERY_SAMPLE} request, while a
 * certified one answers both.
 *
 * <p><b>The buffers.</b> Each input slot has a spare buffer that the next conversion of that input goes into, and
 * there is a spare solution buffer; {@link #remember} makes the previous solution's input and solution buffers the
 * spares, so a buffer handed out stays valid until the second solve after it. Each gradient slot keeps one buffer,
 * valid until the next request for that slot. A buffer of the wrong length is replaced, never resized in place.
 *
 * <p>Not thread-safe, like the layers and vertices that own it. Serialised, it keeps its buffers but forgets the
 * completion and the workspace (neither is serialisable), so a copy starts with an empty cache.
 */
final class LawCallState implements Serializable {
    private static final long serialVersionUID = 1L;

    /** The inputs of the cached solution as converted, by slot; the spare conversion buffers, by slot. */
    private final double[][] lastIn;
    private final double[][] spareIn;
    /** The gradient buffers, by slot. */
    private final double[][] gradients;
    private double[] lastY;
    private double[] spareY;
    /** An array derived from the inputs on the way to the cached solution (a vertex's physical x), or null. */
    private double[] lastDerived;
    private double[] spareDerived;
    /** Buffers used within one call only (physical free outputs, normalised outputs), by slot. */
    private final double[][] scratch = new double[2][];
    private BoundCheck lastCheck;
    private transient Completion lastOwner;
    private transient Object workspace;
    private transient Object workspaceOwner;

    /**
     * @param inputs    the number of input slots (arrays converted to double and compared by the cache)
     * @param gradients the number of gradient slots
     */
    LawCallState(int inputs, int gradients) {
        this.lastIn = new double[inputs][];
        this.spareIn = new double[inputs][];
        this.gradients = new double[gradients][];
    }

    /** @return the core's workspace for {@code c}, made anew whenever the completion changes */
    Completion.Workspace workspace(Completion c) {
        if (workspaceOwner != c) {
            own(c, c.newWorkspace());
        }
        return (Completion.Workspace) workspace;
    }

    /** @return the core's workspace for {@code p}, made anew whenever the penalty changes */
    Penalty.Workspace workspace(Penalty p) {
        if (workspaceOwner != p) {
            own(p, p.newWorkspace());
        }
        return (Penalty.Workspace) workspace;
    }

    private void own(Object owner, Object ws) {
        workspace = ws;
        workspaceOwner = owner;
    }

    /**
     * @return the values of {@code a} in double ({@link NdArrays#toDouble(INDArray, double[])}), written into the
     *         slot's spare buffer when it has the right length
     */
    double[] convert(int slot, INDArray a) {
        return NdArrays.toDouble(a, spareIn[slot]);
    }

    /**
     * @param owner the completion asked to solve
     * @param check the check the caller needs
     * @param in    the converted inputs, one per slot
     * @return the cached solution when it answers this request (see the class documentation), else null. On a hit,
     *         an input array that is not the cached one becomes its slot's spare again.
     */
    double[] solution(Completion owner, BoundCheck check, double[]... in) {
        // a solution is only as good as its check: an uncertified one never answers a request that must certify
        boolean checkedEnough = lastCheck == BoundCheck.EVERY_SAMPLE || check == BoundCheck.SKIP;
        if (lastY == null || lastOwner != owner || !checkedEnough) {
            return null;
        }
        for (int i = 0; i < in.length; i++) {
            if (!Arrays.equals(lastIn[i], in[i])) {
                return null;
            }
        }
        for (int i = 0; i < in.length; i++) {
            if (in[i] != lastIn[i]) {
                spareIn[i] = in[i];
            }
        }
        return lastY;
    }

    /** @return the derived array remembered with the cached solution (valid after a hit of {@link #solution}) */
    double[] derived() {
        return lastDerived;
    }

    /**
     * @return a buffer of {@code length} for the array derived on the way to the next solution: the spare when it
     *         fits, else a new array (it stays valid as long as the solution it is remembered with)
     */
    double[] derivedBuffer(int length) {
        return NdArrays.reuse(spareDerived, length);
    }

    /** @return the scratch buffer of {@code slot} (0 or 1), valid until the next request for that slot */
    double[] scratch(int slot, int length) {
        scratch[slot] = NdArrays.reuse(scratch[slot], length);
        return scratch[slot];
    }

    /** @return a buffer of {@code length} for the next solution: the spare when it fits, else a new array */
    double[] solutionBuffer(int length) {
        return NdArrays.reuse(spareY, length);
    }

    /**
     * Remembers a new solution; the previous solution's input and solution buffers become the spares the next call
     * converts and solves into.
     *
     * @param owner   the completion that solved it
     * @param check   the check it was solved with
     * @param y       the solution
     * @param derived an array derived from the inputs to hand back with it ({@link #derived}), or null
     * @param in      the converted inputs it was solved from, one per slot
     */
    void remember(Completion owner, BoundCheck check, double[] y, double[] derived, double[]... in) {
        for (int i = 0; i < in.length; i++) {
            spareIn[i] = lastIn[i];
            lastIn[i] = in[i];
        }
        spareY = lastY;
        lastY = y;
        if (lastDerived != derived) {
            spareDerived = lastDerived;
        }
        lastDerived = derived;
        lastOwner = owner;
        lastCheck = check;
    }

    /** @return the values of {@code a} in double, in the slot's gradient buffer when it has the right length */
    double[] gradient(int slot, INDArray a) {
        gradients[slot] = NdArrays.toDouble(a, gradients[slot]);
        return gradients[slot];
    }

    /** @return the slot's gradient buffer, replaced by a new one unless it has exactly {@code length} elements */
    double[] gradient(int slot, int length) {
        gradients[slot] = NdArrays.reuse(gradients[slot], length);
        return gradients[slot];
    }
}
