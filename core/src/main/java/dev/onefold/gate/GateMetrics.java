package dev.onefold.gate;

import java.util.Map;

/**
 * A snapshot of a {@link StreamGate}'s counters and gauges, taken under the gate's lock so the numbers agree
 * with each other. Plain data: no metrics library is needed; feed it to one with {@link #toMap()}.
 *
 * <p>Counts add up: {@code offered == emitted + duplicates + superseded + conflictsLost + redelivered + rejected
 * + held}. {@code late} and {@code releasedEarly} count records among the emitted and dropped ones that took the
 * late path or left the reorder buffer before the watermark. Immutable.
 *
 * @param offered         records offered
 * @param emitted         emit decisions
 * @param duplicates      dropped: identical to the key's state
 * @param superseded      dropped: older than the key's state
 * @param conflictsLost   dropped: equal version, lost the tie-break
 * @param redelivered     dropped: an offset delivered before
 * @param rejected        dropped: invalid records
 * @param late            decided on the late path
 * @param releasedEarly   released before the watermark because the bound on held records was full
 * @param held            records held now
 * @param awaitingAck     emitted records not yet acknowledged now
 * @param inFlightBytes   estimated bytes of held and unacknowledged records now
 * @param windowKeys      keys in the window now
 * @param windowEvictions keys evicted from the window (by size or age) so far
 * @param storeLookups    exact mode: stored-state lookups after a window miss
 * @param storeHits       exact mode: lookups that found a stored state
 * @param partitions      per source partition, its offsets
 */
public record GateMetrics(long offered, long emitted, long duplicates, long superseded, long conflictsLost,
        long redelivered, long rejected, long late, long releasedEarly, long held, long awaitingAck,
        long inFlightBytes, long windowKeys, long windowEvictions, long storeLookups, long storeHits,
        Map<String, PartitionProgress> partitions) {

    /**
     * Offsets of one source partition.
     *
     * @param committable  the safe commit offset: every offset below it is done (-1 when none was delivered)
     * @param nextExpected one past the highest offset delivered
     * @param commitLag    offsets delivered but not yet done ({@code nextExpected - committable})
     */
    public record PartitionProgress(long committable, long nextExpected, long commitLag) {}

    public GateMetrics {
        partitions = Map.copyOf(partitions);
    }

    /** Records held now plus emitted records awaiting acknowledgement; at most the sum of the two bounds. */
    public long inFlight() {
        return held + awaitingAck;
    }

    /** The counters and gauges as flat name/value pairs ({@code commit_lag.<partition>} per partition). */
    public Map<String, Long> toMap() {
        Map<String, Long> m = new java.util.TreeMap<>();
        m.put("offered", offered);
        m.put("emitted", emitted);
        m.put("duplicates", duplicates);
        m.put("superseded", superseded);
        m.put("conflicts_lost", conflictsLost);
        m.put("redelivered", redelivered);
        m.put("rejected", rejected);
        m.put("late", late);
        m.put("released_early", releasedEarly);
        m.put("held", held);
        m.put("awaiting_ack", awaitingAck);
        m.put("in_flight_bytes", inFlightBytes);
        m.put("window_keys", windowKeys);
        m.put("window_evictions", windowEvictions);
        m.put("store_lookups", storeLookups);
        m.put("store_hits", storeHits);
        partitions.forEach((p, progress) -> m.put("commit_lag." + p, progress.commitLag()));
        return m;
    }
}
