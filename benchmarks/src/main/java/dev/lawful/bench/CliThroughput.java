package dev.lawful.bench;

import io.jhdf.HdfFile;
import io.jhdf.WritableHdfFile;
import java.io.BufferedOutputStream;
import java.io.BufferedWriter;
import java.io.IOException;
import java.io.OutputStream;
import java.io.Writer;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

/**
 * Throughput and peak memory of {@code lawful verify} and {@code lawful complete} on large generated files, against
 * simply reading the file ({@code cat} to /dev/null, the physical limit). Not a JMH suite: each run is one process of
 * the real command line, timed from outside with GNU time ({@code /usr/bin/time -f "%e %M"}: wall seconds and peak
 * resident set size), as a user would see it.
 *
 * <pre>
 * java -cp benchmarks/target/benchmarks.jar dev.lawful.bench.CliThroughput [ROWS] [DIR] [JAVA OPTIONS...]
 * </pre>
 *
 * ROWS (default 10 000 000) rows of the steam reformer (examples/laws/steam-reformer.law: six feed flows, a
 * temperature and the two free outputs CH4 and CO2, random demo values) are written to DIR (default
 * {@code target/cli-throughput}) as CSV, as a C-order float64 {@code .npy} and as an HDF5 file of one dataset per
 * law vector (written with jhdf). Then, for each format: {@code cat}, {@code verify} of the completed file and
 * {@code complete} (CSV to CSV; a binary format to {@code .npy}). The JAVA OPTIONS (such as {@code -Xmx512m}) are
 * passed to each {@code java -jar examples/target/lawful.jar} run. Prints one line per run: seconds, MB/s of input,
 * rows/s, peak resident MB, and the time relative to {@code cat}; first, the time of {@code complete} on a
 * one-row CSV: what every run pays whatever its size (starting the JVM, loading the classes, reading the law file).
 */
public final class CliThroughput {
    private static final String LAW = "examples/laws/steam-reformer.law";
    private static final String JAR = "examples/target/lawful.jar";
    private static final String COLUMNS = "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[3]";
    private static final String FULL = "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],"
            + "out[3],out[4],out[5]";

    private CliThroughput() {
    }

    /**
     * Generates the files and runs the commands.
     *
     * @param args ROWS, DIR, then options for the measured JVMs
     * @throws Exception when a file cannot be written or a command fails
     */
    public static void main(String[] args) throws Exception {
        long rows = args.length > 0 ? Long.parseLong(args[0].replace("_", "")) : 10_000_000L;
        Path dir = Path.of(args.length > 1 ? args[1] : "target/cli-throughput");
        List<String> jvm = args.length > 2 ? List.of(args).subList(2, args.length) : List.of();
        Files.createDirectories(dir);
        Path csv = dir.resolve("reformer.csv");
        Path npy = dir.resolve("reformer.npy");
        Path h5 = dir.resolve("reformer.h5");
        generate(rows, csv, npy);
        hdf5(npy, h5, rows);
        System.out.printf(Locale.ROOT, "%d rows; java options %s; %d processors%n", rows, jvm,
                Runtime.getRuntime().availableProcessors());
        System.out.printf(Locale.ROOT, "%-8s %-22s %9s %9s %11s %12s %10s%n", "format", "run", "seconds", "MB/s",
                "rows/s", "peak RSS MB", "x cat");
        // what every run pays whatever the row count: starting the JVM, loading the classes, reading the law file
        Path one = dir.resolve("one-row.csv");
        try (java.io.BufferedReader r = Files.newBufferedReader(csv, StandardCharsets.UTF_8)) {
            Files.writeString(one, r.readLine() + "\n" + r.readLine() + "\n", StandardCharsets.UTF_8);
        }
        double[] fixed = run(lawful(jvm, "complete", LAW, "--in", one.toString(), "--out", dir.resolve("one-full.csv")
                .toString()));
        System.out.printf(Locale.ROOT, "%-8s %-22s %9.2f %9s %11s %12.0f %10s%n", "-", "complete of one row", fixed[0],
                "-", "-", fixed[1] / 1024, "-");
        for (Path in : List.of(csv, npy, h5)) {
            boolean text = in.equals(csv);
            String format = text ? "csv" : in.equals(npy) ? "npy" : "hdf5";
            double mb = Files.size(in) / 1e6;
            double[] cat = run(List.of("cat", in.toString()));
            print(format, "cat", cat, mb, rows, cat[0]);
            Path full = dir.resolve(text ? "full.csv" : "full-" + format + ".npy");
            List<String> complete = lawful(jvm, "complete", LAW, "--in", in.toString(), "--out", full.toString());
            if (in.equals(npy)) {
                complete.addAll(List.of("--columns", COLUMNS));
            }
            print(format, "complete", run(complete), mb, rows, cat[0]);
            List<String> verify = lawful(jvm, "verify", LAW, "--in", full.toString());
            if (!text) {
                verify.addAll(List.of("--columns", FULL));
            }
            double fullMb = Files.size(full) / 1e6;
            double[] catFull = run(List.of("cat", full.toString()));
            print(format, "verify (completed file)", run(verify), fullMb, rows, catFull[0]);
        }
    }

    private static List<String> lawful(List<String> jvm, String... args) {
        List<String> cmd = new ArrayList<>(List.of("java"));
        cmd.addAll(jvm);
        cmd.addAll(List.of("-jar", JAR));
        cmd.addAll(List.of(args));
        return cmd;
    }

    /** @return wall seconds and peak resident kilobytes of one run, by GNU time */
    private static double[] run(List<String> command) throws IOException, InterruptedException {
        List<String> timed = new ArrayList<>(List.of("/usr/bin/time", "-f", "%e %M"));
        timed.addAll(command);
        Path err = Files.createTempFile("lawful-bench", ".err");
        Process p = new ProcessBuilder(timed).redirectOutput(ProcessBuilder.Redirect.DISCARD)
                .redirectError(err.toFile()).start();
        int status = p.waitFor();
        List<String> lines = Files.readAllLines(err);
        Files.delete(err);
        String last = lines.get(lines.size() - 1);
        if (status > 1) {
            throw new IOException(String.join(" ", command) + " failed (" + status + "): " + lines);
        }
        String[] parts = last.trim().split(" ");
        return new double[] {Double.parseDouble(parts[0]), Double.parseDouble(parts[1])};
    }

    private static void print(String format, String what, double[] r, double mb, long rows, double cat) {
        System.out.printf(Locale.ROOT, "%-8s %-22s %9.2f %9.0f %11.0f %12.0f %10.1f%n", format, what, r[0],
                mb / r[0], rows / r[0], r[1] / 1024, r[0] / Math.max(cat, 0.01));
    }

    /** Writes the CSV and the .npy of the same random rows (demo values, not measurements). */
    private static void generate(long rows, Path csv, Path npy) throws IOException {
        SplittableRandom r = new SplittableRandom(1);
        String header = "{'descr': '<f8', 'fortran_order': False, 'shape': (" + rows + ", 9), }";
        int total = (10 + header.length() + 1 + 63) / 64 * 64;
        ByteBuffer prefix = ByteBuffer.allocate(total).order(ByteOrder.LITTLE_ENDIAN);
        // NumPy's format specification, version 1.0: magic, version, header length, padded dict, line feed
        prefix.put(new byte[] {(byte) 0x93, 'N', 'U', 'M', 'P', 'Y', 1, 0}).putShort((short) (total - 10));
        prefix.put((header + " ".repeat(total - 11 - header.length()) + "\n").getBytes(StandardCharsets.US_ASCII));
        try (Writer w = new BufferedWriter(Files.newBufferedWriter(csv, StandardCharsets.UTF_8), 1 << 20);
             OutputStream o = new BufferedOutputStream(Files.newOutputStream(npy), 1 << 20)) {
            o.write(prefix.array());
            w.write(COLUMNS + "\n");
            ByteBuffer row = ByteBuffer.allocate(9 * 8).order(ByteOrder.LITTLE_ENDIAN);
            StringBuilder line = new StringBuilder(200);
            for (long s = 0; s < rows; s++) {
                double[] v = {1 + r.nextDouble(), 3 + r.nextDouble(), 0, r.nextDouble() / 10, r.nextDouble() / 10,
                    r.nextDouble() / 10, 800 + 200 * r.nextDouble(), r.nextDouble() / 2, r.nextDouble() / 2};
                row.clear();
                line.setLength(0);
                for (int k = 0; k < v.length; k++) {
                    row.putDouble(v[k]);
                    line.append(k == 0 ? "" : ",").append(v[k]);
                }
                o.write(row.array());
                w.append(line).append('\n');
            }
        }
    }

    /** Writes the HDF5 file from the .npy: datasets feed (rows x 6), T, out[0] and out[3]. */
    private static void hdf5(Path npy, Path h5, long rows) throws IOException {
        int n = Math.toIntExact(rows);
        double[][] feed = new double[n][6];
        double[] t = new double[n];
        double[] ch4 = new double[n];
        double[] co2 = new double[n];
        try (var in = Files.newInputStream(npy)) {
            byte[] head = in.readNBytes(10);
            int length = 10 + Short.toUnsignedInt(ByteBuffer.wrap(head).order(ByteOrder.LITTLE_ENDIAN).getShort(8));
            in.readNBytes(length - 10);
            ByteBuffer row = ByteBuffer.allocate(72).order(ByteOrder.LITTLE_ENDIAN);
            for (int s = 0; s < n; s++) {
                row.clear();
                row.put(in.readNBytes(72)).flip();
                for (int k = 0; k < 6; k++) {
                    feed[s][k] = row.getDouble();
                }
                t[s] = row.getDouble();
                ch4[s] = row.getDouble();
                co2[s] = row.getDouble();
            }
        }
        try (WritableHdfFile w = HdfFile.write(h5)) {
            w.putDataset("feed", feed);
            w.putDataset("T", t);
            w.putDataset("out[0]", ch4);
            w.putDataset("out[3]", co2);
        }
    }
}
