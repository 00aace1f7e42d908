package dev.onefold.benchmarks.apply;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.archive.ApplyReport;
import dev.onefold.archive.Archive;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Both sides of benchmark question 2 compute the same archive, and the batch has the shape the question states. */
class IncrementalApplyBenchmarkTest {
    /** 85 hours of 200 records: the smallest history the workload accepts, at a small hourly rate. */
    private final ApplyWorkload workload = new ApplyWorkload(85 * 200, 200);

    @Test
    void batch_touchesThreeRecentAndFortyLateHours() {
        List<Integer> hours = workload.touchedHours();
        assertEquals(43, hours.size());
        assertEquals(43, hours.stream().distinct().count());
        assertEquals(List.of(83, 84, 85), hours.subList(0, 3), "two stored recent hours and the next, new one");
        assertEquals(ApplyWorkload.BATCH, workload.batch().size());
    }

    @Test
    void onefoldApply_equalsHandWrittenFullRecompute(@TempDir Path dir) {
        Archive<Row> archive = Archive.builder(ApplyWorkload.spec(true), RecordAccess.rows(ApplyWorkload.SCHEMA))
                .directory(dir.resolve("archive")).spillDirectory(dir).open();
        IncrementalApplyBenchmark.applyHistory(archive, workload);
        FullRecompute.write(workload.history(0, workload.hours()), dir.resolve("stored"));
        List<Row> batch = workload.batch();

        ApplyReport report = archive.apply(batch);
        long written = FullRecompute.apply(dir.resolve("stored"), batch, dir.resolve("output"));

        assertEquals(43, report.partitionsTouched());
        assertTrue(report.batch().duplicates() > 0, "the batch carries redelivered records");
        List<FullRecompute.Event> expected = new ArrayList<>();
        FullRecompute.read(dir.resolve("output"), expected::add);
        List<FullRecompute.Event> actual;
        try (Stream<Row> rows = archive.snapshot().rows()) {
            actual = rows.map(FullRecompute.Event::of).toList();
        }
        assertEquals(written, expected.size());
        assertEquals(expected, actual, "same records in the same order");
        assertTrue(archive.verify().ok());
    }

    @Test
    void benchmarkMethods_applyAndRecomputeThenResetToTheBuiltArchive() throws IOException {
        IncrementalApplyBenchmark bench = new IncrementalApplyBenchmark();
        IncrementalApplyBenchmark.OnefoldArchive onefold = new IncrementalApplyBenchmark.OnefoldArchive();
        IncrementalApplyBenchmark.HandWrittenArchive hand = new IncrementalApplyBenchmark.HandWrittenArchive();
        for (IncrementalApplyBenchmark.Workload w : List.of(onefold, hand)) {
            w.archiveRecords = 85 * 200;
            w.perHour = 200;
        }
        onefold.stablePartitions = true;
        try {
            onefold.build();
            hand.build();
            long built = onefold.archive.snapshot().version();
            for (int call = 0; call < 2; call++) {
                assertEquals(43, bench.onefoldApply(onefold).partitionsTouched(), "call " + call);
                onefold.reset();
                assertEquals(built, onefold.archive.snapshot().version(), "reset restores the built version");
                long written = bench.handWrittenFullRecompute(hand);
                assertTrue(written > 85 * 200, "the recompute writes the whole history plus the batch's new keys");
                hand.reset();
            }
        } finally {
            onefold.delete();
            hand.delete();
        }
        assertTrue(!Files.exists(onefold.root) && !Files.exists(hand.root), "both directories deleted");
    }
}
