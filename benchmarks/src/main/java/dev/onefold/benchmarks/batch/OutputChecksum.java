package dev.onefold.benchmarks.batch;

import dev.onefold.record.Row;
import java.util.Map;

/**
 * An order-sensitive checksum of a dedupe output: every peer feeds its survivors in output order, and two
 * outputs have equal checksums only if (barring a 64-bit collision) they hold the same records in the same
 * order. Values are taken field by field, so the peers need no shared encoding: {@code device},
 * {@code reading_no}, {@code seq}, {@code recorded_at}, {@code temp} (IEEE bits), {@code status} (null marked),
 * and the counters of writers {@code w1} and {@code w2}.
 *
 * <p>Not thread-safe. Each record costs a few multiplications.
 */
public final class OutputChecksum {
    private long hash = 0x2545F4914F6CDD1DL;
    private long count;

    public void add(String device, int readingNo, long seq, long recordedAt, double temp, String status, long w1, long w2) {
        mix(device.hashCode());
        mix(readingNo);
        mix(seq);
        mix(recordedAt);
        mix(Double.doubleToLongBits(temp));
        mix(status == null ? 0x5A5A5A5AL : status.hashCode());
        mix(w1);
        mix(w2);
        count++;
    }

    public void add(Reading r) {
        add(r.device(), r.readingNo(), r.seq(), r.recordedAt(), r.temp(), r.status(), r.counter("w1"), r.counter("w2"));
    }

    /** Adds a row of {@link Workload#SCHEMA}. */
    public void add(Row row) {
        Map<?, ?> clock = (Map<?, ?>) row.get(6);
        add((String) row.get(0), (Integer) row.get(1), (Long) row.get(2), (Long) row.get(3), (Double) row.get(4),
                (String) row.get(5), counter(clock, "w1"), counter(clock, "w2"));
    }

    private static long counter(Map<?, ?> clock, String writer) {
        Object v = clock.get(writer);
        return v == null ? 0 : (Long) v;
    }

    private void mix(long v) {
        long z = (hash ^ v) * 0x9E3779B97F4A7C15L;
        hash = z ^ (z >>> 29);
    }

    /** The checksum so far, folded with the record count. */
    public long value() {
        return hash * 31 + count;
    }

    public long count() {
        return count;
    }

    /**
     * Fails loudly when an output differs from the reference, so that no timing of a wrong result counts.
     *
     * @throws IllegalStateException naming the peer, the case and both checksums
     */
    public static void requireEqual(String peer, String what, long expected, long actual) {
        if (expected != actual) {
            throw new IllegalStateException(peer + " computed a different result for " + what + ": checksum "
                    + Long.toHexString(actual) + ", expected " + Long.toHexString(expected)
                    + "; its timing does not count");
        }
    }
}
