package dev.onefold.archive;

import static dev.onefold.archive.ArchiveFixtures.DAY0;
import static dev.onefold.archive.ArchiveFixtures.HOUR;
import static dev.onefold.archive.ArchiveFixtures.event;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.record.Row;
import dev.onefold.OnefoldException;
import dev.onefold.internal.archive.MemoryStorage;
import dev.onefold.spi.PayloadCodec;
import dev.onefold.spi.Storage;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

class ArchiveApplyTest {
    private final DatasetSpec lww = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false);

    // --- apply and read

    @Test
    void apply_singleBatchReadsBackDeduplicatedAndOrdered() {
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).open();
        Row x1 = event("x", 1, DAY0 + 2 * HOUR, 10L, false);
        Row x2 = event("x", 2, DAY0 + 2 * HOUR + 5, 20L, false);
        Row y1 = event("y", 1, DAY0 + HOUR, 30L, false);
        ApplyReport r = a.apply(List.of(x1, y1, x2, x1));
        assertEquals(1, r.version());
        assertEquals(4, r.batch().in());
        assertEquals(1, r.batch().duplicates());
        assertEquals(2, r.partitionsTouched());
        assertEquals(List.of(y1, x2), ArchiveFixtures.rows(a));
        assertEquals(List.of(x2), a.snapshot().lookup(event("x", 0, 0, null, false)));
        assertEquals(List.of(), a.snapshot().lookup(event("z", 0, 0, null, false)));
        assertTrue(a.verify().ok(), () -> a.verify().problems().toString());
    }

    @Test
    void apply_sameBatchAgainPublishesNoVersion() {
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).open();
        List<Row> batch = ArchiveFixtures.randomEvents(new Random(1), 300, 50, 5);
        a.apply(batch);
        ApplyReport again = a.apply(batch);
        assertEquals(1, again.version());
        assertEquals(0, again.partitionsTouched());
        assertEquals(List.of(1L), a.versions());
    }

    @Test
    void apply_keyMovesToItsNewPartition() {
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).open();
        a.apply(List.of(event("x", 1, DAY0, 1L, false), event("y", 1, DAY0, 2L, false)));
        ApplyReport r = a.apply(List.of(event("x", 2, DAY0 + 5 * HOUR, 3L, false)));
        assertEquals(1, r.keysMoved());
        assertEquals(2, r.partitionsTouched());
        List<PartitionInfo> parts = a.snapshot().partitions();
        assertEquals(List.of(List.of("2024-02-29T00"), List.of("2024-02-29T05")),
                parts.stream().map(PartitionInfo::values).toList());
        assertEquals(List.of(1L, 1L), parts.stream().map(PartitionInfo::entries).toList());
        assertTrue(a.verify().ok(), () -> a.verify().problems().toString());
    }

    @Test
    void apply_lateOlderVersionDoesNotMoveOrReviveKey() {
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).open();
        Row newest = event("x", 5, DAY0 + 3 * HOUR, 1L, false);
        a.apply(List.of(newest));
        a.apply(List.of(event("x", 1, DAY0, 9L, false)));
        assertEquals(List.of(newest), ArchiveFixtures.rows(a));
        assertEquals(1, a.snapshot().partitions().size());
    }

    @Test
    void apply_tombstonesDroppedPastHorizonOnlyWhenPartitionRewritten() {
        java.util.concurrent.atomic.AtomicLong now = new java.util.concurrent.atomic.AtomicLong(DAY0);
        java.time.Clock clock = new java.time.Clock() {
            @Override
            public java.time.ZoneId getZone() {
                return java.time.ZoneOffset.UTC;
            }

            @Override
            public java.time.Clock withZone(java.time.ZoneId zone) {
                return this;
            }

            @Override
            public java.time.Instant instant() {
                return java.time.Instant.ofEpochMilli(now.get());
            }
        };
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).clock(clock)
                .tombstoneHorizon(Duration.ofDays(1)).open();
        a.apply(List.of(event("x", 1, DAY0, 1L, false), event("y", 1, DAY0, 1L, false),
                event("z", 1, DAY0 + HOUR, 1L, false)));
        ApplyReport del = a.apply(List.of(event("x", 2, DAY0, null, true), event("z", 2, DAY0 + HOUR, null, true)));
        assertEquals(0, del.tombstonesDropped(), "a fresh tombstone is younger than the horizon");
        now.addAndGet(2 * 86_400_000L);
        ApplyReport later = a.apply(List.of(event("y", 2, DAY0, 2L, false)));
        assertEquals(1, later.tombstonesDropped(), "only the rewritten partition drops its old tombstone");
        List<PartitionInfo> parts = a.snapshot().partitions();
        assertEquals(List.of(0L, 1L), parts.stream().map(PartitionInfo::tombstones).toList());
        assertEquals(List.of(1L, 1L), parts.stream().map(PartitionInfo::entries).toList());
    }

    // --- large partitions and parallelism

    @Test
    void apply_partitionLargerThanMemoryBudgetStreamsThroughManyChunks() {
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).memoryBudgetBytes(64 << 10).open();
        List<Row> all = new ArrayList<>();
        Random r = new Random(7);
        for (int b = 0; b < 3; b++) {
            List<Row> batch = new ArrayList<>();
            for (int i = 0; i < 4000; i++) {
                batch.add(event("k" + r.nextInt(6000), r.nextInt(50), DAY0 + r.nextInt(1000), (long) i, false));
            }
            all.addAll(batch);
            a.apply(batch);
        }
        PartitionInfo p = a.snapshot().partitions().get(0);
        assertTrue(p.chunkFiles() > 10, "expected many chunk files, got " + p.chunkFiles());
        assertEquals(ArchiveFixtures.model(lww, all), ArchiveFixtures.rows(a));
        assertTrue(a.verify().ok(), () -> a.verify().problems().toString());
    }

    @Test
    void apply_parallelRewritesEqualSerial() {
        List<Row> batch = ArchiveFixtures.randomEvents(new Random(3), 2000, 500, 24);
        Archive<Row> serial = ArchiveFixtures.builder(lww, Storage.inMemory()).parallelism(1).open();
        Archive<Row> parallel = ArchiveFixtures.builder(lww, Storage.inMemory()).parallelism(4).open();
        serial.apply(batch);
        parallel.apply(batch);
        assertEquals(ArchiveFixtures.rows(serial), ArchiveFixtures.rows(parallel));
        assertEquals(serial.snapshot().partitions().stream().map(p -> p.digest()).toList(),
                parallel.snapshot().partitions().stream().map(p -> p.digest()).toList());
    }

    // --- versions, codecs, cleanup

    @Test
    void snapshot_olderVersionStaysReadableAfterNewCommits() {
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).open();
        Row v1 = event("x", 1, DAY0, 1L, false);
        a.apply(List.of(v1));
        a.apply(List.of(event("x", 2, DAY0, 2L, false)));
        try (var s = a.snapshot(1).rows()) {
            assertEquals(List.of(v1), s.toList());
        }
        assertEquals(List.of(1L, 2L), a.versions());
    }

    @Test
    void apply_chunksOfAnOlderWriterIdAreReadThroughTheCodecAndRewritten() {
        Storage storage = Storage.inMemory();
        Archive<Row> v1 = ArchiveFixtures.builder(lww, storage).open();
        List<Row> first = ArchiveFixtures.randomEvents(new Random(4), 200, 80, 3);
        v1.apply(first);
        PayloadCodec canonical = PayloadCodec.canonical(ArchiveFixtures.EVENT);
        List<String> idsRead = new java.util.concurrent.CopyOnWriteArrayList<>();
        PayloadCodec evolved = new PayloadCodec() {
            @Override
            public String writerId() {
                return "evolved-2";
            }

            @Override
            public byte[] encode(Row row) {
                return canonical.encode(row);
            }

            @Override
            public Row decode(String writerId, byte[] bytes) {
                idsRead.add(writerId);
                return canonical.decode(writerId.equals("evolved-2") ? canonical.writerId() : writerId, bytes);
            }
        };
        Archive<Row> v2 = ArchiveFixtures.builder(lww, storage).codec(evolved).open();
        List<Row> second = ArchiveFixtures.randomEvents(new Random(5), 50, 80, 1);
        v2.apply(second);
        assertTrue(idsRead.contains(canonical.writerId()));
        List<Row> all = new ArrayList<>(first);
        all.addAll(second);
        assertEquals(ArchiveFixtures.model(lww, all), ArchiveFixtures.rows(v2));
        assertTrue(v2.verify().ok(), () -> v2.verify().problems().toString());
        OnefoldException e = assertThrows(OnefoldException.class, () -> ArchiveFixtures.rows(v1));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
    }

    @Test
    void sweep_deletesOrphansAndExpiredVersionsButKeepsLatestContent() {
        MemoryStorage memory = new MemoryStorage(java.time.Clock.offset(ArchiveFixtures.FIXED, Duration.ofHours(-2)));
        Archive<Row> a = ArchiveFixtures.builder(lww, memory).open();
        for (int i = 0; i < 4; i++) {
            a.apply(ArchiveFixtures.randomEvents(new Random(20 + i), 100, 60, 3));
        }
        memory.write("chunks/=2024-02-29T00/orphan-of-a-crashed-writer.chunk", new byte[] {1, 2, 3});
        List<Row> before = ArchiveFixtures.rows(a);
        SweepReport r = a.sweep(SweepRules.defaults());
        assertEquals(List.of(1L, 2L), r.expiredVersions());
        assertTrue(r.deletedFiles().contains("chunks/=2024-02-29T00/orphan-of-a-crashed-writer.chunk"));
        assertEquals(before, ArchiveFixtures.rows(a));
        assertEquals(List.of(3L, 4L), a.versions());
        assertTrue(a.verify().ok(), () -> a.verify().problems().toString());
        try (var s = a.snapshot(3).rows()) {
            assertTrue(s.count() > 0);
        }
        assertEquals(OnefoldException.Kind.USAGE, assertThrows(OnefoldException.class, () -> a.snapshot(1)).kind());
    }
}
