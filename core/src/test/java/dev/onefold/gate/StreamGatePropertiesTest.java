package dev.onefold.gate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.Consolidator;
import dev.onefold.internal.engine.KeyedState;
import dev.onefold.internal.gate.KeyBytes;
import dev.onefold.record.Row;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.Set;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.From;
import net.jqwik.api.Provide;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;
import net.jqwik.api.constraints.Size;

/**
 * Model-based properties of the gate: a consumer service with random deliveries, duplicates, seeks, crashes and
 * out-of-order acknowledgements, checked against the batch engine ("collect all records, apply the policy").
 */
class StreamGatePropertiesTest {

    @Provide
    Arbitrary<Row> rows() {
        return GateFixtures.rows();
    }

    // ---- exact mode

    @Property
    void exactMode_sinkEndsEqualToBatchEngine(
            @ForAll @IntRange(max = 2) int policy,
            @ForAll @Size(max = 30) List<@From("rows") Row> records,
            @ForAll @Size(max = 10) List<@From("rows") Row> history,
            @ForAll @IntRange(min = 1, max = 3) int partitions,
            @ForAll @IntRange(min = 1, max = 8) int windowKeys,
            @ForAll @IntRange(min = 1, max = 6) int maxHeld,
            @ForAll @IntRange(min = 1, max = 6) int maxAwaiting,
            @ForAll boolean reorder,
            @ForAll @IntRange(max = 20) int lateness,
            @ForAll long seed) {
        DatasetSpec spec = GateFixtures.SPECS.get(policy);
        GateFixtures.ModelSink sink = new GateFixtures.ModelSink(spec);
        seedFromConsolidator(sink, history);
        ConsumerSimulation sim = new ConsumerSimulation(spec, GateFixtures.logs(records, partitions, new Random(seed)),
                sink, seed);
        sim.windowKeys = windowKeys;
        sim.maxHeld = maxHeld;
        sim.maxAwaiting = maxAwaiting;
        sim.lateness = reorder ? (long) lateness : null;
        sim.run();

        List<Row> all = new ArrayList<>(history);
        all.addAll(records);
        Set<Row> expected = GateFixtures.batchResult(spec, all);
        assertEquals(expected, sink.tableRows(), "online table equals the batch engine's result");
        assertEquals(expected.size(), sink.tableRowCount(), "one row per visible record");
        assertEquals(expected, sink.storedRows(), "merging store equals the batch engine's result");
        assertTrue(sim.maxInFlightSeen <= maxHeld + maxAwaiting);
    }

    /** The archive before streaming starts: history folded by the batch engine's first stage. */
    private static void seedFromConsolidator(GateFixtures.ModelSink sink, List<Row> history) {
        try (Consolidator c = new Consolidator(sink.dataset, 1 << 20, Path.of(System.getProperty("java.io.tmpdir")), false)) {
            for (int i = 0; i < history.size(); i++) {
                c.add(history.get(i), "history", i, history.get(i), r -> { });
            }
            try (CloseableIterator<KeyedState> folded = c.folded()) {
                while (folded.hasNext()) {
                    KeyedState ks = folded.next();
                    sink.seed(new KeyBytes(ks.key()), ks.stateBytes());
                }
            }
        }
    }

    // ---- windowed mode

    @Property
    void windowedMode_neverEmitsDuplicateWhoseFirstCopyIsInWindow(
            @ForAll @IntRange(max = 2) int policy,
            @ForAll @Size(max = 30) List<@From("rows") Row> records,
            @ForAll @IntRange(min = 1, max = 3) int partitions,
            @ForAll @IntRange(min = 1, max = 8) int windowKeys,
            @ForAll boolean reorder,
            @ForAll long seed) {
        DatasetSpec spec = GateFixtures.SPECS.get(policy);
        GateFixtures.ModelSink sink = new GateFixtures.ModelSink(spec);
        ConsumerSimulation sim = new ConsumerSimulation(spec, GateFixtures.logs(records, partitions, new Random(seed)),
                sink, seed);
        sim.exact = false;
        sim.windowKeys = windowKeys;
        sim.lateness = reorder ? 5L : null;
        sim.run();

        for (int life = 0; life < sim.decisionsPerLifetime.size(); life++) {
            List<Decision<Row>> decisions = sim.decisionsPerLifetime.get(life);
            List<Long> evictions = sim.evictionsPerLifetime.get(life);
            Map<Row, Long> evictionsAtLastDecision = new HashMap<>();
            for (int i = 0; i < decisions.size(); i++) {
                Decision<Row> d = decisions.get(i);
                if (d.reason() == Decision.Reason.REDELIVERED || d.reason() == Decision.Reason.REJECTED) {
                    continue;
                }
                Long before = evictionsAtLastDecision.put(d.record(), evictions.get(i));
                if (d.isEmit() && before != null) {
                    assertTrue(evictions.get(i) > before, "re-emitted " + d.record() + " with no eviction since its"
                            + " first copy was decided: " + d);
                }
            }
        }
        // a merging sink converges in windowed mode too
        assertEquals(GateFixtures.batchResult(spec, records), sink.storedRows());
    }

    @Property
    void windowedMode_windowHoldingEveryKeyNeverEmitsDuplicates(
            @ForAll @IntRange(max = 2) int policy,
            @ForAll @Size(max = 30) List<@From("rows") Row> records,
            @ForAll long seed) {
        DatasetSpec spec = GateFixtures.SPECS.get(policy);
        GateFixtures.ModelSink sink = new GateFixtures.ModelSink(spec);
        ConsumerSimulation sim = new ConsumerSimulation(spec, GateFixtures.logs(records, 2, new Random(seed)), sink, seed);
        sim.exact = false;
        sim.crashesLeft = 0;
        sim.run();
        assertEquals(1, sim.decisionsPerLifetime.size());
        Set<Row> seen = new java.util.HashSet<>();
        for (Decision<Row> d : sim.decisionsPerLifetime.get(0)) {
            if (d.reason() != Decision.Reason.REDELIVERED && d.reason() != Decision.Reason.REJECTED) {
                boolean first = seen.add(d.record());
                assertTrue(first || !d.isEmit(), "emitted a duplicate: " + d);
            }
        }
        assertEquals(GateFixtures.batchResult(spec, records), sink.tableRows());
    }

    // ---- reordering

    @Property
    void reorder_releasedOrderIsNonDecreasingExceptLate(
            @ForAll @IntRange(max = 2) int policy,
            @ForAll @Size(max = 30) List<@From("rows") Row> records,
            @ForAll @IntRange(min = 1, max = 3) int partitions,
            @ForAll @IntRange(max = 30) int lateness,
            @ForAll @IntRange(min = 1, max = 10) int maxHeld,
            @ForAll long seed) {
        DatasetSpec spec = GateFixtures.SPECS.get(policy);
        GateFixtures.ModelSink sink = new GateFixtures.ModelSink(spec);
        ConsumerSimulation sim = new ConsumerSimulation(spec, GateFixtures.logs(records, partitions, new Random(seed)),
                sink, seed);
        sim.lateness = (long) lateness;
        sim.maxHeld = maxHeld;
        sim.maxAwaiting = 1 + maxHeld / 2;
        sim.run();
        for (List<Decision<Row>> decisions : sim.decisionsPerLifetime) {
            long last = Long.MIN_VALUE;
            for (Decision<Row> d : decisions) {
                if (d.late() || d.reason() == Decision.Reason.REDELIVERED || d.reason() == Decision.Reason.REJECTED) {
                    continue;
                }
                long at = (Long) d.record().get("at");
                assertTrue(at >= last, "released " + d + " at " + at + " after event time " + last);
                last = at;
            }
        }
    }
}
