package dev.lawful.enforce.plan;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.Completion;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.DynamicTest;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestFactory;

/**
 * Dependent laws are refused as redundant (one says nothing new) or contradictory (no outputs satisfy them all),
 * word for word: each {@code completion-diagnostics/NAME.law} must make {@link Completion#of} throw the
 * {@link LawException} whose message is {@code NAME.expected}.
 */
class DependenceDiagnosticsTest {
    private static final List<String> CASES = List.of("redundant-constant", "redundant-input",
            "contradictory-constant", "contradictory-input");

    @TestFactory
    Stream<DynamicTest> dependentLawsGiveTheirExpectedMessage() {
        return CASES.stream().map(name -> DynamicTest.dynamicTest(name, () -> {
            String text = read(name + ".law");
            LawSet laws = LawSet.parse(name + ".law", text);
            LawException e = assertThrows(LawException.class, () -> Completion.of(laws));
            assertEquals(read(name + ".expected"), e.getMessage());
        }));
    }

    @Test
    void redundantAndContradictoryAreToldApart() {
        for (String name : CASES) {
            LawSet laws = LawSet.parse(name + ".law", read(name + ".law"));
            String message = assertThrows(LawException.class, () -> Completion.of(laws)).getMessage();
            assertTrue(message.contains(name.startsWith("redundant") ? "is redundant" : "contradict each other"),
                    name + ": " + message);
        }
    }

    @Test
    void theFactorAndTheLeftoverAreTheInputsValuesAtTheReferencePoint() {
        // in redundant-input.law, 'scaled' is x[2] times 'first'; in contradictory-input.law, 'scaled' − 2·'first'
        // leaves −x[2]: both messages show x[2] at the reference point, to six significant digits
        LawSet laws = LawSet.parse("redundant-input.law", read("redundant-input.law"));
        double x2 = ReferencePoint.generic(laws).input(2);
        String shown = new java.math.BigDecimal(x2).round(new java.math.MathContext(6)).toPlainString();
        assertTrue(read("redundant-input.expected").contains("it is " + shown + "*first"), shown);
        LawSet other = LawSet.parse("contradictory-input.law", read("contradictory-input.law"));
        assertEquals(x2, ReferencePoint.generic(other).input(2), 0.0, "the same generic point for the same inputs");
        assertTrue(read("contradictory-input.expected").contains("differs from it by " + shown + " "), shown);
    }

    private static String read(String file) {
        try (InputStream in = DependenceDiagnosticsTest.class.getResourceAsStream("/completion-diagnostics/" + file)) {
            if (in == null) {
                throw new IllegalStateException("test resource completion-diagnostics/" + file + " is missing");
            }
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new IllegalStateException(e);
        }
    }
}
