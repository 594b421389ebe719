package dev.lawful.cli;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import picocli.CommandLine.Option;

/**
 * The options {@code complete} and {@code verify} share to name their data: {@code --in} (a file, or {@code -} for
 * standard input), {@code --format} (else the file's extension decides) and {@code --columns} (names for the
 * columns of a NumPy array, which has none of its own). A picocli mixin.
 */
final class DataInput {
    @Option(names = "--in", required = true, paramLabel = "DATA",
            description = "the data: a CSV file, a NumPy .npy or .npz file, an HDF5 or NetCDF-4 file (.h5, .hdf5, .nc),"
                    + " or - for CSV on standard input")
    String in;

    @Option(names = "--format", paramLabel = "FORMAT",
            description = "csv, npy, npz or hdf5 (default: from the file's extension; csv for any other or for -)")
    String format;

    @Option(names = "--columns", paramLabel = "NAMES", split = ",",
            description = "the element names of a 2-D .npy array's columns, in order, separated by commas (a .npz "
                    + "file or an HDF5 file names its own)")
    List<String> columns;

    /** Creates the options; picocli fills them in. */
    DataInput() {
    }

    /** @return the format: {@code --format}, or the one the extension names, or csv */
    String format() throws CommandFailure {
        String f = format;
        if (f == null) {
            String name = in.toLowerCase(Locale.ROOT);
            f = name.endsWith(".npy") ? "npy" : name.endsWith(".npz") ? "npz"
                    : name.endsWith(".h5") || name.endsWith(".hdf5") || name.endsWith(".nc") || name.endsWith(".he5")
                    ? "hdf5" : "csv";
        }
        f = f.toLowerCase(Locale.ROOT);
        if (!List.of("csv", "npy", "npz", "hdf5").contains(f)) {
            throw new CommandFailure(Lawful.EXIT_USAGE, "--format must be csv, npy, npz or hdf5, found '" + format
                    + "'");
        }
        return f;
    }

    /**
     * Opens the data and reads its header.
     *
     * @param command the command, for messages
     * @param stdin   standard input, for {@code -}
     * @return the source
     * @throws CommandFailure (exit 2) when the file cannot be read or its header is malformed
     */
    RowSource open(String command, InputStream stdin) throws CommandFailure {
        String prefix = "lawful " + command + ": ";
        String f = format();
        try {
            if (in.equals("-")) {
                if (!f.equals("csv")) {
                    throw new CommandFailure(Lawful.EXIT_USAGE, prefix + "standard input is read as CSV only; give"
                            + " the " + f + " file's name with --in");
                }
                return CsvSource.open("standard input", stdin, -1);
            }
            Path path = Path.of(in);
            if (Files.isDirectory(path)) {
                throw new CommandFailure(Lawful.EXIT_USAGE, prefix + "cannot read " + in + ": it is a directory");
            }
            if (columns != null && !f.equals("npy")) {
                throw new CommandFailure(Lawful.EXIT_USAGE, prefix + "--columns names the columns of a .npy array;"
                        + " " + in + " names its own");
            }
            return switch (f) {
                case "npy" -> NpySource.open(in, path, columns);
                case "npz" -> NpzSource.open(in, path);
                case "hdf5" -> Hdf5Source.open(in, path);
                default -> CsvSource.open(in, Files.newInputStream(path), Files.size(path));
            };
        } catch (IOException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + "cannot read " + in + ": "
                    + CheckCommand.reason(e));
        } catch (DataException e) {
            throw new CommandFailure(Lawful.EXIT_USAGE, prefix + e.getMessage());
        }
    }
}
