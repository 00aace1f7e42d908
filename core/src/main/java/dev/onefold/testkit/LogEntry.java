package dev.onefold.testkit;

import java.util.Objects;

/**
 * One record at one position of a simulated source log: the partition it was written to and its offset there.
 * A record written twice (a producer retry) has two entries with different offsets. Immutable when the record
 * is.
 *
 * @param partition the source partition, from 0
 * @param offset    the position within the partition, from 0
 * @param record    the record as written
 */
public record LogEntry<R>(int partition, long offset, R record) {
    public LogEntry {
        if (partition < 0 || offset < 0) {
            throw new IllegalArgumentException("partition and offset must not be negative, got " + partition + "@" + offset);
        }
        Objects.requireNonNull(record, "record");
    }

    @Override
    public String toString() {
        return "p" + partition + "@" + offset;
    }
}
