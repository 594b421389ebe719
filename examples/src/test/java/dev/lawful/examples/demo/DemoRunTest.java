package dev.lawful.examples.demo;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.examples.report.ReportWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.List;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.nd4j.shade.jackson.databind.JsonNode;
import org.nd4j.shade.jackson.databind.ObjectMapper;

/**
 * A short run of each worked scenario (small data, a few epochs): the exact network obeys every law within the
 * completion's documented float32 bound on every test row, the unconstrained network's residuals are orders of
 * magnitude larger, and the report files exist and parse.
 */
class DemoRunTest {

    @ParameterizedTest
    @ValueSource(strings = {"reformer", "column", "exchanger"})
    void aShortRunIsExactForTheLawNetworkAndWritesAReport(String name, @TempDir Path dir) throws Exception {
        Scenario scenario = Scenarios.named(name).withSize(1500, 3);
        ScenarioTrainer.Outcome outcome = ScenarioTrainer.run(scenario, 7, Progress.quiet());
        assertEquals(300, outcome.testRows());
        List<ScenarioTrainer.Network> nets = outcome.networks();
        assertEquals(List.of(ScenarioTrainer.UNCONSTRAINED, ScenarioTrainer.PENALTY, ScenarioTrainer.EXACT),
                nets.stream().map(ScenarioTrainer.Network::label).toList());
        ScenarioTrainer.Network unconstrained = nets.get(0);
        ScenarioTrainer.Network exact = nets.get(2);
        // Source: constraints-core Completion class documentation, "Exactness" (the documented float32 bound, with
        // the rounding of the normalised inputs and outputs the float network saw and emitted)
        assertEquals(0, exact.outsideBound(), name + ": exact network rows outside the documented bound");
        int m = outcome.lawNames().size();
        for (int i = 0; i < m; i++) {
            double exactMax = 0;
            double[] free = new double[outcome.testRows()];
            for (int s = 0; s < outcome.testRows(); s++) {
                exactMax = Math.max(exactMax, Math.abs(exact.residuals()[s * m + i]));
                free[s] = Math.abs(unconstrained.residuals()[s * m + i]);
            }
            Arrays.sort(free);
            double median = free[free.length / 2];
            assertTrue(median > 1e3 * exactMax, name + ", law " + outcome.lawNames().get(i) + ": median |r| of the"
                    + " unconstrained network " + median + " is not orders of magnitude above the exact network's"
                    + " largest " + exactMax);
        }
        if (name.equals("reformer")) {
            // total mass = Σ_e (atomic weight_e × element balance_e) exactly, so with the element balances held the
            // mass balance holds to their residuals weighted by the standard atomic weights (Source: IUPAC CIAAW
            // standard atomic weights 2021, abridged values, from memory: C 12.011, H 1.0080, O 15.999, N 14.007)
            double[] weight = {12.011e-3, 1.0080e-3, 15.999e-3, 14.007e-3};
            double implied = 0;
            for (int i = 0; i < m; i++) {
                double largest = 0;
                for (int s = 0; s < outcome.testRows(); s++) {
                    largest = Math.max(largest, Math.abs(exact.residuals()[s * m + i]));
                }
                implied += weight[i] * largest;
            }
            assertEquals(List.of("carbon", "hydrogen", "oxygen", "nitrogen"), outcome.lawNames());
            assertTrue(exact.sideCheckMax()[0] <= 2 * implied + 1e-12, exact.sideCheckMax()[0] + " > " + implied);
            assertTrue(unconstrained.sideCheckMax()[0] > 1e3 * exact.sideCheckMax()[0]);
        }
        DemoReport report = DemoReport.of(outcome);
        assertTrue(report.exactWithinBound());
        assertTrue(report.exactInsideLimits(), report.verdict());
        List<Path> files = report.write(dir);
        // the six of every report, and the distribution of a limited completed output when the laws have limits
        boolean limited = !outcome.laws().limits().isEmpty();
        assertEquals(limited ? 7 : 6, files.size());
        for (Path f : files) {
            assertTrue(Files.size(f) > 0, "empty report file " + f);
        }
        JsonNode json = new ObjectMapper().readTree(Files.readString(dir.resolve(ReportWriter.JSON),
                StandardCharsets.UTF_8));
        assertEquals(name, json.get("scenario").asText());
        assertEquals(3, json.get("networks").size());
        assertEquals(m, json.get("laws").size());
        assertTrue(json.get("caution").asText().contains("exact: 0 of 300 test rows outside"), json.get("caution")
                .asText());
        List<String> csv = Files.readAllLines(dir.resolve(ReportWriter.RESIDUALS_CSV), StandardCharsets.UTF_8);
        assertEquals(1 + 3 * 300, csv.size());
        assertTrue(report.table().contains("exact"));
        assertTrue(report.verdict().contains("exact          0 of 300"), report.verdict());
        if (limited) {
            assertTrue(report.verdict().contains("Test rows outside limit '"), report.verdict());
            assertTrue(json.get("caution").asText().contains("Test rows outside limit '"));
        }
    }
}
