package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import dev.lawful.algebra.LawException;
import org.junit.jupiter.api.Test;

/** The layers refuse a law set with limits by name rather than train outputs that ignore them. */
class LimitRefusalTest {
    @Test
    void aLawSetWithLimitsIsRefusedByName() {
        LawSpec spec = new LawSpec();
        spec.setSourceName("split.law");
        spec.setLawText(String.join("\n",
                "input  x kg/s",
                "output a kg/s",
                "output c kg/s",
                "law balance: a + c = x",
                "complete c",
                "limit dry: c >= 0",
                ""));
        LawException e = assertThrows(LawException.class, spec::completion);
        assertEquals("split.law:6:7: the law set declares limits ('dry'); the Deeplearning4j layers do not enforce"
                + " limits yet: train with a law file without the limit statements, and keep outputs inside the"
                + " limits at inference with Completion.forward or lawful complete on the same law file with its"
                + " limits\nlimit dry: c >= 0\n      ^^^", e.getMessage());
    }
}
