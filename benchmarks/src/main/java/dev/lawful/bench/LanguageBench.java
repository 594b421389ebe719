package dev.lawful.bench;

import dev.lawful.algebra.LawSet;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.Warmup;

/**
 * Time to parse, check, expand and compile a law set with a few hundred terms: what a user pays once per model.
 * The baseline is parsing alone.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MICROSECONDS)
@Warmup(iterations = 3, time = 1)
@Measurement(iterations = 5, time = 1)
@Fork(1)
public class LanguageBench {
    @Param({"40"})
    public int laws;

    String text;

    @Setup
    public void setUp() {
        // a column of 'laws' layers (demo structure): each layer's heating and drying balance its flux divergence,
        // and one column law sums them all, so the set holds a few hundred terms
        StringBuilder sb = new StringBuilder();
        sb.append("input flux[").append(laws + 1).append("] W/m2\n");
        sb.append("input dp[").append(laws).append("] Pa\n");
        sb.append("output heating[").append(laws).append("] K/s\n");
        sb.append("output drying[").append(laws).append("] 1/s\n");
        sb.append("const g = 9.80665 m/s2\nconst cp = 1004 J/(kg K)\nconst Lv = 2.5e6 J/kg\n");
        for (int k = 0; k < laws; k++) {
            sb.append("law layer").append(k).append(": cp * dp[").append(k).append("] / g * heating[").append(k)
                    .append("] + Lv * dp[").append(k).append("] / g * drying[").append(k).append("] = flux[")
                    .append(k).append("] - flux[").append(k + 1).append("]\n");
        }
        sb.append("law column: sum(cp * dp / g * heating + Lv * dp / g * drying) = flux[0] - flux[").append(laws)
                .append("]\n");
        text = sb.toString();
    }

    /** Parse and check only. */
    @Benchmark
    public Object parseAndCheck() {
        return LawSet.parse("column.law", text).declarations();
    }

    /** Parse, check, expand, differentiate and compile the batch evaluator. */
    @Benchmark
    public Object compile() {
        return LawSet.parse("column.law", text).evaluator();
    }
}
