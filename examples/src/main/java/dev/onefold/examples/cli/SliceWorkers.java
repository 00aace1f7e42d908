package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import java.util.ArrayDeque;
import java.util.Deque;
import java.util.List;
import java.util.concurrent.Callable;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;

/**
 * Converts slices of records on worker threads while the caller goes on, and hands the results back in the order
 * the slices were submitted, so parallel parsing or formatting never changes the order of records.
 *
 * <p>Invariants: at most {@link #full() maxInFlight} slices are queued or running, so memory is bounded by the
 * slices ahead; a slice's exception is rethrown by {@link #takeOldest()} for that slice. Workers are daemon
 * threads, one fewer than the cores (at least one), stopped by {@link #close()}.
 *
 * <p>For one calling thread. Cost: one task hand-off per slice.
 */
final class SliceWorkers<T> implements AutoCloseable {
    /** Slices in flight per worker thread: enough to keep the workers busy while the caller catches up. */
    private static final int AHEAD_PER_WORKER = 4;

    private final ExecutorService workers;
    private final int maxInFlight;
    private final Deque<Future<List<T>>> inFlight = new ArrayDeque<>();

    SliceWorkers(String threadName) {
        int threads = Math.max(1, Runtime.getRuntime().availableProcessors() - 1);
        this.maxInFlight = threads * AHEAD_PER_WORKER;
        this.workers = Executors.newFixedThreadPool(threads, r -> {
            Thread t = new Thread(r, threadName);
            t.setDaemon(true);
            return t;
        });
    }

    void submit(Callable<List<T>> slice) {
        inFlight.addLast(workers.submit(slice));
    }

    boolean full() {
        return inFlight.size() >= maxInFlight;
    }

    boolean isEmpty() {
        return inFlight.isEmpty();
    }

    /** Waits for the oldest slice and returns its result, or rethrows its exception. */
    List<T> takeOldest() {
        try {
            return inFlight.removeFirst().get();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new OnefoldException(OnefoldException.Kind.IO, "interrupted while waiting for a worker", e);
        } catch (ExecutionException e) {
            if (e.getCause() instanceof RuntimeException re) {
                throw re;
            }
            throw new IllegalStateException("a worker failed", e.getCause());
        }
    }

    @Override
    public void close() {
        workers.shutdownNow();
    }
}
