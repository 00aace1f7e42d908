package dev.onefold.reconcile;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.reconcile.ReconciliationReport.DrillDown;
import dev.onefold.reconcile.ReconciliationReport.KeyDifference;
import dev.onefold.reconcile.ReconciliationReport.PartitionResult;
import dev.onefold.reconcile.ReconciliationReport.Verdict;
import dev.onefold.record.Row;
import dev.onefold.testing.Fixtures;
import java.util.ArrayList;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;

/**
 * Single faults in a store are detected and located exactly, and drill-down lists exactly the differing keys
 * against a model of the two stores, whether the sketch decodes or the full comparison takes over.
 */
class FaultLocationTest {
    private static final DatasetSpec SPEC = ReconcileFixtures.spec(Fixtures.PolicyCase.LAST_WRITER);

    enum Fault { CHANGED_FIELD, MISSING_KEY, EXTRA_KEY, STALE_VERSION }

    /** Two versions per key; the log (left) delivers all of them shuffled and duplicated, the store (right) the latest. */
    @Property(tries = 200)
    void compare_singleFaultIsDetectedAndLocated(@ForAll long seed, @ForAll @IntRange(min = 1, max = 80) int keys,
            @ForAll Fault fault) {
        Random random = new Random(seed);
        List<Row> deliveries = new ArrayList<>();
        List<Row> store = new ArrayList<>();
        for (int i = 0; i < keys; i++) {
            Row old = row(random, "k" + i, i % 3, 1);
            Row latest = row(random, "k" + i, i % 3, 2);
            deliveries.add(old);
            deliveries.add(latest);
            if (random.nextInt(3) == 0) {
                deliveries.add(latest);
            }
            store.add(latest);
        }
        Collections.shuffle(deliveries, random);
        int at = random.nextInt(keys);
        Row target = store.get(at);
        Row extra = row(random, "extra", random.nextInt(3), 1);
        switch (fault) {
            case CHANGED_FIELD -> store.set(at, target.with("amount", (Long) target.get("amount") + 1));
            case MISSING_KEY -> store.remove(at);
            case EXTRA_KEY -> store.add(random.nextInt(store.size() + 1), extra);
            case STALE_VERSION -> store.set(at, deliveries.stream()
                    .filter(r -> r.get("k").equals(target.get("k")) && (Long) r.get("seq") == 1).findFirst().orElseThrow());
        }
        Collections.shuffle(store, random);

        ReconciliationReport report = Reconciliation.defaults().compare(
                ReconcileFixtures.source("log", SPEC, deliveries, RecordDigests.Mode.DELIVERIES),
                ReconcileFixtures.source("store", SPEC, store, RecordDigests.Mode.STORE));

        assertEquals("disagree", report.status());
        List<PartitionResult> differing = report.partitions().stream().filter(p -> p.verdict() != Verdict.AGREE).toList();
        assertEquals(1, differing.size(), report.summary());
        Row faulty = fault == Fault.EXTRA_KEY ? extra : target;
        PartitionResult p = differing.get(0);
        assertEquals(List.of(String.valueOf(faulty.get("part"))), p.partition().values());
        DrillDown d = p.drillDown();
        List<KeyDifference> listed = switch (fault) {
            case CHANGED_FIELD, STALE_VERSION -> d.contentDiffers();
            case MISSING_KEY -> d.missingRight();
            case EXTRA_KEY -> d.missingLeft();
        };
        assertEquals(1, d.missingLeftCount() + d.missingRightCount() + d.contentDiffersCount(), report.summary());
        assertEquals(1, listed.size(), report.summary());
        KeyDifference k = listed.get(0);
        assertEquals(Map.of("k", faulty.get("k")), k.key());
        Row storeVersion = store.stream().filter(r -> r.get("k").equals(faulty.get("k"))).findFirst().orElse(null);
        assertEquals(fault == Fault.EXTRA_KEY ? List.of() : List.of(target), k.left());
        assertEquals(storeVersion == null ? List.of() : List.of(storeVersion), k.right());
        Verdict expected = switch (fault) {
            case CHANGED_FIELD, STALE_VERSION -> Verdict.CONTENT_DIFFERS;
            case MISSING_KEY -> store.stream().anyMatch(r -> r.get("part").equals(faulty.get("part")))
                    ? Verdict.COUNT_DIFFERS : Verdict.MISSING_RIGHT;
            case EXTRA_KEY -> deliveries.stream().anyMatch(r -> r.get("part").equals(faulty.get("part")))
                    ? Verdict.COUNT_DIFFERS : Verdict.MISSING_LEFT;
        };
        assertEquals(expected, p.verdict());
    }

    /**
     * Two stores edited independently from a common base; the report must list exactly the model's differences,
     * with sketches sized from tiny (forcing the fallback) to ample.
     */
    @Property(tries = 200)
    void compare_drillDownListsExactlyTheModelDifferences(@ForAll long seed, @ForAll @IntRange(max = 120) int keys,
            @ForAll @IntRange(max = 40) int edits, @ForAll @IntRange(min = 1, max = 3) int sketchSize) {
        Random random = new Random(seed);
        Map<String, Row> left = new TreeMap<>();
        for (int i = 0; i < keys; i++) {
            Row r = row(random, "k" + i, random.nextInt(3), 1);
            left.put((String) r.get("k"), r);
        }
        Map<String, Row> right = new TreeMap<>(left);
        for (int e = 0; e < edits; e++) {
            Map<String, Row> side = random.nextBoolean() ? left : right;
            String k = "k" + random.nextInt(keys + 10);
            switch (random.nextInt(3)) {
                case 0 -> side.remove(k);
                case 1 -> side.put(k, row(random, k, side.containsKey(k) ? (Integer) side.get(k).get("part") : random.nextInt(3), 1));
                default -> {
                    if (side.containsKey(k)) {
                        side.put(k, side.get(k).with("note", "edit" + e));
                    }
                }
            }
        }
        long maxDifferences = new long[] {1, 8, 10_000}[sketchSize - 1];
        ReconciliationReport report = Reconciliation.builder().listLimit(1000).sketchMaxDifferences(maxDifferences).build()
                .compare(ReconcileFixtures.source("l", SPEC, new ArrayList<>(left.values()), RecordDigests.Mode.STORE),
                        ReconcileFixtures.source("r", SPEC, new ArrayList<>(right.values()), RecordDigests.Mode.STORE));

        Map<String, Set<String>> expected = new HashMap<>();
        Set<String> all = new TreeSet<>(left.keySet());
        all.addAll(right.keySet());
        for (String k : all) {
            Row l = left.get(k);
            Row r = right.get(k);
            // a key held in different partitions is missing from each side's partition on the other side
            if (l != null && r != null && !l.get("part").equals(r.get("part"))) {
                expected.computeIfAbsent(r.get("part") + "/missing_left", x -> new TreeSet<>()).add(k);
                expected.computeIfAbsent(l.get("part") + "/missing_right", x -> new TreeSet<>()).add(k);
                continue;
            }
            String kind = l == null ? "missing_left" : r == null ? "missing_right" : l.equals(r) ? null : "content_differs";
            if (kind != null) {
                String part = String.valueOf((l != null ? l : r).get("part"));
                expected.computeIfAbsent(part + "/" + kind, x -> new TreeSet<>()).add(k);
            }
        }
        Map<String, Set<String>> found = new HashMap<>();
        for (PartitionResult p : report.partitions()) {
            if (p.drillDown() == null) {
                continue;
            }
            String part = p.partition().values().get(0);
            collect(found, part + "/missing_left", p.drillDown().missingLeft());
            collect(found, part + "/missing_right", p.drillDown().missingRight());
            collect(found, part + "/content_differs", p.drillDown().contentDiffers());
            for (KeyDifference k : p.drillDown().contentDiffers()) {
                assertEquals(List.of(left.get((String) k.key().get("k"))), k.left());
                assertEquals(List.of(right.get((String) k.key().get("k"))), k.right());
            }
        }
        assertEquals(expected, found, report.summary());
        assertEquals(expected.isEmpty(), report.agrees());
        assertTrue(report.partitions().stream().allMatch(p -> p.drillDown() == null || !p.drillDown().truncated()));
    }

    private static void collect(Map<String, Set<String>> found, String bucket, List<KeyDifference> keys) {
        for (KeyDifference k : keys) {
            found.computeIfAbsent(bucket, x -> new TreeSet<>()).add((String) k.key().get("k"));
            assertEquals(k.keyHex(), java.util.HexFormat.of().formatHex(
                    dev.onefold.internal.engine.BoundDataset.bind(SPEC, Fixtures.SCHEMA)
                            .key(k.left().isEmpty() ? k.right().get(0) : k.left().get(0))));
        }
    }

    private static Row row(Random random, String key, int part, long seq) {
        return Row.of(Fixtures.SCHEMA, key, part, seq, 1_700_000_000_000L + random.nextInt(1000), random.nextDouble(),
                "n" + random.nextInt(1000), List.of("t" + random.nextInt(5)), (long) random.nextInt(1000),
                Map.of(), false);
    }
}
