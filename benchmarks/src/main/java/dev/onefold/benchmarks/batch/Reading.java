package dev.onefold.benchmarks.batch;

import java.util.Map;

/**
 * One sensor reading as a team would model it in plain Java: the input of the hand-written peer. The same
 * values as the {@link dev.onefold.record.Row} that {@link Workload#row} builds. Immutable.
 *
 * @param clock writer to counter, for the vector-clock policy (carried as payload by the other policies)
 */
public record Reading(String device, int readingNo, long seq, long recordedAt, double temp, String status,
        Map<String, Long> clock) {

    /** The unique key, as a hand-written map would hold it. */
    public record Key(String device, int readingNo) {}

    public Key key() {
        return new Key(device, readingNo);
    }

    /** Counter of one writer; a missing writer counts 0. */
    public long counter(String writer) {
        return clock.getOrDefault(writer, 0L);
    }
}
