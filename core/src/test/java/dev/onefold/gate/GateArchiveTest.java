package dev.onefold.gate;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.archive.Archive;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Random;
import java.util.Set;
import java.util.stream.Stream;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.From;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.constraints.IntRange;
import net.jqwik.api.constraints.Size;
import org.junit.jupiter.api.Test;

/**
 * Exact mode against a real archive: the gate's stored-state lookup is {@code archive::storedState}, and the
 * consumer's sink applies the records of acknowledged emits to the archive in batches. With duplicates, seeks
 * back, crashes and a window far smaller than the keys (so most keys are found through the archive), the
 * archive ends equal to the batch engine's result over every record delivered (the model, STYLE.md habit 13).
 */
class GateArchiveTest {

    /** The consumer's store: an archive receiving each acknowledged batch of emits as one apply. */
    static final class ArchiveSink implements GateFixtures.Sink {
        final Archive<Row> archive;

        ArchiveSink(Archive<Row> archive) {
            this.archive = archive;
        }

        /** Not a write (the archive is written when emits are acknowledged): checks the emit is needed. */
        @Override
        public void write(Decision<Row> emit) {
            // the gate's state is the stored one joined with unacknowledged emits, so an emit never repeats what
            // the archive holds; a lookup that missed stored keys would re-emit their duplicates
            assertFalse(Arrays.equals(emit.stateBytes(), archive.storedState(emit.keyBytes())),
                    () -> "emitted a state the archive already holds: " + emit);
        }

        @Override
        public void durablyStore(List<Decision<Row>> emits) {
            // the emitted record, not its visible rows: the archive merges it into the key's stored state
            // exactly as the gate merged it into the state it knew, so the two states agree
            archive.apply(emits.stream().map(Decision::record).toList());
        }

        @Override
        public byte[] storedState(byte[] key) {
            return archive.storedState(key);
        }

        Set<Row> rows() {
            try (Stream<Row> s = archive.snapshot().rows()) {
                return new HashSet<>(s.toList());
            }
        }
    }

    /** The fixture specs, also partitioned by a value that changes between versions, so keys move. */
    private static DatasetSpec spec(int policy, boolean partitioned) {
        DatasetSpec spec = GateFixtures.SPECS.get(policy);
        return partitioned ? DatasetSpec.fromJson(spec.toJson().replaceFirst("\\{",
                "{\"partition\": {\"fields\": [\"val\"], \"stable\": false}, "), "partitioned spec") : spec;
    }

    private static Archive<Row> archive(DatasetSpec spec) {
        return Archive.builder(spec, RecordAccess.rows(GateFixtures.SCHEMA)).storage(Storage.inMemory())
                .parallelism(1).chunkTargetBytes(1024).open();
    }

    @Provide
    Arbitrary<Row> rows() {
        return GateFixtures.rows();
    }

    @Property(tries = 200)
    void exactModeOverArchive_archiveEndsEqualToBatchEngine(
            @ForAll @IntRange(max = 2) int policy,
            @ForAll boolean partitioned,
            @ForAll @Size(max = 30) List<@From("rows") Row> records,
            @ForAll @Size(max = 10) List<@From("rows") Row> history,
            @ForAll @IntRange(min = 1, max = 3) int partitions,
            @ForAll @IntRange(min = 1, max = 3) int windowKeys,
            @ForAll @IntRange(min = 1, max = 6) int maxAwaiting,
            @ForAll boolean reorder,
            @ForAll @IntRange(max = 20) int lateness,
            @ForAll long seed) {
        DatasetSpec spec = spec(policy, partitioned);
        ArchiveSink sink = new ArchiveSink(archive(spec));
        sink.archive.apply(history); // what the archive held before the consumer started
        ConsumerSimulation sim = new ConsumerSimulation(spec, GateFixtures.logs(records, partitions, new Random(seed)),
                sink, seed);
        sim.windowKeys = windowKeys;
        sim.maxAwaiting = maxAwaiting;
        sim.lateness = reorder ? (long) lateness : null;
        sim.run();

        List<Row> all = new ArrayList<>(history);
        all.addAll(records);
        assertEquals(GateFixtures.batchResult(spec, all), sink.rows());
        assertTrue(sink.archive.verify().ok(), () -> sink.archive.verify().problems().toString());
    }

    // ---- the lookup itself

    @Test
    void storedState_isTheCanonicalStateOfTheLatestVersion() {
        DatasetSpec spec = spec(1, true);
        Archive<Row> archive = archive(spec);
        Row first = Row.of(GateFixtures.SCHEMA, "a", 1L, 5L, 3L, null, null);
        Row second = Row.of(GateFixtures.SCHEMA, "a", 2L, 7L, 4L, null, null);
        byte[] key = BoundDataset.bind(spec, GateFixtures.SCHEMA).key(first);
        assertNull(archive.storedState(key), "nothing stored yet");

        StreamGate<Row> gate = StreamGate.builder(spec, RecordAccess.rows(GateFixtures.SCHEMA)).exact(archive::storedState)
                .build();
        Decision<Row> d1 = gate.offer("p", 0, first).get(0);
        archive.apply(List.of(first));
        assertArrayEquals(d1.stateBytes(), archive.storedState(key), "the gate's bytes for the same state");
        Decision<Row> d2 = gate.offer("p", 1, second).get(0);
        archive.apply(List.of(second)); // moves the key from partition [3] to [4]; the lookup follows the new version
        assertArrayEquals(d2.stateBytes(), archive.storedState(key));
        assertArrayEquals(d1.stateBytes(), archive.snapshot(1).storedState(key), "an older snapshot keeps its state");
        assertNull(archive.snapshot(1).storedState(BoundDataset.bind(spec, GateFixtures.SCHEMA)
                .key(Row.of(GateFixtures.SCHEMA, "b", 1L, 5L, 3L, null, null))));
    }

    @Test
    void exactModeOverArchive_keyEvictedFromTheWindowIsDroppedAsDuplicate() {
        DatasetSpec spec = spec(0, false);
        Archive<Row> archive = archive(spec);
        StreamGate<Row> gate = StreamGate.builder(spec, RecordAccess.rows(GateFixtures.SCHEMA)).exact(archive::storedState)
                .windowKeys(1).build();
        Row a = Row.of(GateFixtures.SCHEMA, "a", 2L, 5L, 1L, null, null);
        Row b = Row.of(GateFixtures.SCHEMA, "b", 1L, 5L, 1L, null, null);
        List<Decision<Row>> emits = new ArrayList<>();
        emits.addAll(gate.offer("p", 0, a));
        emits.addAll(gate.offer("p", 1, b));
        archive.apply(emits.stream().map(Decision::record).toList());
        gate.acknowledgeAll(emits);
        gate.metrics(); // runs the window's maintenance: "a" is evicted by "b"

        Decision<Row> replay = gate.offer("p", 2, a).get(0);
        Decision<Row> older = gate.offer("p", 3, Row.of(GateFixtures.SCHEMA, "a", 1L, 9L, 8L, null, null)).get(0);
        assertEquals(Decision.Reason.DUPLICATE, replay.reason());
        assertEquals(Decision.Reason.SUPERSEDED, older.reason());
        GateMetrics m = gate.metrics();
        assertTrue(m.windowEvictions() >= 1, "the window held one key of two");
        assertTrue(m.storeHits() >= 1, "the duplicate was recognised through the archive");
    }
}
