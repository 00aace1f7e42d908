package dev.onefold.benchmarks.batch;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.record.Row;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.EnumSet;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

/**
 * Sanity of question 1 on tiny data (STYLE.md item 18): every benchmark method computes the right answer, the
 * peers agree, and a wrong answer fails loudly. The expected answers come from the generator's known winners,
 * not from any peer.
 */
class BatchDedupeBenchmarkTest {
    static final Workload TINY = Workload.of(2_400);

    // ---- the workload itself

    @Test
    void workload_hasTwentyPercentExtraVersionsOfEveryRelation() {
        assertEquals(2_000, TINY.keys());
        Set<Reading.Key> keys = new HashSet<>();
        for (Reading r : TINY.readings()) {
            keys.add(r.key());
        }
        assertEquals(2_000, keys.size(), "2,400 records over 2,000 keys: 20% extra versions");
        Set<Workload.Relation> seen = EnumSet.noneOf(Workload.Relation.class);
        for (int k = 0; k < TINY.keys(); k++) {
            if (TINY.hasExtra(k)) {
                seen.add(Workload.relation(k));
            }
        }
        assertEquals(EnumSet.allOf(Workload.Relation.class), seen, "newer, older and concurrent versions all occur");
    }

    @Test
    void workload_deliveryIsAPermutation() {
        Set<Reading> distinct = new HashSet<>(TINY.readings());
        assertEquals(TINY.records(), distinct.size());
        assertEquals(Workload.keyIndex("d0000123", 5), 123 * 8 + 5);
    }

    // ---- the answers, checked against the generator's known winners

    @ParameterizedTest
    @EnumSource(MergeCase.class)
    void handWritten_matchesKnownWinnersInOrder(MergeCase policy) {
        List<Reading> out = HandWrittenDedupe.dedupe(policy, TINY.readings());
        assertEquals(TINY.keys(), out.size());
        for (int i = 1; i < out.size(); i++) {
            assertTrue(HandWrittenDedupe.ORDER.compare(out.get(i - 1), out.get(i)) < 0, "strictly ordered at " + i);
        }
        for (Reading r : out) {
            assertEquals(expected(policy, Workload.keyIndex(r.device(), r.readingNo())), r);
        }
    }

    /** What each policy must output for key k, derived from the two versions the generator made. */
    static Reading expected(MergeCase policy, int k) {
        Reading first = TINY.version(k, false);
        if (!TINY.hasExtra(k)) {
            return first;
        }
        Reading extra = TINY.version(k, true);
        // by construction: NEWER and CONCURRENT extras have the higher seq; a CONCURRENT extra has the greater
        // counter sum, which is what vector-clock pick chooses between siblings
        Reading latest = Workload.relation(k) == Workload.Relation.OLDER ? first : extra;
        return switch (policy) {
            case LAST_WRITER, VECTOR_CLOCK -> latest;
            case FIELD_WISE -> {
                Reading older = latest == first ? extra : first;
                String status = latest.status() != null ? latest.status() : older.status();
                yield new Reading(latest.device(), latest.readingNo(), latest.seq(), latest.recordedAt(),
                        Math.max(first.temp(), extra.temp()), status, latest.clock());
            }
        };
    }

    // ---- every benchmark method, run as JMH would, on tiny data

    @ParameterizedTest
    @EnumSource(MergeCase.class)
    void benchmarks_allPeersReturnTheSameChecksum(MergeCase policy) throws SQLException {
        OutputChecksum known = new OutputChecksum();
        List<Reading> sorted = new ArrayList<>();
        for (int k = 0; k < TINY.keys(); k++) {
            sorted.add(expected(policy, k));
        }
        sorted.sort(HandWrittenDedupe.ORDER);
        sorted.forEach(known::add);

        BatchDedupeBenchmark bench = new BatchDedupeBenchmark();
        BatchDedupeBenchmark.OnefoldInput onefold = new BatchDedupeBenchmark.OnefoldInput();
        onefold.prepare(policy, TINY);
        assertEquals(TINY.keys(), bench.onefold(onefold), "onefold");
        OutputChecksum fromOnefold = new OutputChecksum();
        onefold.output.forEach(fromOnefold::add);
        assertEquals(known.value(), fromOnefold.value(), "onefold");
        onefold.verify();

        BatchDedupeBenchmark.HandWrittenInput hand = new BatchDedupeBenchmark.HandWrittenInput();
        hand.prepare(policy, TINY);
        assertEquals(TINY.keys(), bench.handWritten(hand), "hand-written");
        assertEquals(known.value(), checksum(hand.output), "hand-written");
        hand.verify();

        BatchDedupeBenchmark.LoadedTable table = new BatchDedupeBenchmark.LoadedTable();
        table.prepare(policy, TINY);
        try {
            assertEquals(TINY.keys(), bench.duckdbQuery(table), "DuckDB");
            assertEquals(known.value(), checksum(table.output), "DuckDB");
            table.verify();
        } finally {
            table.tearDown();
        }
    }

    @Test
    void duckdbLoad_loadsEveryRecord() throws SQLException {
        BatchDedupeBenchmark.TableToLoad t = new BatchDedupeBenchmark.TableToLoad();
        t.prepare(MergeCase.LAST_WRITER, TINY);
        try {
            assertEquals(TINY.records(), new BatchDedupeBenchmark().duckdbLoad(t));
            assertEquals(TINY.records(), new BatchDedupeBenchmark().duckdbLoad(t), "loading again replaces the table");
        } finally {
            t.tearDown();
        }
    }

    @Test
    void onefold_wrongReferenceFailsLoudly() {
        BatchDedupeBenchmark.OnefoldInput in = new BatchDedupeBenchmark.OnefoldInput();
        in.prepare(MergeCase.LAST_WRITER, TINY);
        in.expected ^= 1;
        new BatchDedupeBenchmark().onefold(in);
        IllegalStateException e = assertThrows(IllegalStateException.class, in::verify);
        assertTrue(e.getMessage().contains("timing does not count"), e.getMessage());
    }

    private static long checksum(List<Reading> readings) {
        OutputChecksum c = new OutputChecksum();
        readings.forEach(c::add);
        return c.value();
    }

    @Test
    void checksum_dependsOnOrderAndContent() {
        List<Row> rows = Workload.of(12).rows();
        OutputChecksum a = new OutputChecksum();
        rows.forEach(a::add);
        OutputChecksum b = new OutputChecksum();
        for (int i = rows.size() - 1; i >= 0; i--) {
            b.add(rows.get(i));
        }
        OutputChecksum c = new OutputChecksum();
        rows.subList(1, rows.size()).forEach(c::add);
        assertTrue(a.value() != b.value() && a.value() != c.value() && b.value() != c.value());
        OutputChecksum viaReadings = new OutputChecksum();
        Workload.of(12).readings().forEach(viaReadings::add);
        assertEquals(a.value(), viaReadings.value(), "rows and readings of the same records give the same checksum");
    }
}
