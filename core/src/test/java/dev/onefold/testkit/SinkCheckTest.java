package dev.onefold.testkit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.BatchEngine;
import dev.onefold.OnefoldException;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.ArrayList;
import java.util.Collection;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import org.junit.jupiter.api.Test;

class SinkCheckTest {
    /** Tries allowed to catch a broken sink; the seeds are fixed, so the count each needs is fixed too. */
    static final int TRIES = 50;
    static final RecordGenerator<Row> RECORDS = random -> Items.generate(random, 40, 6);

    // ---- expected state

    @Property(tries = 300)
    void expectedState_matchesHandWrittenLastWriterModel(@ForAll long seed) {
        Random random = new Random(seed);
        List<Row> rows = Items.generate(random, 60, 8);
        Schedule<Row> schedule = Schedule.generate(rows, ScheduleSettings.defaults(), seed);
        List<Row> delivered = new ArrayList<>();
        ScheduleTest.deliveries(schedule).forEach(d -> delivered.addAll(d.records()));
        // The model: highest version per key wins, a winning delete hides the key, survivors sorted by the order
        // field then the key (DESIGN.md, promise 1 and the spec's order rule); written independently of the engine.
        Map<String, Row> newest = new HashMap<>();
        for (Row r : delivered) {
            newest.merge(Items.id(r), r, (a, b) -> Items.version(b) > Items.version(a) ? b : a);
        }
        List<Row> model = newest.values().stream().filter(r -> !Items.deleted(r))
                .sorted(Comparator.comparing((Row r) -> (Long) r.get("amount")).thenComparing(Items::id)).toList();
        assertEquals(model, check(MemorySinks.Upserting::new).expectedState(delivered));
    }

    @Test
    void expectedState_isTheBatchEngineResult() {
        List<Row> rows = Items.generate(new Random(5), 60, 8);
        assertEquals(BatchEngine.forRows(Items.SPEC, Items.SCHEMA).dedupe(rows).survivors(),
                check(MemorySinks.Upserting::new).expectedState(rows));
    }

    @Test
    void expectedState_invalidRecord_throwsUsageNamingIt() {
        RowSchema other = RowSchema.builder("other").field("id", FieldType.string()).build();
        SinkCheck<Row> check = check(MemorySinks.Upserting::new);
        List<Row> rows = List.of(Row.of(Items.SCHEMA, "a", 1L, 2L, null), Row.of(other, "b"));
        OnefoldException e = assertThrows(OnefoldException.class, () -> check.expectedState(rows));
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
        assertTrue(e.getMessage().contains("record 1"), e.getMessage());
    }

    // ---- a correct sink passes

    @Test
    void verifySeeds_correctSinkConverges() {
        check(MemorySinks.Upserting::new).verifySeeds(RECORDS, ScheduleSettings.defaults(), 0, 300);
    }

    @Property(tries = 200)
    void run_correctSinkConvergesUnderHostileSettings(@ForAll long seed) {
        ScheduleSettings hostile = new ScheduleSettings(4, 0.5, 8, 16, 3);
        Schedule<Row> s = Schedule.generate(Items.generate(new Random(seed), 40, 6), hostile, seed);
        assertTrue(check(MemorySinks.Upserting::new).run(s).isEmpty());
    }

    // ---- broken sinks are caught within a bounded number of tries

    @Test
    void verifySeeds_sinkIgnoringVersions_reportsOlderVersionKept() {
        Divergence<?> d = caught(MemorySinks.IgnoringVersions::new);
        assertTrue(d.differences().stream().anyMatch(k -> !k.hasExtraRecords()), d.report());
    }

    @Test
    void verifySeeds_appendingSink_reportsExtraRecordsForAKey() {
        Divergence<?> d = caught(MemorySinks.Appending::new);
        assertTrue(d.differences().stream().anyMatch(KeyDifference::hasExtraRecords), d.report());
    }

    @Test
    void verifySeeds_sinkLosingBatchOnRestart_reportsRestartAndMissingState() {
        Divergence<?> d = caught(MemorySinks.LosingBatchOnRestart::new);
        assertTrue(d.involvesRestart(), d.report());
    }

    // ---- the failure report

    @Test
    void verifySeeds_failure_isShrunkToAFailingScheduleNoLongerThanTheOriginal() {
        Divergence<?> d = caught(MemorySinks.Appending::new);
        assertTrue(d.smallestSteps().size() <= d.schedule().steps().size());
        int entries = d.smallestSteps().stream().mapToInt(s -> s instanceof Step.Delivery<?> del ? del.entries().size() : 0).sum();
        // An appending sink fails once one key's record arrives twice: two entries suffice, and greedy shrinking
        // of single entries must reach that.
        assertEquals(2, entries, d.report());
    }

    @Test
    void verifySeeds_failure_reportNamesSeedKeysAndRecords() {
        Divergence<?> d = caught(MemorySinks.IgnoringVersions::new);
        String report = d.report();
        KeyDifference<?> first = d.differences().get(0);
        assertTrue(report.contains("seed " + d.schedule().seed()), report);
        assertTrue(report.contains("smallest failing schedule found"), report);
        assertTrue(report.contains("keys whose state differs"), report);
        assertTrue(report.contains("key " + first.key()), report);
        assertTrue(report.contains("expected " + first.expected()) && report.contains("actual   " + first.actual()), report);
    }

    @Test
    void verifySeeds_sinkThrows_reportsTheExceptionAsCause() {
        IllegalStateException boom = new IllegalStateException("disk full");
        SinkCheck<Row> check = check(() -> new MemorySinks.Upserting() {
            @Override
            public void apply(Step.Delivery<Row> delivery) {
                throw boom;
            }
        });
        SinkDivergedError e = assertThrows(SinkDivergedError.class,
                () -> check.verifySeeds(RECORDS, ScheduleSettings.defaults(), 0, 1));
        assertEquals(boom, e.getCause());
        assertTrue(e.getMessage().contains("disk full"), e.getMessage());
        assertEquals(1, e.divergence().smallestSteps().size(), "shrinks to one delivery");
    }

    @Test
    void run_sinkReadsBackForeignRecords_reportsTheMismatch() {
        RowSchema other = RowSchema.builder("other").field("id", FieldType.string()).build();
        SinkCheck<Row> check = check(() -> new MemorySinks.Upserting() {
            @Override
            public Collection<Row> readState() {
                return List.of(Row.of(other, "x"));
            }
        });
        Divergence<Row> d = check.run(Schedule.generate(Items.generate(new Random(1), 5, 2), ScheduleSettings.defaults(), 1))
                .orElseThrow();
        assertInstanceOf(OnefoldException.class, d.error());
        assertTrue(d.error().getMessage().contains("does not fit the dataset"), d.error().getMessage());
    }

    @Test
    void withShrinkBudget_zero_reportsTheWholeSchedule() {
        SinkCheck<Row> check = check(MemorySinks.Appending::new).withShrinkBudget(0);
        SinkDivergedError e = assertThrows(SinkDivergedError.class,
                () -> check.verifySeeds(RECORDS, ScheduleSettings.defaults(), 0, TRIES));
        assertEquals(e.divergence().schedule().steps(), e.divergence().smallestSteps());
    }

    // ---- helpers

    private static SinkCheck<Row> check(SinkFactory<Row> sinks) {
        return SinkCheck.forRows(Items.SPEC, Items.SCHEMA, sinks);
    }

    private static Divergence<?> caught(SinkFactory<Row> sinks) {
        SinkDivergedError e = assertThrows(SinkDivergedError.class,
                () -> check(sinks).verifySeeds(RECORDS, ScheduleSettings.defaults(), 0, TRIES));
        assertTrue(e.divergence().error() == null, e.getMessage());
        assertTrue(!e.divergence().differences().isEmpty(), e.getMessage());
        return e.divergence();
    }
}
