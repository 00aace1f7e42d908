package dev.onefold.testkit;

import java.util.Collection;

/**
 * The store under test, as the test kit sees it: a team wraps its own writer (a database writer, a search-index
 * updater, a cache filler) in this interface, and {@link SinkCheck} feeds it adversarial at-least-once
 * deliveries and compares what it reads back with the state onefold computes.
 *
 * <p>The contract the kit checks: once {@link #apply} returns, the delivery is kept, even across a
 * {@link #restart}; and after any schedule of deliveries, {@link #readState} holds exactly one correct visible
 * record per key (one per sibling where the dataset keeps siblings), whatever the duplicates, order, batch
 * boundaries and replays. Deleted keys are absent from the read-back state.
 *
 * <p>The kit calls one sink from one thread only; an implementation need not be thread-safe. Each schedule
 * gets a fresh sink from a {@link SinkFactory} and closes it afterwards.
 */
public interface Sink<R> {

    /** Applies one delivery; may throw, which the kit reports as a failure with the schedule that caused it. */
    void apply(Step.Delivery<R> delivery) throws Exception;

    /** Reads back every visible record, in any order. */
    Collection<R> readState() throws Exception;

    /**
     * Simulates a crash and restart of the process that writes to the store: drop every in-memory buffer,
     * roll back anything not yet durable, reconnect. The default does nothing (a sink with no state of its own).
     */
    default void restart() throws Exception {}

    /** Releases the store after the kit has read its state (also after a failure); the default does nothing. */
    default void close() throws Exception {}
}
