package dev.onefold.reconcile;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.internal.json.Json;
import dev.onefold.reconcile.ReconciliationReport.PartitionResult;
import dev.onefold.reconcile.ReconciliationReport.Verdict;
import dev.onefold.record.Row;
import dev.onefold.testing.Fixtures;
import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.SortedMap;
import java.util.TreeMap;
import org.junit.jupiter.api.Test;

/** Verdicts, the sketch's fallback, and the report's JSON and summary. */
class ReconciliationTest {
    private static final DatasetSpec SPEC = ReconcileFixtures.spec(Fixtures.PolicyCase.LAST_WRITER);

    private static List<Row> rows(int n, long seed) {
        Random random = new Random(seed);
        List<Row> out = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            out.add(Row.of(Fixtures.SCHEMA, "k" + i, i % 3, 1L, 1_700_000_000_000L, random.nextDouble(), "n" + i,
                    List.of(), (long) random.nextInt(100), Map.of(), false));
        }
        return out;
    }

    private static RecordDigests<Row> store(String name, List<Row> rows) {
        return ReconcileFixtures.source(name, SPEC, rows, RecordDigests.Mode.STORE);
    }

    @Test
    void compare_identicalStoresAgreeWithoutDrillDown() {
        List<Row> rows = rows(90, 1);
        ReconciliationReport r = Reconciliation.defaults().compare(store("a", rows), store("b", rows));
        assertTrue(r.agrees());
        assertEquals("agree", r.status());
        assertEquals(3L, r.totals().get(Verdict.AGREE));
        assertTrue(r.partitions().stream().allMatch(p -> p.drillDown() == null));
        assertEquals(r.leftTotal(), r.rightTotal());
        assertTrue(r.summary().startsWith("agree: 'a' and 'b' agree in all 3 partitions"), r.summary());
    }

    @Test
    void compare_sketchThatCannotDecodeFallsBackToFullComparison() {
        List<Row> left = rows(300, 2);
        List<Row> right = new ArrayList<>(left);
        for (int i = 0; i < 120; i += 3) {
            right.set(i, right.get(i).with("note", "changed"));
        }
        // 40 changed keys in partition 0 are 80 differing entries; a sketch sized for 4 cannot hold them
        ReconciliationReport r = Reconciliation.builder().sketchMaxDifferences(4).listLimit(10).build()
                .compare(store("a", left), store("b", right));
        PartitionResult p = r.partitions().get(0);
        assertEquals(Verdict.CONTENT_DIFFERS, p.verdict());
        assertEquals("full", p.drillDown().method());
        assertTrue(p.drillDown().sketchFailed());
        assertTrue(p.drillDown().sketchAttempts() >= 1);
        assertEquals(40, p.drillDown().contentDiffersCount());
        assertEquals(10, p.drillDown().contentDiffers().size());
        assertTrue(p.drillDown().truncated());
        assertEquals("k0", p.drillDown().contentDiffers().get(0).key().get("k"));

        ReconciliationReport ample = Reconciliation.defaults().compare(store("a", left), store("b", right));
        assertEquals("sketch", ample.partitions().get(0).drillDown().method());
        assertEquals(40, ample.partitions().get(0).drillDown().contentDiffersCount());
    }

    @Test
    void compare_partitionOnOneSideOnlyIsMissingAndListsItsKeys() {
        List<Row> left = rows(30, 3);
        List<Row> right = left.stream().filter(x -> !x.get("part").equals(1)).toList();
        ReconciliationReport r = Reconciliation.defaults().compare(store("a", left), store("b", right));
        PartitionResult p = r.partitions().get(1);
        assertEquals(Verdict.MISSING_RIGHT, p.verdict());
        assertNull(p.right());
        assertEquals(10, p.drillDown().missingRightCount());
        assertEquals(1L, r.totals().get(Verdict.MISSING_RIGHT));

        ReconciliationReport reversed = Reconciliation.defaults().compare(store("b", right), store("a", left));
        assertEquals(Verdict.MISSING_LEFT, reversed.partitions().get(1).verdict());
    }

    /** Equal counts and content hashes but a different aggregate, as a source with a faulty aggregate would give. */
    @Test
    void compare_differentAggregateOnlyIsAggregateDiffers() {
        RecordDigests<Row> honest = store("a", rows(30, 4));
        DigestSource skewed = new DigestSource() {
            @Override
            public String name() {
                return "skewed";
            }

            @Override
            public DatasetSpec spec() {
                return honest.spec();
            }

            @Override
            public SortedMap<PartitionId, Digest> digests() {
                SortedMap<PartitionId, Digest> out = new TreeMap<>(honest.digests());
                Digest d = out.get(out.firstKey());
                List<BigDecimal> agg = new ArrayList<>(d.aggregates());
                agg.set(0, agg.get(0).add(BigDecimal.ONE));
                out.put(out.firstKey(), new Digest(d.keys(), d.records(), d.contentHash(), agg));
                return out;
            }

            @Override
            public void entries(PartitionId partition, EntryConsumer consumer) {
                honest.entries(partition, consumer);
            }

            @Override
            public Map<ByteBuffer, List<Row>> versions(PartitionId partition, Set<ByteBuffer> keys) {
                return honest.versions(partition, keys);
            }
        };
        ReconciliationReport r = Reconciliation.defaults().compare(honest, skewed);
        assertEquals(Verdict.AGGREGATE_DIFFERS, r.partitions().get(0).verdict());
        assertEquals(0, r.partitions().get(0).drillDown().contentDiffersCount());
        assertEquals("disagree", r.status());
    }

    @Test
    void compare_specsWithDifferentChecksAreRefused() {
        DatasetSpec other = DatasetSpec.builder().key("k").lastWriter("seq").partitionByValues("part").build();
        RecordDigests<Row> b = ReconcileFixtures.source("b", other, rows(3, 5), RecordDigests.Mode.STORE);
        OnefoldException e = assertThrows(OnefoldException.class,
                () -> Reconciliation.defaults().compare(store("a", rows(3, 5)), b));
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
        assertTrue(e.getMessage().contains("'a'") && e.getMessage().contains("'b'"), e.getMessage());
    }

    @Test
    void toJson_isParseableAndNamesEveryPart() {
        List<Row> left = rows(12, 6);
        List<Row> right = new ArrayList<>(left);
        Row removed = right.remove(4);
        ReconciliationReport r = Reconciliation.defaults().compare(store("a", left), store("b", right));
        @SuppressWarnings("unchecked")
        Map<String, Object> json = (Map<String, Object>) Json.parse(r.toJson(), "report");
        assertEquals("disagree", json.get("status"));
        assertEquals(List.of("status", "left", "right", "checks", "totals", "partitions"), List.copyOf(json.keySet()));
        assertEquals(Map.of("aggregate", "sum", "field", "amount"), ((List<?>) json.get("checks")).get(0));
        Map<?, ?> totals = (Map<?, ?>) json.get("totals");
        assertEquals(3L, totals.get("partitions"));
        assertEquals(1L, totals.get("count_differs"));
        Map<?, ?> p = (Map<?, ?>) ((List<?>) json.get("partitions")).get(1);
        assertEquals(List.of("1"), p.get("partition"));
        assertEquals("count_differs", p.get("verdict"));
        Map<?, ?> left1 = (Map<?, ?>) p.get("left");
        assertEquals(String.format("%016x", r.partitions().get(1).left().contentHash()), left1.get("content_hash"));
        Map<?, ?> missing = (Map<?, ?>) ((Map<?, ?>) p.get("drill_down")).get("missing_right");
        assertEquals(1L, missing.get("count"));
        Map<?, ?> key = (Map<?, ?>) ((List<?>) missing.get("keys")).get(0);
        assertEquals(Map.of("k", removed.get("k")), key.get("key"));
        assertEquals(removed.get("note"), ((Map<?, ?>) ((List<?>) key.get("left")).get(0)).get("note"));
        assertEquals(List.of(), key.get("right"));
        assertFalse(r.summary().isEmpty());
        assertTrue(r.summary().contains("partition 1: count differs; 0 missing on the left, 1 missing on the right"), r.summary());
    }
}
