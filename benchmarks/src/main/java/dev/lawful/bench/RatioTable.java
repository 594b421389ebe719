package dev.lawful.bench;

import java.io.File;
import java.io.IOException;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import org.nd4j.shade.jackson.databind.JsonNode;
import org.nd4j.shade.jackson.databind.ObjectMapper;

/**
 * Reads a JMH result file ({@code -rf json}) and prints what exactness costs as ratios; sections whose suites
 * are not in the file are left out. {@code benchmarks/run.sh} calls it after every run.
 * <ul>
 *   <li><b>Kernels</b> ({@link KernelBench}), per tier and grid point: library ns per sample, library /
 *       hand-written, ND4J ops / library, float / double entry point, library / memory-bandwidth bound
 *       ({@link KernelBench#bytesPerSample} at 23 GB/s, one core), for forward and backward, and the bytes
 *       allocated per sample when the run used {@code -prof gc};</li>
 *   <li><b>Training step</b> ({@link TrainingStepBench}), per shape: ms per step without laws, and each law
 *       tier's (and the penalty's) step / the step without laws;</li>
 *   <li><b>Inference</b> ({@link InferenceBench}), per shape: µs per batch without laws and with / without per
 *       tier; per tier, the core alone in µs per batch, core / hand-written, and core / network without laws.</li>
 * </ul>
 * The JSON is read with the Jackson copy that ND4J shades (already in the benchmarks jar).
 *
 * <pre>
 * java -cp benchmarks/target/benchmarks.jar dev.lawful.bench.RatioTable benchmarks/target/jmh-result.json
 * </pre>
 */
public final class RatioTable {
    /** Stream bandwidth of one core on the reference machine, bytes per nanosecond (docs/platform-facts.md, Java kernels). */
    static final double BYTES_PER_NANOSECOND = 23.0;

    /** The {@code -prof gc} figure of bytes allocated per operation (older JMH versions prefix a middle dot). */
    private static final String[] GC_NORM = {"gc.alloc.rate.norm", "·gc.alloc.rate.norm"};

    private final Map<String, Double> scores = new LinkedHashMap<>();
    private final Map<String, Double> allocations = new LinkedHashMap<>();
    private final List<JsonNode> rows = new ArrayList<>();

    private RatioTable() {
    }

    /**
     * Prints the table.
     *
     * @param args the JMH JSON result file
     * @throws IOException when the file cannot be read or is not JSON
     */
    public static void main(String[] args) throws IOException {
        if (args.length != 1) {
            System.err.println("usage: RatioTable RESULT.json  (a JMH result written with -rf json)");
            System.exit(2);
        }
        RatioTable table = new RatioTable();
        for (JsonNode row : new ObjectMapper().readTree(new File(args[0]))) {
            table.add(row);
        }
        table.kernels();
        table.training();
        table.inference();
    }

    private void add(JsonNode row) {
        String name = row.get("benchmark").asText();
        name = name.substring(name.lastIndexOf('.', name.lastIndexOf('.') - 1) + 1);
        Map<String, String> params = new TreeMap<>();
        JsonNode p = row.get("params");
        if (p != null) {
            p.fields().forEachRemaining(e -> params.put(e.getKey(), e.getValue().asText()));
        }
        String key = key(name, params);
        scores.put(key, row.get("primaryMetric").get("score").asDouble());
        JsonNode secondary = row.get("secondaryMetrics");
        for (String metric : GC_NORM) {
            if (secondary != null && secondary.has(metric)) {
                allocations.put(key, secondary.get(metric).get("score").asDouble());
            }
        }
        rows.add(row);
    }

    private static String key(String name, Map<String, String> params) {
        return name + params;
    }

    private Double score(String name, Map<String, String> params) {
        return scores.get(key(name, params));
    }

    private static Map<String, String> params(String... pairs) {
        Map<String, String> m = new TreeMap<>();
        for (int i = 0; i < pairs.length; i += 2) {
            m.put(pairs[i], pairs[i + 1]);
        }
        return m;
    }

    /** The distinct parameter sets of one suite's runs, in file order. */
    private List<Map<String, String>> points(String suite, String... without) {
        List<Map<String, String>> result = new ArrayList<>();
        for (JsonNode row : rows) {
            String name = row.get("benchmark").asText();
            if (!name.contains("." + suite + ".")) {
                continue;
            }
            Map<String, String> m = new TreeMap<>();
            row.get("params").fields().forEachRemaining(e -> m.put(e.getKey(), e.getValue().asText()));
            for (String w : without) {
                m.remove(w);
            }
            if (!result.contains(m)) {
                result.add(m);
            }
        }
        return result;
    }

    private static String ratio(Double a, Double b) {
        return a == null || b == null ? "-" : String.format(Locale.ROOT, "%.2f", a / b);
    }

    private static String value(Double a) {
        return a == null ? "-" : String.format(Locale.ROOT, a < 10 ? "%.2f" : a < 1000 ? "%.1f" : "%.0f", a);
    }

    private void kernels() {
        List<Map<String, String>> points = points("KernelBench");
        if (points.isEmpty()) {
            return;
        }
        boolean gc = !allocations.isEmpty();
        System.out.printf(Locale.ROOT, "%nKernels (KernelBench, ns per sample; bound = bytes / 23 GB/s, one core)%n");
        System.out.printf(Locale.ROOT, "%-16s %6s %5s %5s | %9s %8s %8s %8s %8s | %8s %6s | %9s %8s %8s %8s %8s%s%n",
                "tier", "batch", "free", "laws", "forward", "/hand", "nd4j/", "float/", "/bound", "skip",
                "/hand", "backward", "/hand", "nd4j/", "float/", "/bound", gc ? " | alloc B/sample fwd bwd" : "");
        for (Map<String, String> at : points) {
            String tier = at.get("tier");
            int free = Integer.parseInt(at.get("free"));
            int laws = Integer.parseInt(at.get("laws"));
            Double fwd = score("KernelBench.forward", at);
            Double bwd = score("KernelBench.backward", at);
            double fwdBound = KernelBench.bytesPerSample(tier, false, 8, free, laws) / BYTES_PER_NANOSECOND;
            double bwdBound = KernelBench.bytesPerSample(tier, true, 8, free, laws) / BYTES_PER_NANOSECOND;
            String alloc = gc ? String.format(Locale.ROOT, " | %10s %6s", value(allocations.get(key(
                    "KernelBench.forward", at))), value(allocations.get(key("KernelBench.backward", at)))) : "";
            // projection has no uncertified forward (KernelBench.forwardSkip runs its ordinary one)
            Double skip = tier.equals("projection") ? null : score("KernelBench.forwardSkip", at);
            System.out.printf(Locale.ROOT, "%-16s %6s %5s %5s | %9s %8s %8s %8s %8s | %8s %6s | %9s %8s %8s %8s %8s%s%n",
                    tier, at.get("batch"), at.get("free"), at.get("laws"),
                    value(fwd), ratio(fwd, score("KernelBench.handForward", at)),
                    ratio(score("KernelBench.nd4jForward", at), fwd),
                    ratio(score("KernelBench.forwardFloat", at), fwd), ratio(fwd, fwdBound),
                    value(skip), ratio(skip, score("KernelBench.handForward", at)),
                    value(bwd), ratio(bwd, score("KernelBench.handBackward", at)),
                    ratio(score("KernelBench.nd4jBackward", at), bwd),
                    ratio(score("KernelBench.backwardFloat", at), bwd), ratio(bwd, bwdBound), alloc);
        }
        System.out.printf(Locale.ROOT, "/hand: library over hand-written; nd4j/: ND4J ops over library; float/: float"
                + " entry point over double; /bound: library over the bandwidth bound; skip: forward without the final"
                + " bound check (BoundCheck.SKIP, as training runs it)%n");
    }

    private void training() {
        List<Map<String, String>> shapes = points("TrainingStepBench", "laws");
        if (shapes.isEmpty()) {
            return;
        }
        String[] tiers = {"constant-affine", "affine", "nonlinear", "penalty"};
        System.out.printf(Locale.ROOT, "%nTraining step (TrainingStepBench, with laws / without)%n");
        System.out.printf(Locale.ROOT, "%-9s %12s %16s %10s %10s %10s%n", "shape", "none ms", tiers[0], tiers[1],
                tiers[2], tiers[3]);
        for (Map<String, String> at : shapes) {
            String shape = at.get("shape");
            Double none = score("TrainingStepBench.fit", params("laws", "none", "shape", shape));
            String[] cells = new String[tiers.length];
            for (int i = 0; i < tiers.length; i++) {
                cells[i] = ratio(score("TrainingStepBench.fit", params("laws", tiers[i], "shape", shape)), none);
            }
            System.out.printf(Locale.ROOT, "%-9s %12s %16s %10s %10s %10s%n", shape, value(none), cells[0], cells[1],
                    cells[2], cells[3]);
        }
    }

    private void inference() {
        List<Map<String, String>> points = points("InferenceBench", "laws", "tier");
        if (points.isEmpty()) {
            return;
        }
        String[] tiers = {"constant-affine", "affine", "nonlinear"};
        Double reference = null;
        boolean networks = false;
        for (Map<String, String> at : points) {
            String shape = at.get("shape");
            if (shape == null) {
                continue;
            }
            if (!networks) {
                System.out.printf(Locale.ROOT, "%nInference (InferenceBench, DL4J output per batch, with laws /"
                        + " without)%n");
                System.out.printf(Locale.ROOT, "%-9s %12s %16s %10s %10s%n", "shape", "none us", tiers[0], tiers[1],
                        tiers[2]);
                networks = true;
            }
            Double none = score("InferenceBench.output", params("laws", "none", "shape", shape));
            if (reference == null || shape.equals("headline")) {
                reference = none;
            }
            System.out.printf(Locale.ROOT, "%-9s %12s %16s %10s %10s%n", shape, value(none),
                    ratio(score("InferenceBench.output", params("laws", tiers[0], "shape", shape)), none),
                    ratio(score("InferenceBench.output", params("laws", tiers[1], "shape", shape)), none),
                    ratio(score("InferenceBench.output", params("laws", tiers[2], "shape", shape)), none));
        }
        if (score("InferenceBench.coreForward", params("tier", tiers[0])) == null
                && score("InferenceBench.coreForward", params("tier", tiers[2])) == null) {
            return;
        }
        System.out.printf(Locale.ROOT, "%nCore alone (InferenceBench, Completion.forward on the head's outputs, us per"
                + " batch)%n");
        System.out.printf(Locale.ROOT, "%-16s %10s %8s %14s%n", "tier", "core us", "/hand", "/network");
        for (String tier : tiers) {
            Double core = score("InferenceBench.coreForward", params("tier", tier));
            System.out.printf(Locale.ROOT, "%-16s %10s %8s %14s%n", tier, value(core),
                    ratio(core, score("InferenceBench.coreHandWritten", params("tier", tier))), ratio(core, reference));
        }
        System.out.printf(Locale.ROOT, "/network: core over DL4J output without laws (headline shape when run)%n");
    }
}
