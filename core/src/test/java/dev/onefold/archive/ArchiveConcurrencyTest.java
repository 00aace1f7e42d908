package dev.onefold.archive;

import static dev.onefold.archive.ArchiveFixtures.DAY0;
import static dev.onefold.archive.ArchiveFixtures.HOUR;
import static dev.onefold.archive.ArchiveFixtures.event;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.record.Row;
import dev.onefold.spi.Storage;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Concurrent writers: no lost update, content equals the serial union; and the split plan/rewrite/commit API. */
class ArchiveConcurrencyTest {
    private final DatasetSpec spec = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false);

    private static List<List<Row>> batches(int writers, int perWriter) {
        List<List<Row>> out = new ArrayList<>();
        for (int i = 0; i < writers * perWriter; i++) {
            out.add(ArchiveFixtures.randomEvents(new Random(500 + i), 80, 60, 5));
        }
        return out;
    }

    private void concurrentWritersEqualSerial(Storage storage, boolean oneArchivePerWriter) throws Exception {
        int writers = 4;
        List<List<Row>> batches = batches(writers, 3);
        Archive<Row> shared = ArchiveFixtures.builder(spec, storage).maxCommitAttempts(50).open();
        ExecutorService pool = Executors.newFixedThreadPool(writers);
        try {
            List<Future<?>> futures = new ArrayList<>();
            for (int w = 0; w < writers; w++) {
                int writer = w;
                futures.add(pool.submit(() -> {
                    Archive<Row> mine = oneArchivePerWriter
                            ? ArchiveFixtures.builder(spec, storage).maxCommitAttempts(50).open() : shared;
                    for (int b = writer; b < batches.size(); b += writers) {
                        mine.apply(batches.get(b));
                    }
                    return null;
                }));
            }
            for (Future<?> f : futures) {
                f.get();
            }
        } finally {
            pool.shutdownNow();
        }
        List<Row> union = new ArrayList<>();
        batches.forEach(union::addAll);
        assertEquals(ArchiveFixtures.model(spec, union), ArchiveFixtures.rows(shared));
        assertTrue(shared.verify().ok(), () -> shared.verify().problems().toString());
    }

    @Test
    void apply_concurrentThreadsOnOneArchiveLoseNoUpdate() throws Exception {
        concurrentWritersEqualSerial(Storage.inMemory(), false);
    }

    @Test
    void apply_concurrentWritersOnLocalDirectoryLoseNoUpdate(@TempDir Path dir) throws Exception {
        concurrentWritersEqualSerial(Storage.local(dir), true);
    }

    // --- separate workers and one committer

    @Test
    void commit_resultsOfSeparateWorkersEqualOneApply() throws Exception {
        Storage storage = Storage.inMemory();
        Archive<Row> coordinator = ArchiveFixtures.builder(spec, storage).open();
        coordinator.apply(ArchiveFixtures.randomEvents(new Random(1), 300, 100, 6));
        List<Row> batch = ArchiveFixtures.randomEvents(new Random(2), 300, 150, 8);
        ApplyPlan plan = coordinator.plan(batch);
        assertTrue(plan.tasks().size() > 2);
        ExecutorService pool = Executors.newFixedThreadPool(3);
        List<PartitionResult> results = new ArrayList<>();
        try {
            List<Future<byte[]>> sent = new ArrayList<>();
            for (PartitionTask t : plan.tasks()) {
                byte[] wire = t.toBytes();
                // each worker opens its own archive object, as a separate process would
                sent.add(pool.submit(() -> ArchiveFixtures.builder(spec, storage).open()
                        .rewrite(PartitionTask.fromBytes(wire)).toBytes()));
            }
            for (Future<byte[]> f : sent) {
                results.add(PartitionResult.fromBytes(f.get()));
            }
        } finally {
            pool.shutdownNow();
        }
        ApplyReport r = coordinator.commit(plan, results);
        assertEquals(2, r.version());

        Archive<Row> direct = ArchiveFixtures.builder(spec, Storage.inMemory()).open();
        direct.apply(ArchiveFixtures.randomEvents(new Random(1), 300, 100, 6));
        direct.apply(batch);
        assertEquals(ArchiveConvergenceProperties.entries(direct), ArchiveConvergenceProperties.entries(coordinator));
    }

    @Test
    void commit_rebasesOverOtherPartitionsAndRefusesSamePartition() {
        DatasetSpec stable = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, true);
        Archive<Row> a = ArchiveFixtures.builder(stable, Storage.inMemory()).open();
        a.apply(List.of(event("x", 1, DAY0, 1L, false), event("y", 1, DAY0 + HOUR, 1L, false)));
        ApplyPlan plan = a.plan(List.of(event("x", 2, DAY0, 2L, false)));
        a.apply(List.of(event("y", 2, DAY0 + HOUR, 2L, false))); // another writer, another partition
        List<PartitionResult> results = plan.tasks().stream().map(a::rewrite).toList();
        ApplyReport r = a.commit(plan, results);
        assertEquals(3, r.version());
        assertEquals(List.of(event("x", 2, DAY0, 2L, false), event("y", 2, DAY0 + HOUR, 2L, false)), ArchiveFixtures.rows(a));

        ApplyPlan stale = a.plan(List.of(event("x", 3, DAY0, 3L, false)));
        a.apply(List.of(event("z", 1, DAY0 + 1, 1L, false))); // same partition as the plan's
        List<PartitionResult> staleResults = stale.tasks().stream().map(a::rewrite).toList();
        OnefoldException e = assertThrows(OnefoldException.class, () -> a.commit(stale, staleResults));
        assertEquals(OnefoldException.Kind.CONCURRENT_COMMIT, e.kind());
        assertEquals(OnefoldException.Kind.USAGE,
                assertThrows(OnefoldException.class, () -> a.commit(stale, List.of())).kind());
    }
}
