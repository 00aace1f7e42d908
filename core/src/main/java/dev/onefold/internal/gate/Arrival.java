package dev.onefold.internal.gate;

import dev.onefold.record.Row;

/**
 * One accepted record on its way through the gate: where it came from, its key, its lifted merge state and its
 * event time. Immutable.
 *
 * @param sequence  arrival number within the gate, the last tie-breaker of the release order
 * @param eventTime the reorder field's value, or 0 when the gate does not reorder
 * @param sizeBytes estimated memory held while it waits (key, state bytes and object overhead)
 */
public record Arrival<R>(String partition, long offset, R record, Row row, KeyBytes key, Object lifted,
        byte[] liftedBytes, long eventTime, byte[] order, long sequence, long sizeBytes) {

    /** Fixed per-record overhead in the size estimate: object headers, references, the queue slot. */
    public static final long OVERHEAD_BYTES = 160;
}
