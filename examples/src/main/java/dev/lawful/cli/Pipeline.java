package dev.lawful.cli;

import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ArrayBlockingQueue;
import java.util.concurrent.BlockingQueue;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.function.Supplier;

/**
 * Reads, computes and writes in chunks, in constant memory, on every core, keeping the input's order: the calling
 * thread reads raw chunks (cheap: bytes, cut at line ends) and hands each to a pool of workers, which do the
 * expensive part (parsing numbers, completing, checking, formatting); the calling thread takes the results back in
 * submission order and writes them. At most {@code 2 × threads} chunks are in flight, so memory is bounded by the
 * chunk size whatever the number of rows.
 *
 * <p>Each worker task borrows one workspace of type {@code W} from a pool of {@code threads} (work arrays, an
 * accumulator of residuals), so a workspace is used by one thread at a time and never shared; at the end the
 * caller gets every workspace back to merge their partial results, which give the same bits in any order (see
 * {@link dev.lawful.enforce.ResidualAccumulator}).
 *
 * @param <C> a raw chunk
 * @param <R> the result of one chunk
 * @param <W> a worker's workspace
 */
final class Pipeline<C, R, W> {
    /** Reads the next raw chunk, or null at the end. */
    interface Reader<C> {
        C next() throws Exception;
    }

    /** Turns a raw chunk into its result, using a workspace no other thread holds meanwhile. */
    interface Work<C, R, W> {
        R apply(C chunk, W workspace) throws Exception;
    }

    /** Takes the results in input order; returns false to stop early (the rest is read no further). */
    interface Writer<R> {
        boolean accept(R result) throws Exception;
    }

    private final int threads;
    private final List<W> workspaces = new ArrayList<>();

    /**
     * @param threads   worker threads, at least 1
     * @param workspace makes one workspace per thread
     */
    Pipeline(int threads, Supplier<W> workspace) {
        this.threads = Math.max(1, threads);
        for (int i = 0; i < this.threads; i++) {
            workspaces.add(workspace.get());
        }
    }

    /** @return the number of worker threads: the available processors, at least 1 */
    static int defaultThreads() {
        return Math.max(1, Runtime.getRuntime().availableProcessors());
    }

    /**
     * Runs the pipeline to the end of the input or until the writer stops it.
     *
     * @return every workspace, for the caller to merge what they accumulated
     * @throws Exception the first failure of the reader, a worker (in input order) or the writer
     */
    List<W> run(Reader<C> reader, Work<C, R, W> work, Writer<R> writer) throws Exception {
        BlockingQueue<W> free = new ArrayBlockingQueue<>(threads, false, workspaces);
        ExecutorService pool = Executors.newFixedThreadPool(threads, r -> {
            Thread t = new Thread(r, "lawful-worker");
            t.setDaemon(true);
            return t;
        });
        ArrayDeque<Future<R>> inFlight = new ArrayDeque<>();
        try {
            boolean more = true;
            while (true) {
                while (more && inFlight.size() < 2 * threads) {
                    C chunk = reader.next();
                    if (chunk == null) {
                        more = false;
                        break;
                    }
                    inFlight.add(pool.submit(() -> {
                        W w = free.take();
                        try {
                            return work.apply(chunk, w);
                        } finally {
                            free.put(w);
                        }
                    }));
                }
                if (inFlight.isEmpty()) {
                    break;
                }
                if (!writer.accept(result(inFlight.poll()))) {
                    break;
                }
            }
        } finally {
            for (Future<R> f : inFlight) {
                f.cancel(true);
            }
            pool.shutdownNow();
            // a worker stopped early may still be finishing its chunk; the workspaces are the caller's only after it
            pool.awaitTermination(1, java.util.concurrent.TimeUnit.MINUTES);
        }
        return workspaces;
    }

    private static <R> R result(Future<R> f) throws Exception {
        try {
            return f.get();
        } catch (ExecutionException e) {
            if (e.getCause() instanceof Exception ex) {
                throw ex;
            }
            throw e;
        }
    }
}
