package dev.onefold.benchmarks.spill;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.BatchReport;
import dev.onefold.benchmarks.batch.Workload;
import dev.onefold.record.Row;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Sanity of question 6 on small data: the spilled and in-memory runs give checked, equal answers. */
class SpillBenchmarkTest {
    static final Workload SMALL = Workload.of(24_000);

    @Test
    void dedupe_spillsAtTenTimesTheBudgetAndCleansUp(@TempDir Path spill) throws IOException {
        BatchReport r = SpillBenchmark.dedupe(SMALL, 128 << 10, spill);
        SpillBenchmark.requireTenTimesBudget(r);
        assertEquals(SMALL.keys(), r.out());
        assertEquals(SMALL.records() - SMALL.keys(), r.superseded());
        try (Stream<Path> left = Files.list(spill)) {
            assertEquals(List.of(), left.toList(), "spill files removed");
        }
    }

    @Test
    void dedupe_inMemoryDoesNotSpill(@TempDir Path spill) {
        BatchReport r = SpillBenchmark.dedupe(SMALL, 1L << 30, spill);
        assertEquals(0, r.spilledRuns());
        assertEquals(SMALL.keys(), r.out());
        assertThrows(IllegalStateException.class, () -> SpillBenchmark.requireTenTimesBudget(r));
    }

    @Test
    void benchmarkMethods_inMemoryDoesNotSpillAndSpilledSpillsTenTimesTheBudget() throws IOException {
        SpillBenchmark bench = new SpillBenchmark();
        // ten times SMALL at eight times the budget of the test above: still at least 10x the budget
        bench.records = 240_000;
        bench.budgetMiB = 1;
        bench.setUp();
        try {
            SpillBenchmark.Runs runs = new SpillBenchmark.Runs();
            long keys = Workload.of(bench.records).keys();
            assertEquals(keys, bench.inMemory(runs));
            assertEquals(0, runs.spilledRuns);
            runs.reset();
            assertEquals(keys, bench.spilled(runs));
            assertTrue(runs.spilledRuns >= 20, "spilled " + runs.spilledRuns + " runs");
        } finally {
            bench.tearDown();
        }
    }

    @Test
    void orderCheck_rejectsRepeatsWrongWinnersAndMissingKeys() {
        List<Row> rows = Workload.of(12).rows();
        Workload w = Workload.of(12);
        OrderCheck repeated = new OrderCheck(w);
        Row first = rows.stream().filter(r -> {
            int k = Workload.keyIndex((String) r.get("device"), (Integer) r.get("reading_no"));
            return (Long) r.get("seq") == w.expectedLastWriterSeq(k);
        }).findFirst().orElseThrow();
        repeated.accept(first);
        assertThrows(IllegalStateException.class, () -> repeated.accept(first), "a key twice is out of order");

        OrderCheck incomplete = new OrderCheck(w);
        incomplete.accept(first);
        assertThrows(IllegalStateException.class, incomplete::requireComplete);

        Row loser = first.with("seq", (Long) first.get("seq") - 100);
        assertThrows(IllegalStateException.class, () -> new OrderCheck(w).accept(loser));
        assertTrue(w.keys() > 1);
    }
}
