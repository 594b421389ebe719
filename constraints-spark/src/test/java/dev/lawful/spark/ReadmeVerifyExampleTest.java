package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.ResidualReport;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.List;
import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The README's distributed check example, run as written (the code between the markers below is the README's code
 * block, character for character; checked here): a CSV file read by Spark in three partitions and checked on the
 * executors. The reference is the single-machine report ({@code ResidualReport.of}, what {@code lawful verify}
 * prints) over the rows the test generated and wrote, in file order: the distributed table and JSON must equal it.
 */
class ReadmeVerifyExampleTest {
    @Test
    void theVerifyExampleGivesTheSingleMachineReport(@TempDir Path temp) throws IOException {
        List<double[]> generated = VerifyRows.rows(6, 3000);
        StringBuilder text = new StringBuilder("inflow,dt,release,evap,stored\n");
        for (double[] row : generated) {
            // Double.toString round-trips, so the file holds exactly these doubles
            text.append(String.join(",", Arrays.stream(row).mapToObj(Double::toString).toList())).append('\n');
        }
        Path file = Files.writeString(temp.resolve("reservoir.csv"), text, StandardCharsets.UTF_8);
        String csv = file.toString();
        try {
            // verify-example:start
            String lawText = String.join("\n",
                    "input  inflow   m3/s",
                    "input  dt       s",
                    "output release  m3/s",
                    "output evap     m3/s",
                    "output stored   m3",
                    "law water: stored = (inflow - release - evap) * dt",
                    "");
            SparkConf conf = new SparkConf().setAppName("reservoir-check").setIfMissing("spark.master", "local[2]");
            JavaSparkContext sc = LawfulSpark.context(conf);

            // a CSV file whose header is inflow,dt,release,evap,stored (the law text's inputs, then its outputs),
            // read on the executors in three partitions or more
            JavaRDD<double[]> rows = sc.textFile(csv, 3)
                    .filter(line -> !line.startsWith("inflow"))
                    .map(line -> Arrays.stream(line.split(",")).mapToDouble(Double::parseDouble).toArray());
            ResidualReport report = LawfulSpark.verify(lawText, rows, 1e-9);
            int partitions = rows.getNumPartitions();
            sc.stop();

            String table = report.toTable();     // the tables `lawful verify` prints
            String json = report.toJson();       // the "report" object of `lawful verify --json`
            boolean obeyed = report.withinTolerance();
            // verify-example:end

            ResidualReport single = ResidualReport.of(LawSet.parse("reservoir.law", lawText),
                    VerifyRows.inputs(generated), VerifyRows.outputs(generated), generated.size(), 1e-9);
            assertEquals(3, partitions);
            assertEquals(single.toTable(), table);
            assertEquals(single.toJson(), json);
            assertEquals(single.withinTolerance(), obeyed);
            assertFalse(obeyed, "the generated rows include NaN, infinite and perturbed ones");
        } finally {
            SparkTests.stopActiveContext();
        }
    }

    @Test
    void theReadmeShowsExactlyThisCode() throws IOException {
        ReadmeCode.assertShown("ReadmeVerifyExampleTest", "verify-example", "// the verify example's imports");
    }
}
