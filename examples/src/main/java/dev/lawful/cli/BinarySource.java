package dev.lawful.cli;

import java.util.List;

/**
 * What the binary formats share ({@link NpySource}, {@link NpzSource}, {@link Hdf5Source}): the name, the columns,
 * the size, and rows named {@code row N}, counted from 1 (the tags of {@link BinaryChunk}).
 */
abstract class BinarySource implements RowSource {
    private final String name;
    private final List<String> columns;
    private final long size;
    private final String headerPlace;

    /**
     * @param name        the file's name for messages
     * @param columns     the column names, in file order
     * @param size        the file's size in bytes
     * @param headerPlace where the column names come from, for messages
     */
    BinarySource(String name, List<String> columns, long size, String headerPlace) {
        this.name = name;
        this.columns = List.copyOf(columns);
        this.size = size;
        this.headerPlace = headerPlace;
    }

    @Override
    public final String name() {
        return name;
    }

    @Override
    public final List<String> columns() {
        return columns;
    }

    @Override
    public final long size() {
        return size;
    }

    @Override
    public final String headerPlace() {
        return headerPlace;
    }

    @Override
    public final String place(long tag) {
        return "row " + tag;
    }
}
