package dev.onefold.archive;

import static dev.onefold.archive.ArchiveFixtures.DAY0;
import static dev.onefold.archive.ArchiveFixtures.HOUR;
import static dev.onefold.archive.ArchiveFixtures.event;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.record.Row;
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
        Archive<Row> a = ArchiveFixtures.builder(lww, Storage.inMemory()).tombstoneHorizon(Duration.ZERO).open();
        a.apply(List.of(event("x", 1, DAY0, 1L, false), event("y", 1, DAY0, 1L, false)));
        ApplyReport del = a.apply(List.of(event("x", 2, DAY0, null, true)));
        assertEquals(0, del.tombstonesDropped(), "a fresh tombstone is not older than the horizon");
        assertEquals(1, a.snapshot().partitions().get(0).tombstones());
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
}
