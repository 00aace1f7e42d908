package dev.onefold.internal.gate;

import dev.onefold.OnefoldException;
import org.roaringbitmap.RoaringBitmap;

/**
 * Which offsets of one source partition are fully done, and the safe commit offset: the first offset that is
 * not done, so every offset below it is done.
 *
 * <h2>Invariants</h2>
 * Let {@code c = committable()}. Then every offset below {@code c} was dropped, acknowledged, skipped by the log
 * (a gap) or lies before the position the partition resumed at, and {@code c} itself is not done. {@code c} never
 * decreases.
 *
 * <h2>64-bit offsets in a 32-bit bitmap</h2>
 * Log offsets are 64-bit; {@link RoaringBitmap} holds unsigned 32-bit values. Done offsets are stored relative
 * to a base, {@code offset - base}. Whenever the committable offset has moved whole 65536-value chunks past the
 * base, those chunks are cut off and the bitmap is shifted down by a multiple of 65536 (which only renumbers
 * containers), so the bitmap spans only the offsets in flight. An offset more than 2^31 - 1 beyond the oldest
 * unfinished offset is refused: two billion records in flight on one partition is a misuse, not a load.
 *
 * <h2>Gaps and redeliveries</h2>
 * A partitioned log delivers each partition in ascending offset order, but offsets may be missing (compaction,
 * transaction markers). When an offset above the next expected one arrives, the offsets in between are marked
 * done: the log holds no record there. An offset below the next expected one is a redelivery.
 *
 * <h2>Complexity</h2>
 * Delivering and marking done are O(1) amortised; memory is about one bit per in-flight offset span (less where
 * runs compress). Not thread-safe; the gate guards it with its lock.
 */
public final class PartitionOffsets {
    private static final long CHUNK = 1L << 16;
    private static final long MAX_SPAN = Integer.MAX_VALUE;

    private final String partition;
    private RoaringBitmap done = new RoaringBitmap();
    private long base = -1;
    private long committable = -1;
    private long nextExpected = -1;

    public PartitionOffsets(String partition) {
        this.partition = partition;
    }

    /** Starts the partition at an offset known to be committed; everything below it counts as done. */
    public void resumeAt(long offset) {
        if (base >= 0) {
            throw OnefoldException.usage("partition " + partition + ": cannot resume at " + offset
                    + " after offsets were delivered (next expected " + nextExpected + ")");
        }
        requireOffset(offset);
        base = offset;
        committable = offset;
        nextExpected = offset;
    }

    /** Whether an offer of this offset is a redelivery of one already delivered (or before the resume point). */
    public boolean isRedelivery(long offset) {
        return base >= 0 && offset < nextExpected;
    }

    /**
     * Checks that a first delivery of this offset would be accepted.
     *
     * @throws OnefoldException (USAGE) when the offset is negative or too far beyond the oldest unfinished one
     */
    public void checkDeliverable(long offset) {
        requireOffset(offset);
        if (base >= 0 && offset - base >= MAX_SPAN) {
            throw OnefoldException.usage("partition " + partition + ": offset " + offset + " is more than "
                    + MAX_SPAN + " beyond the oldest unfinished offset " + committable);
        }
    }

    /** Records the first delivery of an offset; offsets skipped since the last delivery count as done. */
    public void deliver(long offset) {
        checkDeliverable(offset);
        if (base < 0) {
            resumeAt(offset);
        } else if (offset < nextExpected) {
            throw new IllegalStateException("offset " + offset + " of " + partition + " is a redelivery");
        }
        if (offset > nextExpected) {
            done.add(nextExpected - base, offset - base);
        }
        nextExpected = offset + 1;
        advance();
    }

    /** Marks a delivered offset done (dropped or acknowledged); idempotent. */
    public void markDone(long offset) {
        if (offset < committable) {
            return;
        }
        if (offset >= nextExpected) {
            throw OnefoldException.usage("partition " + partition + ": offset " + offset
                    + " was never delivered (next expected " + nextExpected + ")");
        }
        done.add(offset - base, offset - base + 1);
        advance();
    }

    private void advance() {
        long relative = done.nextAbsentValue((int) (committable - base));
        committable = base + relative;
        long cut = relative / CHUNK * CHUNK;
        if (cut > 0) {
            done.remove(0L, cut);
            done = RoaringBitmap.addOffset(done, -cut);
            base += cut;
        }
    }

    private void requireOffset(long offset) {
        if (offset < 0) {
            throw OnefoldException.usage("partition " + partition + ": offset must not be negative, got " + offset);
        }
    }

    /** The safe commit offset (first offset not done), or -1 before anything was delivered or resumed. */
    public long committable() {
        return committable;
    }

    /** One past the highest delivered offset, or -1 before anything was delivered or resumed. */
    public long nextExpected() {
        return nextExpected;
    }

    /** Offsets delivered but not yet done: how far a commit lags behind delivery. */
    public long lag() {
        return base < 0 ? 0 : nextExpected - committable;
    }

    /** Bytes the bitmap holds (for the memory estimate). */
    public long bitmapBytes() {
        return done.getLongSizeInBytes();
    }
}
