package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;

import dev.lawful.enforce.BoundCheck;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.Penalty;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;

/**
 * The contract of {@link LawCallState} on its own: which cached solution may answer which request, how the
 * conversion, solution and gradient buffers rotate and grow, and whose workspace it hands out. The layers' and the
 * vertex's use of it is tested end to end in {@link TrainingCheckTest}.
 */
class LawCallStateTest {
    private static final Completion C = LawSpec.of(TestNets.CONSTANT_AFFINE).completion();
    private static final Completion OTHER = LawSpec.of(TestNets.AFFINE_FREE).completion();

    private static INDArray rows(double... v) {
        return Nd4j.create(v, new long[] {v.length / 2, 2}, 'c');
    }

    @Test
    void aSkippedSolutionNeverAnswersACertifiedRequest() {
        LawCallState s = new LawCallState(1, 0);
        double[] z = {1, 2};
        double[] y = {3, 4};
        s.remember(C, BoundCheck.SKIP, y, null, z);
        assertSame(y, s.solution(C, BoundCheck.SKIP, z.clone()), "a training pass may reuse a training solution");
        assertNull(s.solution(C, BoundCheck.EVERY_SAMPLE, z), "an uncertified solution must not answer inference");
        double[] certified = {5, 6};
        s.remember(C, BoundCheck.EVERY_SAMPLE, certified, null, z);
        assertSame(certified, s.solution(C, BoundCheck.EVERY_SAMPLE, z.clone()));
        assertSame(certified, s.solution(C, BoundCheck.SKIP, z.clone()), "a certified solution answers training");
    }

    @Test
    void onlyTheSameCompletionAndEqualValuesHit() {
        LawCallState s = new LawCallState(2, 0);
        double[] x = {1, 2};
        double[] z = {3, 4};
        assertNull(s.solution(C, BoundCheck.SKIP, x, z), "nothing cached yet");
        double[] y = {5};
        double[] physicalX = {10, 20};
        s.remember(C, BoundCheck.EVERY_SAMPLE, y, physicalX, x, z);
        assertSame(y, s.solution(C, BoundCheck.EVERY_SAMPLE, new double[] {1, 2}, new double[] {3, 4}),
                "compared by value: fresh arrays with the same values hit");
        assertSame(physicalX, s.derived(), "the derived input travels with the solution");
        assertNull(s.solution(OTHER, BoundCheck.EVERY_SAMPLE, x, z), "another completion solves again");
        assertNull(s.solution(C, BoundCheck.EVERY_SAMPLE, x, new double[] {3, 4.5}), "one input differs");
        assertNull(s.solution(C, BoundCheck.EVERY_SAMPLE, x, new double[] {3, 4, 0}), "another batch size");
    }

    @Test
    void aHandedOutBufferLastsUntilTheSecondSolveAfterIt() {
        LawCallState s = new LawCallState(1, 0);
        double[] z1 = s.convert(0, rows(1, 2, 3, 4));
        double[] y1 = s.solutionBuffer(4);
        s.remember(C, BoundCheck.SKIP, y1, null, z1);
        double[] z2 = s.convert(0, rows(5, 6, 7, 8));
        double[] y2 = s.solutionBuffer(4);
        assertNotSame(z1, z2);
        assertNotSame(y1, y2, "the first solution is still the cached one");
        s.remember(C, BoundCheck.SKIP, y2, null, z2);
        double[] z3 = s.convert(0, rows(9, 10, 11, 12));
        assertSame(z1, z3, "the third conversion goes into the first one's buffer");
        assertSame(y1, s.solutionBuffer(4), "and the third solution into the first one's");
        assertArrayEquals(new double[] {5, 6, 7, 8}, z2, 0.0, "the second is untouched");
        assertArrayEquals(new double[] {9, 10, 11, 12}, z3, 0.0);
        double[] other = s.convert(0, rows(1, 2));
        assertEquals(2, other.length, "another batch size gets a buffer of its own length");
        assertEquals(6, s.solutionBuffer(6).length);
    }

    @Test
    void aDerivedBufferLastsAsLongAsItsSolutionAndScratchBuffersAreKeptPerSlot() {
        LawCallState s = new LawCallState(1, 0);
        double[] x1 = s.derivedBuffer(3);
        s.remember(C, BoundCheck.SKIP, s.solutionBuffer(4), x1, s.convert(0, rows(1, 2)));
        double[] x2 = s.derivedBuffer(3);
        assertNotSame(x1, x2, "the cached solution's derived array is not handed out again");
        s.remember(C, BoundCheck.SKIP, s.solutionBuffer(4), x2, s.convert(0, rows(3, 4)));
        assertSame(x1, s.derivedBuffer(3), "the third solve derives into the first one's buffer");
        assertSame(x2, s.derived());
        double[] a = s.scratch(0, 5);
        assertSame(a, s.scratch(0, 5));
        assertNotSame(a, s.scratch(1, 5), "each slot has its own");
        assertEquals(7, s.scratch(0, 7).length);
    }

    @Test
    void aHitGivesTheNewConversionBackAsTheSpare() {
        LawCallState s = new LawCallState(1, 0);
        double[] z1 = s.convert(0, rows(1, 2));
        double[] y = {0};
        s.remember(C, BoundCheck.EVERY_SAMPLE, y, null, z1);
        double[] again = s.convert(0, rows(1, 2));
        assertSame(y, s.solution(C, BoundCheck.EVERY_SAMPLE, again));
        assertSame(again, s.convert(0, rows(3, 4)), "the hit's conversion is free for the next one");
        assertArrayEquals(new double[] {1, 2}, z1, 0.0, "the cached input is never written over");
    }

    @Test
    void gradientBuffersAreKeptPerSlotUntilTheLengthChanges() {
        LawCallState s = new LawCallState(0, 2);
        double[] g0 = s.gradient(0, 6);
        assertSame(g0, s.gradient(0, 6));
        assertNotSame(g0, s.gradient(1, 6), "each slot has its own buffer");
        double[] g1 = s.gradient(1, rows(1, 2, 3, 4, 5, 6));
        assertArrayEquals(new double[] {1, 2, 3, 4, 5, 6}, g1, 0.0);
        assertSame(g1, s.gradient(1, 6), "a converted gradient stays the slot's buffer");
        double[] grown = s.gradient(0, 8);
        assertEquals(8, grown.length, "a new batch size replaces the buffer");
        assertSame(grown, s.gradient(0, 8));
    }

    @Test
    void theWorkspaceFollowsItsOwner() {
        LawCallState s = new LawCallState(0, 0);
        Completion.Workspace w = s.workspace(C);
        assertSame(w, s.workspace(C));
        assertNotSame(w, s.workspace(OTHER));
        assertNotSame(w, s.workspace(C), "a change of completion makes a new workspace");
        Penalty p = Penalty.of(LawSpec.of(TestNets.CONSTANT_AFFINE).lawSet());
        Penalty.Workspace pw = s.workspace(p);
        assertSame(pw, s.workspace(p));
    }

    @Test
    void aSerialisedCopyStartsWithAnEmptyCache() throws Exception {
        LawCallState s = new LawCallState(1, 1);
        double[] z = {1, 2};
        s.remember(C, BoundCheck.EVERY_SAMPLE, new double[] {3}, null, z);
        s.workspace(C);
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        try (ObjectOutputStream out = new ObjectOutputStream(bytes)) {
            out.writeObject(s);
        }
        LawCallState copy;
        try (ObjectInputStream in = new ObjectInputStream(new ByteArrayInputStream(bytes.toByteArray()))) {
            copy = (LawCallState) in.readObject();
        }
        assertNull(copy.solution(C, BoundCheck.SKIP, z), "the copy does not know which completion solved it");
        assertSame(copy.workspace(C), copy.workspace(C));
    }
}
