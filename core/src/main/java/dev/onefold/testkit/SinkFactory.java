package dev.onefold.testkit;

/**
 * Opens a fresh, empty {@link Sink} for one schedule, for example a new in-memory database with the table
 * created. The kit calls it once per schedule run (also while shrinking), from one thread.
 */
@FunctionalInterface
public interface SinkFactory<R> {
    Sink<R> open() throws Exception;
}
