package dev.onefold.gate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.OnefoldException;
import dev.onefold.internal.gate.PartitionOffsets;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;
import net.jqwik.api.constraints.LongRange;
import org.junit.jupiter.api.Test;

class PartitionOffsetsTest {

    // ---- safe commit offset

    @Test
    void markDone_outOfOrderAdvancesOnlyOverContiguousPrefix() {
        PartitionOffsets p = new PartitionOffsets("t-0");
        for (long o = 10; o < 15; o++) {
            p.deliver(o);
        }
        assertEquals(10, p.committable());
        p.markDone(12);
        p.markDone(11);
        assertEquals(10, p.committable(), "offset 10 is not done");
        p.markDone(10);
        assertEquals(13, p.committable());
        p.markDone(14);
        p.markDone(13);
        assertEquals(15, p.committable());
        assertEquals(0, p.lag());
    }

    @Test
    void deliver_gapCountsAsDone() {
        PartitionOffsets p = new PartitionOffsets("t-0");
        p.deliver(0);
        p.deliver(5); // offsets 1..4 hold no record (compaction or transaction markers)
        p.markDone(0);
        assertEquals(5, p.committable());
        assertTrue(p.isRedelivery(3));
        assertFalse(p.isRedelivery(6));
    }

    @Test
    void resumeAt_offsetsBelowAreRedeliveriesAndFirstGapIsDone() {
        PartitionOffsets p = new PartitionOffsets("t-0");
        p.resumeAt(100);
        assertTrue(p.isRedelivery(99));
        p.deliver(103);
        assertEquals(103, p.committable());
        assertThrows(OnefoldException.class, () -> p.resumeAt(50));
    }

    @Test
    void deliver_offsetsBeyondIntRangeAndChunkRebases() {
        PartitionOffsets p = new PartitionOffsets("t-0");
        long start = (1L << 40) + 12345; // a 64-bit log offset far past 2^32
        int n = 300_000; // spans several 65536-value chunks, so the bitmap is cut and shifted
        for (long o = start; o < start + n; o++) {
            p.deliver(o);
            if (o > start) {
                p.markDone(o - 1);
            }
        }
        assertEquals(start + n - 1, p.committable());
        // uncut, 300,000 offsets would fill five 8 KiB containers; cut, at most the current chunk remains
        assertTrue(p.bitmapBytes() < 16 * 1024, "done prefix was cut from the bitmap: " + p.bitmapBytes());
        p.markDone(start + n - 1);
        assertEquals(start + n, p.committable());
    }

    @Test
    void deliver_tooFarBeyondOldestUnfinishedIsRefused() {
        PartitionOffsets p = new PartitionOffsets("t-0");
        p.deliver(7);
        OnefoldException e = assertThrows(OnefoldException.class, () -> p.checkDeliverable(7 + (1L << 31)));
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
        assertTrue(e.getMessage().contains("t-0"), e.getMessage());
    }

    @Test
    void markDone_neverDeliveredOffsetIsAUsageError() {
        PartitionOffsets p = new PartitionOffsets("t-0");
        p.deliver(0);
        assertThrows(OnefoldException.class, () -> p.markDone(1));
        assertThrows(OnefoldException.class, () -> p.checkDeliverable(-1));
    }

    // ---- model: committable is the first offset not done

    @Property
    void markDone_anyOrderCommittableIsFirstNotDone(@ForAll @LongRange(min = 0, max = 1L << 50) long start,
            @ForAll @IntRange(min = 1, max = 200) int n, @ForAll long seed) {
        Random rnd = new Random(seed);
        PartitionOffsets p = new PartitionOffsets("t-0");
        boolean[] done = new boolean[n];
        List<Integer> delivered = new ArrayList<>();
        int next = 0;
        while (next < n || !delivered.isEmpty()) {
            if (next < n && (delivered.isEmpty() || rnd.nextBoolean())) {
                p.deliver(start + next);
                delivered.add(next++);
            } else {
                Collections.shuffle(delivered, rnd);
                int i = delivered.remove(delivered.size() - 1);
                p.markDone(start + i);
                done[i] = true;
            }
            int firstNotDone = 0;
            while (firstNotDone < next && done[firstNotDone]) {
                firstNotDone++;
            }
            assertEquals(start + firstNotDone, p.committable());
        }
    }
}
