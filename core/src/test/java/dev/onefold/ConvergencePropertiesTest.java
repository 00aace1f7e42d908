package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.engine.KeyedState;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import dev.onefold.testing.Fixtures;
import dev.onefold.testing.Fixtures.Delivery;
import dev.onefold.testing.Fixtures.PolicyCase;
import dev.onefold.testing.Folding;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashSet;
import java.util.List;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;

/**
 * DESIGN.md promise 1 (convergence) and 2 (determinism) for every built-in policy: the merge state is a
 * join-semilattice (commutative, associative, idempotent; Shapiro et al., INRIA RR-7687 section 2.3), so the
 * result depends only on the set of records delivered, never on order, grouping or repetition.
 */
class ConvergencePropertiesTest {

    @Provide
    Arbitrary<Delivery> deliveries() {
        return Fixtures.deliveries(Fixtures.rows(6).list().ofMinSize(1).ofMaxSize(30));
    }

    @Provide
    Arbitrary<List<Row>> sameKeyTriples() {
        return Fixtures.rows(1).list().ofSize(3);
    }

    // --- order, duplication and batching independence

    @Property(tries = 1000)
    void dedupe_resultIndependentOfOrderDuplicationAndBatching(@ForAll PolicyCase policy, @ForAll("deliveries") Delivery d) {
        BoundDataset ds = Folding.bind(Fixtures.spec(policy));
        List<Row> distinct = new ArrayList<>(new LinkedHashSet<>(d.records()));
        List<Row> stream = new ArrayList<>();
        d.batches().forEach(stream::addAll);

        List<KeyedState> reference = Folding.fold(ds, distinct, 1 << 20);
        List<KeyedState> delivered = Folding.fold(ds, stream, 1 << 20);
        List<KeyedState> batched = Folding.foldBatches(ds, d.batches(), 1 << 20);
        assertEquals(Folding.hex(reference), Folding.hex(delivered), "duplicated, shuffled delivery");
        assertEquals(Folding.hex(reference), Folding.hex(batched), "batches folded separately, then together");

        BatchEngine<Row> engine = BatchEngine.forRows(Fixtures.spec(policy), Fixtures.SCHEMA);
        List<Row> out = engine.dedupe(stream).survivors();
        assertEquals(engine.dedupe(distinct).survivors(), out);
        assertEquals(Folding.publish(ds, batched), out);
    }

    @Property(tries = 1000)
    void dedupe_spilledRunEqualsInMemoryRun(@ForAll PolicyCase policy, @ForAll("deliveries") Delivery d) {
        BoundDataset ds = Folding.bind(Fixtures.spec(policy));
        List<Row> stream = new ArrayList<>();
        d.batches().forEach(stream::addAll);
        // a 1 KiB budget forces a spill every few records
        assertEquals(Folding.hex(Folding.fold(ds, stream, 1 << 20)), Folding.hex(Folding.fold(ds, stream, 1024)));
        BatchEngine<Row> tiny = BatchEngine.builder(Fixtures.spec(policy), dev.onefold.spi.RecordAccess.rows(Fixtures.SCHEMA))
                .memoryBudgetBytes(2048).build();
        BatchResult<Row> spilled = tiny.dedupe(stream);
        BatchResult<Row> inMemory = BatchEngine.forRows(Fixtures.spec(policy), Fixtures.SCHEMA).dedupe(stream);
        assertEquals(inMemory.survivors(), spilled.survivors());
        assertEquals(withoutRuns(inMemory.report()), withoutRuns(spilled.report()), "counts of the two paths");
    }

    /**
     * The in-memory path reads records in blocks on a background worker, groups keys in parallel shards and, for
     * last-writer, decides keys by version alone unless versions tie; the spilling path sorts and folds every
     * record's state. Large batches crossing block boundaries, with many keys, tied versions, tombstones and
     * records of a foreign schema (rejected before they reach a block) must come out the same on both paths and
     * single-threaded: survivors, rejections in input order, and every count.
     */
    @Property(tries = 60)
    void dedupe_largeBatchAgreesAcrossParallelSerialAndSpilledRuns(@ForAll PolicyCase policy,
            @ForAll("deliveries") Delivery d, @ForAll long seed) {
        java.util.Random random = new java.util.Random(seed);
        List<Row> stream = new ArrayList<>();
        d.batches().forEach(stream::addAll);
        List<Row> big = new ArrayList<>();
        int copies = 20_000 / stream.size() + 1;
        for (int c = 0; c < copies; c++) {
            for (Row r : stream) {
                // a thousand key spaces (a prime, so copies of one record spread over them) many times over
                big.add(r.with("k", r.get("k") + "#" + (c % 1009)));
            }
        }
        java.util.Collections.shuffle(big, random);
        dev.onefold.record.RowSchema foreign = dev.onefold.record.RowSchema.builder("foreign")
                .field("k", dev.onefold.record.FieldType.string()).build();
        for (int i = 0; i < 5; i++) {
            big.add(random.nextInt(big.size()), Row.of(foreign, "stray" + i));
        }
        dev.onefold.spi.RecordAccess<Row> access = dev.onefold.spi.RecordAccess.rows(Fixtures.SCHEMA);
        BatchResult<Row> parallel = BatchEngine.builder(Fixtures.spec(policy), access).parallel(true).build().dedupe(big);
        BatchResult<Row> serial = BatchEngine.builder(Fixtures.spec(policy), access).parallel(false).build().dedupe(big);
        BatchResult<Row> spilled = BatchEngine.builder(Fixtures.spec(policy), access).memoryBudgetBytes(256 * 1024)
                .build().dedupe(big);
        assertTrue(spilled.report().spilledRuns() > 0, "the small budget spills");
        assertEquals(0, parallel.report().spilledRuns());
        assertEquals(5, parallel.report().rejected());
        for (BatchResult<Row> other : List.of(serial, spilled)) {
            assertEquals(parallel.survivors(), other.survivors());
            assertEquals(withoutRuns(parallel.report()), withoutRuns(other.report()));
            assertEquals(parallel.rejections().stream().map(r -> r.position() + ": " + r.reason()).toList(),
                    other.rejections().stream().map(r -> r.position() + ": " + r.reason()).toList());
        }
    }

    /**
     * An engine keeps the scratch arrays of its last in-memory batch for the next one. Whatever a batch leaves
     * behind (larger or smaller, parallel or not, one that moved to the spilling path half way) must not leak
     * into the next: each batch of a sequence through one engine comes out exactly as through a fresh engine.
     */
    @Property(tries = 30)
    void dedupe_anEngineReusedAcrossBatchesAgreesWithFreshEngines(@ForAll PolicyCase policy,
            @ForAll("deliveries") Delivery d, @ForAll boolean parallel, @ForAll long seed) {
        java.util.Random random = new java.util.Random(seed);
        List<Row> stream = new ArrayList<>();
        d.batches().forEach(stream::addAll);
        dev.onefold.spi.RecordAccess<Row> access = dev.onefold.spi.RecordAccess.rows(Fixtures.SCHEMA);
        // the in-memory half of the budget is 20,000 average rows' own estimates: a batch of 25,000 passes it on
        // the rows alone and moves to the spilling path part way; one of 9,000 stays in memory even with the
        // engine's own columns counted, as long as they cost no more than the rows themselves (checked below)
        long average = (long) stream.stream().mapToLong(Row::estimatedHeapBytes).average().orElseThrow();
        long budget = 2 * 20_000 * average;
        boolean spilledAny = false;
        boolean inMemoryAny = false;
        BatchEngine<Row> reused = BatchEngine.builder(Fixtures.spec(policy), access).parallel(parallel)
                .memoryBudgetBytes(budget).build();
        // sizes repeat, so arrays of one size are taken again, between smaller batches and ones that spill
        for (int size : new int[] {8_500 + random.nextInt(1_000), 24_000 + random.nextInt(2_000), 8_500 + random.nextInt(1_000),
                1 + random.nextInt(300), 8_500 + random.nextInt(1_000), 3_000 + random.nextInt(3_000)}) {
            List<Row> batch = new ArrayList<>(size);
            int spaces = 1 + random.nextInt(1009);
            while (batch.size() < size) {
                Row r = stream.get(random.nextInt(stream.size()));
                batch.add(r.with("k", r.get("k") + "#" + random.nextInt(spaces)));
            }
            BatchResult<Row> fresh = BatchEngine.builder(Fixtures.spec(policy), access).parallel(parallel)
                    .memoryBudgetBytes(budget).build().dedupe(batch);
            BatchResult<Row> again = reused.dedupe(batch);
            assertEquals(fresh.survivors(), again.survivors(), "batch of " + size);
            assertEquals(fresh.report(), again.report(), "batch of " + size);
            long estimated = batch.stream().mapToLong(Row::estimatedHeapBytes).sum();
            spilledAny |= estimated > budget / 2;
            inMemoryAny |= estimated < budget / 4 && size > 8192;
        }
        assertTrue(spilledAny && inMemoryAny, "the sequence has batches on both paths");
    }

    private static BatchReport withoutRuns(BatchReport r) {
        return new BatchReport(r.in(), r.accepted(), r.rejected(), r.duplicates(), r.superseded(), r.conflicts(),
                r.keys(), r.keysWithSiblings(), r.tombstonedKeys(), r.out(), 0, r.lawsMissing());
    }

    // --- the semilattice laws on states of one key

    @Property(tries = 1000)
    void merge_isCommutativeAssociativeIdempotent(@ForAll PolicyCase policy, @ForAll("sameKeyTriples") List<Row> rows) {
        Policy<Object> p = Folding.bind(Fixtures.spec(policy)).policy();
        Object a = p.lift(rows.get(0));
        Object b = p.lift(rows.get(1));
        Object c = p.lift(rows.get(2));
        MergeCounts counts = new MergeCounts();
        assertBytes(p, p.merge(a, b, counts), p.merge(b, a, counts), "commutative");
        assertBytes(p, p.merge(p.merge(a, b, counts), c, counts), p.merge(a, p.merge(b, c, counts), counts), "associative");
        Object ab = p.merge(a, b, counts);
        assertBytes(p, ab, p.merge(ab, ab, counts), "idempotent");
        assertBytes(p, ab, p.merge(ab, a, counts), "absorbs an already merged version (a <= a join b)");
        // a state lifted from one record shows the same rows as the fully merged form of itself
        assertEquals(p.visible(a), p.visible(p.merge(a, a, counts)), "visible rows of a single-record state");
        assertEquals(p.anchor(a), p.anchor(p.read(new dev.onefold.internal.bytes.ByteReader(p.toBytes(a), "state"))),
                "anchor survives encoding");
    }

    /**
     * The in-memory path merges two states the policy calls surely distinct without encoding them, in whatever
     * order they come; that is only the canonical fold if their bytes do differ and merge ignores argument order.
     */
    @Property(tries = 1000)
    void surelyDistinct_meansDifferentBytesAndMergeInEitherOrder(@ForAll PolicyCase policy,
            @ForAll("sameKeyTriples") List<Row> rows) {
        Policy<Object> p = Folding.bind(Fixtures.spec(policy)).policy();
        Object a = p.lift(rows.get(0));
        Object b = p.lift(rows.get(1));
        net.jqwik.api.Assume.that(p.surelyDistinct(a, b));
        assertTrue(!Arrays.equals(p.toBytes(a), p.toBytes(b)), "surely distinct states have different bytes");
        MergeCounts ab = new MergeCounts();
        MergeCounts ba = new MergeCounts();
        assertBytes(p, p.merge(a, b, ab), p.merge(b, a, ba), "either order");
        assertEquals(List.of(ab.duplicates, ab.superseded, ab.conflicts), List.of(ba.duplicates, ba.superseded, ba.conflicts));
    }

    private static void assertBytes(Policy<Object> p, Object x, Object y, String law) {
        assertTrue(Arrays.equals(p.toBytes(x), p.toBytes(y)), law + " law broken");
    }

    @Property(tries = 1000)
    void dedupe_outputSortedWithOneRecordPerVisibleKey(@ForAll PolicyCase policy, @ForAll("deliveries") Delivery d) {
        BoundDataset ds = Folding.bind(Fixtures.spec(policy));
        List<Row> stream = new ArrayList<>();
        d.batches().forEach(stream::addAll);
        BatchResult<Row> r = BatchEngine.forRows(Fixtures.spec(policy), Fixtures.SCHEMA).dedupe(stream);
        for (int i = 1; i < r.survivors().size(); i++) {
            byte[] prev = ds.order(r.survivors().get(i - 1));
            byte[] cur = ds.order(r.survivors().get(i));
            assertTrue(Arrays.compareUnsigned(prev, cur) <= 0, "output sorted by order then key");
        }
        long keys = r.survivors().stream().map(x -> x.get("k")).distinct().count();
        if (policy != PolicyCase.VECTOR_KEEP_ALL) {
            assertEquals(keys, r.survivors().size(), "one record per key");
        }
        BatchReport rep = r.report();
        assertEquals(rep.in(), rep.accepted() + rep.rejected());
        assertEquals(rep.keys() - rep.tombstonedKeys(), keys);
    }

    @Property(tries = 1000)
    void dedupe_parallelRunEqualsSingleThreadedRun(@ForAll PolicyCase policy, @ForAll("deliveries") Delivery d) {
        List<Row> stream = new ArrayList<>();
        d.batches().forEach(stream::addAll);
        // repeat the delivery so the batch is large enough for the parallel paths to engage
        List<Row> big = new ArrayList<>();
        for (int i = 0; i < 200; i++) {
            big.addAll(stream);
        }
        BatchEngine<Row> serial = BatchEngine.builder(Fixtures.spec(policy), dev.onefold.spi.RecordAccess.rows(Fixtures.SCHEMA))
                .parallel(false).build();
        BatchEngine<Row> parallel = BatchEngine.builder(Fixtures.spec(policy), dev.onefold.spi.RecordAccess.rows(Fixtures.SCHEMA))
                .parallel(true).build();
        BatchResult<Row> a = serial.dedupe(big);
        BatchResult<Row> b = parallel.dedupe(big);
        assertEquals(a.survivors(), b.survivors());
        assertEquals(a.report(), b.report());
    }
}
