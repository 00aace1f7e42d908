package dev.onefold.gate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.gate.Decision.Action;
import dev.onefold.gate.Decision.Reason;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.time.Duration;
import java.util.List;
import java.util.Map;
import java.util.OptionalLong;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicLong;
import org.junit.jupiter.api.Test;

class StreamGateTest {
    private static final DatasetSpec LAST_WRITER = GateFixtures.SPECS.get(0);
    private static final DatasetSpec FIELD_WISE = GateFixtures.SPECS.get(1);
    private static final DatasetSpec VECTOR_CLOCK = GateFixtures.SPECS.get(2);

    private static Row row(String k, Long ver, long at, Long val, Map<String, Long> clock, Boolean gone) {
        return Row.of(GateFixtures.SCHEMA, k, ver, at, val, clock, gone);
    }

    private static Row lw(String k, long ver, long at, Long val) {
        return row(k, ver, at, val, null, null);
    }

    private static StreamGate.Builder<Row> gate(DatasetSpec spec) {
        return StreamGate.builder(spec, RecordAccess.rows(GateFixtures.SCHEMA));
    }

    /** Offers a record that is decided at once and returns its decision. */
    private static Decision<Row> only(StreamGate<Row> g, String p, long offset, Row r) {
        List<Decision<Row>> out = g.offer(p, offset, r);
        assertEquals(1, out.size(), out.toString());
        return out.get(0);
    }

    // ---- decisions follow the policy

    @Test
    void offer_lastWriterReasons() {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().build();
        Decision<Row> first = only(g, "p", 0, lw("a", 1, 10, 1L));
        assertEquals(Reason.NEW_KEY, first.reason());
        assertEquals(List.of(lw("a", 1, 10, 1L)), first.visible());
        assertEquals(Reason.NEWER_VERSION, only(g, "p", 1, lw("a", 2, 10, 2L)).reason());
        assertEquals(Reason.DUPLICATE, only(g, "p", 2, lw("a", 2, 10, 2L)).reason());
        assertEquals(Reason.SUPERSEDED, only(g, "p", 3, lw("a", 1, 10, 1L)).reason());
        // equal version, different content: the greater canonical bytes win (LastWriterPolicy's documented order)
        Decision<Row> high = only(g, "p", 4, lw("a", 2, 10, 9L));
        Decision<Row> low = only(g, "p", 5, lw("a", 2, 10, 0L));
        assertEquals(Reason.CONFLICT, high.reason());
        assertEquals(Reason.CONFLICT_LOST, low.reason());
        GateMetrics m = g.metrics();
        assertEquals(3, m.emitted(), "new key, newer version, conflict won");
        assertEquals(1, m.duplicates());
        assertEquals(1, m.superseded());
        assertEquals(1, m.conflictsLost());
    }

    @Test
    void offer_fieldWiseOlderRecordFillingAGapIsMerged() {
        StreamGate<Row> g = gate(FIELD_WISE).windowed().build();
        only(g, "p", 0, lw("a", 2, 10, null));
        Decision<Row> d = only(g, "p", 1, lw("a", 1, 30, 5L));
        assertEquals(Reason.MERGED, d.reason());
        // latest-non-null keeps the older 5, max keeps at 30, the rest follows version 2
        assertEquals(List.of(lw("a", 2, 30, 5L)), d.visible());
    }

    @Test
    void offer_vectorClockConcurrentVersionsAreSiblings() {
        StreamGate<Row> g = gate(VECTOR_CLOCK).windowed().build();
        only(g, "p", 0, row("a", null, 1, 1L, Map.of("w1", 1L), null));
        Decision<Row> d = only(g, "p", 1, row("a", null, 2, 2L, Map.of("w2", 1L), null));
        assertEquals(Reason.SIBLINGS, d.reason());
        assertEquals(2, d.visible().size());
        Decision<Row> joined = only(g, "p", 2, row("a", null, 3, 3L, Map.of("w1", 1L, "w2", 1L), null));
        assertEquals(Reason.NEWER_VERSION, joined.reason());
        assertEquals(1, joined.visible().size());
    }

    @Test
    void offer_tombstoneEmitsDeletedKey() {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().build();
        only(g, "p", 0, lw("a", 1, 10, 1L));
        Decision<Row> d = only(g, "p", 1, row("a", 2L, 10, null, null, true));
        assertTrue(d.isEmit());
        assertTrue(d.deleted());
        assertEquals(List.of(), d.visible());
    }

    @Test
    void offer_invalidRecordIsRejectedWithReasonAndItsOffsetIsDone() {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().build();
        Decision<Row> d = only(g, "p", 0, row("a", null, 1, 1L, null, null));
        assertEquals(Action.DROP, d.action());
        assertEquals(Reason.REJECTED, d.reason());
        assertNotNull(d.rejection());
        assertTrue(d.rejection().reason().contains("ver"), d.rejection().reason());
        assertEquals("p", d.rejection().source());
        assertEquals(OptionalLong.of(1), g.committableOffset("p"));
        assertEquals(1, g.metrics().rejected());
    }

    // ---- offsets

    @Test
    void offer_redeliveredOffsetIsDroppedAndCommitWaitsForAcknowledgement() {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().build();
        Decision<Row> a = only(g, "p", 0, lw("a", 1, 10, 1L));
        Decision<Row> b = only(g, "p", 1, lw("b", 1, 10, 1L));
        assertEquals(Reason.REDELIVERED, only(g, "p", 0, lw("a", 1, 10, 1L)).reason());
        g.acknowledge(b);
        assertEquals(OptionalLong.of(0), g.committableOffset("p"), "offset 0 is not acknowledged");
        g.acknowledgeAll(List.of(a, a));
        assertEquals(OptionalLong.of(2), g.committableOffset("p"));
        assertEquals(Map.of("p", 2L), g.committableOffsets());
        assertEquals(0L, g.metrics().toMap().get("commit_lag.p"));
    }

    // ---- window and store

    @Test
    void windowAge_windowedForgetsAndExactAsksTheStore() {
        AtomicLong clock = new AtomicLong();
        GateFixtures.ModelSink sink = new GateFixtures.ModelSink(LAST_WRITER);
        StreamGate<Row> windowed = gate(LAST_WRITER).windowed().windowAge(Duration.ofSeconds(10))
                .windowClock(clock::get).build();
        StreamGate<Row> exact = gate(LAST_WRITER).exact(sink).windowAge(Duration.ofSeconds(10))
                .windowClock(clock::get).build();
        for (StreamGate<Row> g : List.of(windowed, exact)) {
            Decision<Row> d = only(g, "p", 0, lw("a", 1, 10, 1L));
            if (g == exact) {
                sink.durablyStore(d);
            }
            g.acknowledge(d);
        }
        clock.addAndGet(TimeUnit.SECONDS.toNanos(11));
        assertEquals(Reason.NEW_KEY, only(windowed, "p", 1, lw("a", 1, 10, 1L)).reason());
        assertEquals(1, windowed.metrics().windowEvictions());
        assertEquals(Reason.DUPLICATE, only(exact, "p", 1, lw("a", 1, 10, 1L)).reason());
        assertEquals(1, exact.metrics().storeHits());
    }

    @Test
    void windowKeys_unacknowledgedStateOutlivesEviction() {
        StreamGate<Row> g = gate(LAST_WRITER).exact(key -> null).windowKeys(1).build();
        only(g, "p", 0, lw("a", 2, 10, 1L));
        for (int i = 0; i < 20; i++) {
            only(g, "p", 1 + i, lw("k" + i, 1, 10, 1L));
        }
        // the store knows nothing yet, but the emit of a is not acknowledged, so the gate still knows it
        assertEquals(Reason.SUPERSEDED, only(g, "p", 21, lw("a", 1, 10, 1L)).reason());
    }

    @Test
    void storeFailure_stopsTheGate() {
        StreamGate<Row> g = gate(LAST_WRITER).exact(key -> {
            throw new OnefoldException(OnefoldException.Kind.IO, "archive unreachable");
        }).build();
        assertThrows(OnefoldException.class, () -> g.offer("p", 0, lw("a", 1, 10, 1L)));
        OnefoldException e = assertThrows(OnefoldException.class, () -> g.offer("p", 1, lw("b", 1, 10, 1L)));
        assertTrue(e.getMessage().contains("archive unreachable"), e.getMessage());
        assertEquals(OptionalLong.of(0), g.committableOffset("p"), "nothing past the failed record is committable");
    }

    // ---- bounds

    @Test
    void awaitingAckBound_blocksUntilAnotherThreadAcknowledges() throws Exception {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().maxAwaitingAck(1, 1 << 20).build();
        Decision<Row> first = only(g, "p", 0, lw("a", 1, 10, 1L));
        CompletableFuture<List<Decision<Row>>> second = CompletableFuture.supplyAsync(() -> g.offer("p", 1, lw("b", 1, 10, 1L)));
        Thread.sleep(100);
        assertFalse(second.isDone(), "offer waits while the bound is full");
        g.acknowledge(first);
        assertEquals(Reason.NEW_KEY, second.get(10, TimeUnit.SECONDS).get(0).reason());
    }

    @Test
    void awaitingAckBound_timeoutRefusesTheRecordWhichCanBeOfferedAgain() {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().maxAwaitingAck(1, 1 << 20)
                .blockTimeout(Duration.ofMillis(50)).build();
        Decision<Row> first = only(g, "p", 0, lw("a", 1, 10, 1L));
        OnefoldException e = assertThrows(OnefoldException.class, () -> g.offer("p", 1, lw("b", 1, 10, 1L)));
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
        g.acknowledge(first);
        assertEquals(Reason.NEW_KEY, only(g, "p", 1, lw("b", 1, 10, 1L)).reason());
    }

    @Test
    void heldBound_releaseEarlyKeepsEventTimeOrderAndCounts() {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().reorder("at", 1000)
                .maxHeld(2, 1 << 20, StreamGate.WhenFull.RELEASE_EARLY).build();
        assertEquals(Action.HOLD, only(g, "p", 0, lw("a", 1, 30, 1L)).action());
        assertEquals(Action.HOLD, only(g, "p", 1, lw("b", 1, 20, 1L)).action());
        List<Decision<Row>> out = g.offer("p", 2, lw("c", 1, 40, 1L));
        assertEquals(2, out.size(), out.toString());
        assertTrue(out.get(0).releasedEarly());
        assertEquals("b", out.get(0).record().get("k"), "earliest event time first");
        assertEquals(Action.HOLD, out.get(1).action());
        assertEquals(1, g.metrics().releasedEarly());
        assertEquals(2, g.metrics().held());
    }

    @Test
    void heldBound_blockWaitsForAnotherThreadsRelease() throws Exception {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().reorder("at", 1000)
                .maxHeld(1, 1 << 20, StreamGate.WhenFull.BLOCK).build();
        only(g, "p", 0, lw("a", 1, 30, 1L));
        CompletableFuture<List<Decision<Row>>> second = CompletableFuture.supplyAsync(() -> g.offer("q", 0, lw("b", 1, 20, 1L)));
        Thread.sleep(100);
        assertFalse(second.isDone());
        assertEquals(1, g.flush().size());
        Decision<Row> b = second.get(10, TimeUnit.SECONDS).get(0);
        assertTrue(b.isEmit());
        assertTrue(b.late(), "b arrives behind the flushed a");
    }

    // ---- reordering

    @Test
    void reorder_releasesByWatermarkAndFlagsLateRecords() {
        StreamGate<Row> g = gate(LAST_WRITER).windowed().reorder("at", 10).build();
        assertEquals(Action.HOLD, only(g, "p", 0, lw("a", 1, 100, 1L)).action());
        assertEquals(Action.HOLD, only(g, "p", 1, lw("b", 1, 95, 1L)).action());
        List<Decision<Row>> out = g.offer("p", 2, lw("c", 1, 120, 1L)); // watermark 110 passes 95 and 100
        assertEquals(List.of("b", "a"), out.subList(0, 2).stream().map(d -> d.record().get("k")).toList());
        assertEquals(Action.HOLD, out.get(2).action());
        Decision<Row> late = only(g, "p", 3, lw("d", 1, 50, 1L));
        assertTrue(late.late());
        assertTrue(late.isEmit(), "late records are still merged and emitted");
        assertEquals(1, g.metrics().late());
        g.acknowledgeAll(out);
        g.acknowledge(late);
        assertEquals(OptionalLong.of(2), g.committableOffset("p"), "offset 2 is held");
    }

    // ---- builder

    @Test
    void build_withoutModeOrWithBadReorderFieldFails() {
        assertThrows(OnefoldException.class, () -> gate(LAST_WRITER).build());
        OnefoldException e = assertThrows(OnefoldException.class, () -> gate(LAST_WRITER).windowed().reorder("k", 5).build());
        assertTrue(e.getMessage().contains("'k'"), e.getMessage());
        assertThrows(OnefoldException.class, () -> gate(LAST_WRITER).windowed().reorder("nope", 5).build());
        assertThrows(OnefoldException.class, () -> gate(LAST_WRITER).maxHeld(0, 4096, StreamGate.WhenFull.BLOCK));
    }
}
