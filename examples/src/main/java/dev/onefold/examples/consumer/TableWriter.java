package dev.onefold.examples.consumer;

import dev.onefold.gate.Decision;
import dev.onefold.gate.StreamGate;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.LinkedBlockingQueue;
import java.util.concurrent.TimeUnit;
import java.util.function.Consumer;

/**
 * The sink's writer thread: takes the gate's decisions in the order they were made, writes them to the table in
 * batches (one transaction each) and acknowledges each batch to the gate only after its transaction committed.
 * So acknowledgements are asynchronous and batched, and the gate never counts an offset done before its write is
 * durable.
 *
 * <p>{@link #submit} is called by the consumer thread; everything else runs on the writer's own thread.
 * {@link #halt()} stops it at once, dropping queued decisions unwritten, as a crash would.
 */
final class TableWriter implements AutoCloseable {
    private static final int MAX_BATCH = 64;

    private final LinkedBlockingQueue<Decision<String>> queue = new LinkedBlockingQueue<>();
    private final ParcelTable table;
    private final StreamGate<String> gate;
    private final Consumer<Decision<String>> onDurable;
    private final Thread thread;
    private volatile boolean halted;
    private volatile boolean closing;
    private volatile RuntimeException failure;

    /**
     * @param onDurable told of each decision once it is durable, before the gate is (for audits)
     */
    TableWriter(ParcelTable table, StreamGate<String> gate, Consumer<Decision<String>> onDurable, String name) {
        this.table = table;
        this.gate = gate;
        this.onDurable = onDurable;
        this.thread = new Thread(this::loop, name);
        this.thread.setDaemon(true);
        this.thread.start();
    }

    /** Queues emits; other decisions need no write here. */
    void submit(Decision<String> d) {
        if (failure != null) {
            throw failure;
        }
        if (d.isEmit()) {
            queue.add(d);
        }
    }

    private void loop() {
        List<Decision<String>> batch = new ArrayList<>(MAX_BATCH);
        try {
            while (!halted && !(closing && queue.isEmpty())) {
                Decision<String> first = queue.poll(50, TimeUnit.MILLISECONDS);
                if (first == null) {
                    continue;
                }
                batch.add(first);
                queue.drainTo(batch, MAX_BATCH - 1);
                table.apply(batch);
                if (halted) {
                    return; // halted mid-write: the crash happens before the acknowledgement
                }
                batch.forEach(onDurable);
                gate.acknowledgeAll(batch);
                batch.clear();
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        } catch (RuntimeException e) {
            failure = e;
        }
    }

    /** Whether every submitted decision has been written and acknowledged. */
    boolean idle() {
        return queue.isEmpty() && gate.metrics().awaitingAck() == 0;
    }

    /**
     * Stops at once, as a crash would: queued decisions are never written, and a batch being written is
     * committed or not but never acknowledged.
     */
    void halt() {
        halted = true;
        join();
    }

    /** Writes and acknowledges everything queued, then stops. */
    @Override
    public void close() {
        closing = true;
        join();
    }

    private void join() {
        try {
            thread.join(10_000);
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
