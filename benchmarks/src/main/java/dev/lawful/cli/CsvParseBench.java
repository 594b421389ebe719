package dev.lawful.cli;

import ch.randelshofer.fastdoubleparser.JavaDoubleParser;
import de.siegmar.fastcsv.reader.CsvReader;
import de.siegmar.fastcsv.reader.CsvRecord;
import java.nio.charset.StandardCharsets;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OperationsPerInvocation;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;

/**
 * The hot path of a large CSV file, per row of nine numbers (the reformer's free-output file): splitting a line into
 * values and parsing them, by the command line's own splitter ({@link CsvFields}, on bytes, which keeps line
 * and column numbers for messages) with FastDoubleParser or with the JDK's {@code Double.parseDouble}, against
 * FastCSV 3.4.0's reader with either parser. Nanoseconds per row; lives in the command line's package to reach its
 * splitter. Run: {@code benchmarks/run.sh CsvParseBench}.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class CsvParseBench {
    static final int ROWS = 2000;
    static final int COLUMNS = 9;

    byte[] bytes;
    String text;

    /** Generates the rows: random values written as Java writes doubles, as most tools write them. */
    @Setup
    public void setUp() {
        SplittableRandom r = new SplittableRandom(1);
        StringBuilder sb = new StringBuilder();
        for (int s = 0; s < ROWS; s++) {
            for (int k = 0; k < COLUMNS; k++) {
                sb.append(k == 0 ? "" : ",").append(r.nextDouble() * Math.pow(10, r.nextInt(-3, 4)));
            }
            sb.append('\n');
        }
        text = sb.toString();
        bytes = text.getBytes(StandardCharsets.UTF_8);
    }

    private double ours(boolean fast) {
        double sum = 0;
        int pos = 0;
        while (pos < bytes.length) {
            int e = pos;
            while (bytes[e] != '\n') {
                e++;
            }
            CsvFields f = new CsvFields(bytes, pos, e, (byte) ',');
            while (f.nextAt("bench", 1)) {
                sum += fast ? f.number() : Double.parseDouble(f.text());
            }
            pos = e + 1;
        }
        return sum;
    }

    /** @return the sum of every value: our splitter and FastDoubleParser (what the command line runs) */
    @Benchmark
    @OperationsPerInvocation(ROWS)
    public double oursFastDoubleParser() {
        return ours(true);
    }

    /** @return the sum of every value: our splitter and the JDK's parser on a String per value */
    @Benchmark
    @OperationsPerInvocation(ROWS)
    public double oursJdkParser() {
        return ours(false);
    }

    private double fastCsv(boolean fast) {
        double sum = 0;
        for (CsvRecord rec : CsvReader.builder().ofCsvRecord(text)) {
            for (int k = 0; k < rec.getFieldCount(); k++) {
                String v = rec.getField(k);
                sum += fast ? JavaDoubleParser.parseDouble(v) : Double.parseDouble(v);
            }
        }
        return sum;
    }

    /** @return the sum of every value: FastCSV's reader and FastDoubleParser */
    @Benchmark
    @OperationsPerInvocation(ROWS)
    public double fastCsvFastDoubleParser() {
        return fastCsv(true);
    }

    /** @return the sum of every value: FastCSV's reader and the JDK's parser */
    @Benchmark
    @OperationsPerInvocation(ROWS)
    public double fastCsvJdkParser() {
        return fastCsv(false);
    }
}
