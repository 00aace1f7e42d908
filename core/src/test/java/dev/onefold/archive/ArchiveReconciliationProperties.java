package dev.onefold.archive;

import static dev.onefold.archive.ArchiveFixtures.DAY0;
import static dev.onefold.archive.ArchiveFixtures.HOUR;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.reconcile.PartitionId;
import dev.onefold.reconcile.Reconciliation;
import dev.onefold.reconcile.ReconciliationReport;
import dev.onefold.reconcile.ReconciliationReport.DrillDown;
import dev.onefold.reconcile.ReconciliationReport.KeyDifference;
import dev.onefold.reconcile.ReconciliationReport.PartitionResult;
import dev.onefold.reconcile.ReconciliationReport.Verdict;
import dev.onefold.reconcile.RecordDigests;
import dev.onefold.record.Row;
import dev.onefold.spi.Storage;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.stream.Stream;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;

/**
 * An archive reconciles with the records it was built from: applied from shuffled, duplicated, replayed
 * deliveries in random batches, it agrees with the same deliveries read as a record stream and with its own
 * export read as a store; and a single fault injected into the other side is detected and located exactly.
 */
class ArchiveReconciliationProperties {

    /** Applies the deliveries in {@code batches} random slices, then replays a random prefix. */
    private static Archive<Row> applyInBatches(DatasetSpec spec, List<Row> deliveries, int batches, Random r) {
        Archive<Row> archive = ArchiveFixtures.builder(spec, Storage.inMemory()).open();
        int from = 0;
        for (int b = 0; b < batches; b++) {
            int to = b == batches - 1 ? deliveries.size() : from + r.nextInt(deliveries.size() - from + 1);
            archive.apply(deliveries.subList(from, to));
            from = to;
        }
        archive.apply(deliveries.subList(0, r.nextInt(deliveries.size() + 1)));
        return archive;
    }

    private static List<Row> duplicatedAndShuffled(List<Row> records, Random r) {
        List<Row> out = new ArrayList<>(records);
        for (int i = r.nextInt(records.size() + 1); i > 0; i--) {
            out.add(records.get(r.nextInt(records.size())));
        }
        Collections.shuffle(out, r);
        return out;
    }

    /** A store holds each row once, in any order. */
    private static List<Row> shuffled(List<Row> rows, Random r) {
        List<Row> out = new ArrayList<>(rows);
        Collections.shuffle(out, r);
        return out;
    }

    private static RecordDigests<Row> stream(String name, DatasetSpec spec, List<Row> rows, RecordDigests.Mode mode) {
        return RecordDigests.ofRows(name, spec, ArchiveFixtures.EVENT, rows::stream, mode).memoryBudgetBytes(1 << 20).build();
    }

    private static List<Row> export(Archive<Row> archive) {
        try (Stream<Row> rows = archive.snapshot().rows()) {
            return rows.toList();
        }
    }

    @Property(tries = 200)
    void compare_archiveAgreesWithItsDeliveriesAndItsExport(@ForAll long seed,
            @ForAll @IntRange(min = 0, max = 2) int policyIndex, @ForAll @IntRange(min = 1, max = 5) int batches) {
        ArchiveFixtures.Policy policy = ArchiveFixtures.Policy.values()[policyIndex];
        DatasetSpec spec = ArchiveFixtures.spec(policy, false);
        Random r = new Random(seed);
        List<Row> records = ArchiveFixtures.randomEvents(r, 5 + r.nextInt(60), 1 + r.nextInt(25), 4);
        List<Row> deliveries = duplicatedAndShuffled(records, r);
        Archive<Row> archive = applyInBatches(spec, deliveries, batches, r);
        DigestSource left = archive.snapshot().digestSource("archive");

        ReconciliationReport withDeliveries = Reconciliation.defaults().compare(left,
                stream("deliveries", spec, records, RecordDigests.Mode.DELIVERIES));
        assertEquals("agree", withDeliveries.status(), withDeliveries.summary());

        ReconciliationReport withExport = Reconciliation.defaults().compare(left,
                stream("export", spec, export(archive), RecordDigests.Mode.STORE));
        // A store row belongs to its own partition, while the archive places a key by its anchor record. Under
        // vector-clock keep-all the anchor may be a sibling (or a concurrent tombstone) in another partition than
        // a visible record; the export read as a store agrees exactly when no visible record sits elsewhere.
        BoundDataset bound = BoundDataset.bind(spec, ArchiveFixtures.EVENT);
        boolean split = false;
        for (PartitionInfo p : archive.snapshot().partitions()) {
            try (Stream<Row> rows = archive.snapshot().rows(p.values())) {
                split |= rows.anyMatch(row -> !bound.partition(row).equals(p.values()));
            }
        }
        assertTrue(!split || policy == ArchiveFixtures.Policy.VECTOR_CLOCK, "only keep-all siblings can sit apart");
        assertEquals(split ? "disagree" : "agree", withExport.status(), withExport.summary());
        if (!split) {
            assertEquals(withDeliveries.leftTotal(), withExport.rightTotal());
        }
    }

    enum Fault { CHANGED_FIELD, MISSING_KEY, EXTRA_KEY, STALE_VERSION }

    /**
     * Keys with two to four versions in one hour each; the archive holds the deliveries, the other side (the same
     * deliveries, or the latest versions as a store) carries one fault.
     */
    @Property(tries = 100)
    void compare_singleFaultInTheOtherSideIsLocatedExactly(@ForAll long seed, @ForAll @IntRange(min = 1, max = 60) int keys,
            @ForAll Fault fault, @ForAll RecordDigests.Mode otherSide, @ForAll @IntRange(min = 1, max = 4) int batches) {
        DatasetSpec spec = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false);
        BoundDataset bound = BoundDataset.bind(spec, ArchiveFixtures.EVENT);
        Random r = new Random(seed);
        List<Row> records = new ArrayList<>();
        List<Row> latest = new ArrayList<>();
        for (int k = 0; k < keys; k++) {
            long hour = DAY0 + r.nextInt(4) * HOUR;
            Row last = null;
            for (long seq = 1, versions = 2 + r.nextInt(3); seq <= versions; seq++) {
                last = ArchiveFixtures.event("k" + k, seq, hour + r.nextInt(1000), (long) r.nextInt(1000), false);
                records.add(last);
            }
            latest.add(last);
        }
        Archive<Row> archive = applyInBatches(spec, duplicatedAndShuffled(records, r), batches, r);

        Row target = latest.get(r.nextInt(keys));
        Row extra = ArchiveFixtures.event("extra", 1, DAY0 + r.nextInt(5) * HOUR, 5L, false);
        Row changed = target.with("val", (Long) target.get("val") + 1);
        Row stale = records.stream().filter(x -> x.get("id").equals(target.get("id"))
                && (Long) x.get("seq") == (Long) target.get("seq") - 1).findFirst().orElseThrow();
        List<Row> other = new ArrayList<>(otherSide == RecordDigests.Mode.STORE ? latest : records);
        switch (fault) {
            case CHANGED_FIELD -> other.replaceAll(x -> x.equals(target) ? changed : x);
            case MISSING_KEY -> other.removeIf(x -> x.get("id").equals(target.get("id")));
            case EXTRA_KEY -> other.add(extra);
            case STALE_VERSION -> {
                // as a store: the previous version in place of the latest; as deliveries: the latest never arrived
                if (otherSide == RecordDigests.Mode.STORE) {
                    other.replaceAll(x -> x.equals(target) ? stale : x);
                } else {
                    other.remove(target);
                }
            }
        }
        ReconciliationReport report = Reconciliation.defaults().compare(archive.snapshot().digestSource("archive"),
                stream("other", spec, otherSide == RecordDigests.Mode.STORE ? shuffled(other, r) : duplicatedAndShuffled(other, r),
                        otherSide));

        assertEquals("disagree", report.status());
        List<PartitionResult> differing = report.partitions().stream().filter(p -> p.verdict() != Verdict.AGREE).toList();
        assertEquals(1, differing.size(), report.summary());
        PartitionResult p = differing.get(0);
        Row faulty = fault == Fault.EXTRA_KEY ? extra : target;
        assertEquals(new PartitionId(bound.partition(faulty)), p.partition());
        DrillDown d = p.drillDown();
        assertEquals(1, d.missingLeftCount() + d.missingRightCount() + d.contentDiffersCount(), report.summary());
        List<KeyDifference> listed = switch (fault) {
            case CHANGED_FIELD, STALE_VERSION -> d.contentDiffers();
            case MISSING_KEY -> d.missingRight();
            case EXTRA_KEY -> d.missingLeft();
        };
        assertEquals(1, listed.size(), report.summary());
        KeyDifference k = listed.get(0);
        assertEquals(Map.of("id", faulty.get("id")), k.key());
        List<Row> otherVersion = switch (fault) {
            case CHANGED_FIELD -> List.of(changed);
            case MISSING_KEY -> List.of();
            case EXTRA_KEY -> List.of(extra);
            case STALE_VERSION -> List.of(stale);
        };
        assertEquals(fault == Fault.EXTRA_KEY ? List.of() : List.of(target), k.left());
        assertEquals(otherVersion, k.right());
        // the partition keeps other keys on both sides, or the fault leaves one side without it
        boolean shared = latest.stream().anyMatch(x -> x != faulty && bound.partition(x).equals(bound.partition(faulty)));
        Verdict expected = switch (fault) {
            case CHANGED_FIELD, STALE_VERSION -> Verdict.CONTENT_DIFFERS;
            case MISSING_KEY -> shared ? Verdict.COUNT_DIFFERS : Verdict.MISSING_RIGHT;
            case EXTRA_KEY -> shared ? Verdict.COUNT_DIFFERS : Verdict.MISSING_LEFT;
        };
        assertEquals(expected, p.verdict());
    }
}
