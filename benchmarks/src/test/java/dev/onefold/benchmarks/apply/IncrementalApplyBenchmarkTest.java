package dev.onefold.benchmarks.apply;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.archive.ApplyReport;
import dev.onefold.archive.Archive;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
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
}
