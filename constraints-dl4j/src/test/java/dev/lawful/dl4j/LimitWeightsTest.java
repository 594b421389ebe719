package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.deeplearning4j.nn.conf.ComputationGraphConfiguration;
import org.junit.jupiter.api.Test;

/** Limit weights choose which outputs absorb a limit's move, travel with the spec, and refuse bad input by name. */
class LimitWeightsTest {
    private static final String SPLIT = String.join("\n",
            "input  x kg/s",
            "output a kg/s",
            "output b kg/s",
            "output c kg/s",
            "law balance: a + b + c = x",
            "complete c",
            "limit dry: c >= 0",
            "");

    @Test
    void aHeavyOutputBarelyMovesAndTheOthersAbsorbTheMove() {
        LawSpec spec = LawSpec.of(SPLIT).limitWeight("a", 9);
        double[] y = new double[3];
        spec.completion().forward(new double[] {1}, new double[] {0.8, 0.7}, 1, y, null, null);
        // least w_a Δa² + Δb² + Δc² with a + b + c = x and c on its limit 0: Δa + Δb = x − a − b = −0.5 and
        // w_a Δa = Δb, so Δa = −0.5/(1 + 9) and Δb = 9 Δa (weighted least squares; common practice)
        assertEquals(0.8 - 0.05, y[0], 1e-11);
        assertEquals(0.7 - 0.45, y[1], 1e-11);
        assertTrue(y[2] >= 0 && y[2] <= 1e-11, "c = " + y[2]);
        assertArrayEquals(new double[] {9, 1, 1}, spec.getLimitWeights(), 0.0);
    }

    @Test
    void weightsTravelWithTheVertexThroughJson() {
        LawSpec spec = LawSpec.of(SPLIT).limitWeight("b", 4);
        ComputationGraphConfiguration conf = ConstrainedGraph.builder(spec).hidden(3).configuration();
        ComputationGraphConfiguration back = ComputationGraphConfiguration.fromJson(conf.toJson());
        LawVertex vertex = (LawVertex) back.getVertices().get(ConstrainedGraph.LAWS);
        assertArrayEquals(new double[] {1, 4, 1}, vertex.getSpec().getLimitWeights(), 0.0);
        assertEquals(spec, vertex.getSpec());
    }

    @Test
    void anUnknownOutputOrABadWeightIsRefusedByName() {
        LawSpec spec = LawSpec.of(SPLIT);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> spec.limitWeight("d", 2));
        assertEquals("no output is called 'd'; the outputs are a, b, c", e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> spec.limitWeight("a", 0));
        assertEquals("limit weight 0 must be finite and positive, found 0.0", e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> {
            spec.setLimitWeights(new double[] {1, 2});
            spec.completion();
        });
        assertTrue(e.getMessage().startsWith("limit weights must hold one value per output element (3)"),
                e.getMessage());
    }
}
