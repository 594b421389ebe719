package dev.lawful.cli;

import java.util.List;
import java.util.concurrent.ConcurrentLinkedQueue;

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
     * Byte arrays of chunks already parsed, reused for the next chunks: without them a 1 GB file allocates 1 GB of
     * chunk arrays, and growing the heap to hold them (committing and faulting in fresh pages) took longer than
     * parsing the values. At most the chunks in flight are out at once, so the pool stays as small as they are.
     */
    private final ConcurrentLinkedQueue<byte[]> spare = new ConcurrentLinkedQueue<>();

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

    /**
     * @param length bytes wanted
     * @return an array of at least {@code length} bytes: a spare one when there is one that large, else a new one;
     *         its contents are undefined
     */
    final byte[] buffer(int length) {
        for (byte[] b = spare.poll(); b != null; b = spare.poll()) {
            if (b.length >= length) {
                return b;
            }
        }
        return new byte[length];
    }

    /** Gives back a chunk's arrays once its values have been parsed (any thread). */
    final void release(BinaryChunk.Part part) {
        spare.offer(part.bytes());
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
