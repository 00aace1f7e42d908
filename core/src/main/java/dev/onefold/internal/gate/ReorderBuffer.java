package dev.onefold.internal.gate;

import java.util.Arrays;
import java.util.Comparator;
import java.util.PriorityQueue;

/**
 * Records held back until the watermark passes them, released in event-time order.
 *
 * <h2>Ordering</h2>
 * Release order is (event time, order bytes, arrival sequence): total, so equal event times come out in the
 * dataset's order. The watermark is the greatest event time seen minus the lateness bound. The frontier is the
 * greatest event time released so far (at least the watermark); a record behind the frontier cannot be placed in
 * order any more and is late.
 *
 * <h2>Complexity</h2>
 * O(log n) per hold and release; memory is the held records. Not thread-safe; the gate guards it.
 */
public final class ReorderBuffer<R> {
    private final Comparator<Arrival<R>> releaseOrder = Comparator.<Arrival<R>>comparingLong(Arrival::eventTime)
            .thenComparing(Arrival::order, Arrays::compareUnsigned)
            .thenComparingLong(Arrival::sequence);
    private final PriorityQueue<Arrival<R>> held = new PriorityQueue<>(releaseOrder);
    private final long lateness;
    private long maxEventTime = Long.MIN_VALUE;
    private long frontier = Long.MIN_VALUE;
    private long heldBytes;

    public ReorderBuffer(long lateness) {
        this.lateness = lateness;
    }

    /** Whether a record with this event time arrives behind the frontier. */
    public boolean isLate(long eventTime) {
        return eventTime < frontier;
    }

    /** Holds a record that is not late and advances the watermark by its event time. */
    public void hold(Arrival<R> a) {
        held.add(a);
        heldBytes += a.sizeBytes();
        maxEventTime = Math.max(maxEventTime, a.eventTime());
        frontier = Math.max(frontier, watermark());
    }

    /** The greatest event time seen minus the lateness (saturating), or Long.MIN_VALUE before any record. */
    public long watermark() {
        if (maxEventTime == Long.MIN_VALUE) {
            return Long.MIN_VALUE;
        }
        long w = maxEventTime - lateness;
        return w > maxEventTime ? Long.MIN_VALUE : w;
    }

    /** The next held record the watermark has passed, removed; null when none. */
    public Arrival<R> releasable() {
        Arrival<R> head = held.peek();
        return head != null && head.eventTime() <= watermark() ? take() : null;
    }

    /** The earliest held record, removed, whether or not the watermark has passed it; null when empty. */
    public Arrival<R> take() {
        Arrival<R> a = held.poll();
        if (a != null) {
            heldBytes -= a.sizeBytes();
            frontier = Math.max(frontier, a.eventTime());
        }
        return a;
    }

    public int heldRecords() {
        return held.size();
    }

    public long heldBytes() {
        return heldBytes;
    }

    /** Whether nothing is held. */
    public boolean isEmpty() {
        return held.isEmpty();
    }
}
