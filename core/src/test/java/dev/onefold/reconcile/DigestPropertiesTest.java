package dev.onefold.reconcile;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.BatchEngine;
import dev.onefold.DatasetSpec;
import dev.onefold.record.Row;
import dev.onefold.testing.Fixtures;
import dev.onefold.testing.Fixtures.Delivery;
import dev.onefold.testing.Fixtures.PolicyCase;
import java.util.ArrayList;
import java.util.List;
import java.util.SortedMap;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;

/**
 * Equal content gives equal digests however it was produced, ordered, duplicated or split. The digest's parts
 * follow the reference list's guidance for set digests (REFERENCES.md section 6: distinct-key count, a sum, and an
 * order-independent mod-2^64 sum of per-key 64-bit hashes, equal across permutations and batch splits).
 */
class DigestPropertiesTest {

    @Provide
    Arbitrary<Delivery> deliveries() {
        return Fixtures.deliveries(Fixtures.rows(12).list().ofMaxSize(40));
    }

    @Property(tries = 150)
    void digests_sameUnderOrderDuplicationAndBatching(@ForAll("deliveries") Delivery d, @ForAll PolicyCase policy) {
        DatasetSpec spec = ReconcileFixtures.spec(policy);
        SortedMap<PartitionId, Digest> once = digests(spec, d.records(), RecordDigests.Mode.DELIVERIES);

        List<Row> delivered = new ArrayList<>();
        d.batches().forEach(delivered::addAll);
        assertEquals(once, digests(spec, delivered, RecordDigests.Mode.DELIVERIES), "shuffled and duplicated");
    }

    @Property(tries = 100)
    void sources_keepTheDigestSourceContract(@ForAll("deliveries") Delivery d, @ForAll PolicyCase policy) {
        DatasetSpec spec = ReconcileFixtures.spec(policy);
        List<Row> delivered = new ArrayList<>();
        d.batches().forEach(delivered::addAll);
        DigestSourceContract.verify(ReconcileFixtures.source("log", spec, delivered, RecordDigests.Mode.DELIVERIES),
                Fixtures.SCHEMA);
        DigestSourceContract.verify(ReconcileFixtures.source("store", spec, delivered, RecordDigests.Mode.STORE),
                Fixtures.SCHEMA);
    }

    @Property(tries = 150)
    void digests_storeReadBySeveralWorkersCombinesToTheWhole(@ForAll("deliveries") Delivery d, @ForAll PolicyCase policy,
            @ForAll long seed) {
        DatasetSpec spec = ReconcileFixtures.spec(policy);
        List<Row> survivors = BatchEngine.forRows(spec, Fixtures.SCHEMA).dedupe(d.records()).survivors();
        // keys are dealt to three workers at random; each digests its share, and the shares are combined
        java.util.Random random = new java.util.Random(seed);
        java.util.Map<Object, Integer> worker = new java.util.HashMap<>();
        List<List<Row>> shares = List.of(new ArrayList<>(), new ArrayList<>(), new ArrayList<>());
        for (Row r : survivors) {
            shares.get(worker.computeIfAbsent(r.get("k"), k -> random.nextInt(3))).add(r);
        }
        java.util.TreeMap<PartitionId, Digest> combined = new java.util.TreeMap<>();
        for (List<Row> share : shares) {
            digests(spec, share, RecordDigests.Mode.STORE).forEach((p, digest) ->
                    combined.merge(p, digest, (x, y) -> x.combine(y, spec.checks())));
        }
        assertEquals(digests(spec, survivors, RecordDigests.Mode.STORE), combined);
    }

    @Property(tries = 150)
    void digests_storeOfSurvivorsEqualsFoldedDeliveries(@ForAll("deliveries") Delivery d, @ForAll PolicyCase policy) {
        DatasetSpec spec = ReconcileFixtures.spec(policy);
        List<Row> delivered = new ArrayList<>();
        d.batches().forEach(delivered::addAll);
        List<Row> survivors = BatchEngine.forRows(spec, Fixtures.SCHEMA).dedupe(delivered).survivors();
        if (policy != PolicyCase.VECTOR_KEEP_ALL) {
            // keep-all siblings each sit in their own partition in a store, but with their anchor when folded
            assertEquals(digests(spec, delivered, RecordDigests.Mode.DELIVERIES),
                    digests(spec, survivors, RecordDigests.Mode.STORE));
        }
        assertEquals(digests(spec, survivors, RecordDigests.Mode.STORE),
                digests(spec, reversed(survivors), RecordDigests.Mode.STORE), "store read in another order");
    }

    @Property(tries = 150)
    void digests_partitionDigestsCombineToTheWholeDataset(@ForAll("deliveries") Delivery d, @ForAll PolicyCase policy) {
        DatasetSpec spec = ReconcileFixtures.spec(policy);
        DatasetSpec whole = DatasetSpec.builder().key(spec.key().toArray(String[]::new)).merge(spec.merge())
                .tombstone(spec.tombstone()).check(DatasetSpec.Aggregate.SUM, "amount")
                .check(DatasetSpec.Aggregate.MIN, "temp").check(DatasetSpec.Aggregate.MAX, "seq").build();
        SortedMap<PartitionId, Digest> parts = digests(spec, d.records(), RecordDigests.Mode.DELIVERIES);
        Digest combined = Digest.empty(spec.checks().size());
        for (Digest p : parts.values()) {
            combined = combined.combine(p, spec.checks());
        }
        SortedMap<PartitionId, Digest> one = digests(whole, d.records(), RecordDigests.Mode.DELIVERIES);
        assertEquals(one.isEmpty() ? Digest.empty(spec.checks().size()) : one.get(PartitionId.WHOLE), combined);
    }

    private static SortedMap<PartitionId, Digest> digests(DatasetSpec spec, List<Row> rows, RecordDigests.Mode mode) {
        return ReconcileFixtures.source("test", spec, rows, mode).digests();
    }

    private static List<Row> reversed(List<Row> rows) {
        List<Row> out = new ArrayList<>(rows);
        java.util.Collections.reverse(out);
        return out;
    }
}
