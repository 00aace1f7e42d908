package dev.onefold.gate;

import dev.onefold.BatchEngine;
import dev.onefold.DatasetSpec;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.gate.KeyBytes;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;

/** Generated records and a model sink for the gate's tests. */
final class GateFixtures {
    private GateFixtures() {}

    static final RowSchema SCHEMA = RowSchema.builder("event")
            .field("k", FieldType.string())
            .field("ver", FieldType.int64().nullable())
            .field("at", FieldType.int64())
            .field("val", FieldType.int64().nullable())
            .field("clock", FieldType.map(FieldType.int64()).nullable())
            .field("gone", FieldType.bool().nullable())
            .build();

    /** One spec per built-in policy, each with the tombstone, ordered by event time. */
    static final List<DatasetSpec> SPECS = List.of(
            DatasetSpec.fromJson("""
                    {"key": ["k"], "order": ["at"], "merge": {"policy": "last-writer", "version": "ver"},
                     "tombstone": "gone"}""", "last-writer spec"),
            DatasetSpec.fromJson("""
                    {"key": ["k"], "order": ["at"], "merge": {"policy": "field-wise", "version": "ver",
                     "fields": {"val": "latest-non-null", "at": "max"}}, "tombstone": "gone"}""", "field-wise spec"),
            DatasetSpec.fromJson("""
                    {"key": ["k"], "order": ["at"], "merge": {"policy": "vector-clock", "clock": "clock",
                     "concurrent": "keep-all"}, "tombstone": "gone"}""", "vector-clock spec"));

    /** Records over few keys and versions, so duplicates, conflicts and siblings are common; a few are invalid. */
    static Arbitrary<Row> rows() {
        Arbitrary<String> key = Arbitraries.of("a", "b", "c", "d", "e", "f");
        Arbitrary<Long> ver = Arbitraries.longs().between(1, 4).injectNull(0.03);
        Arbitrary<Long> at = Arbitraries.longs().between(0, 60);
        Arbitrary<Long> val = Arbitraries.longs().between(0, 9).injectNull(0.2);
        Arbitrary<Map<String, Long>> clock = Combinators.combine(Arbitraries.longs().between(0, 3),
                Arbitraries.longs().between(0, 3)).as((x, y) -> {
                    Map<String, Long> m = new TreeMap<>();
                    m.put("w1", x);
                    m.put("w2", y);
                    return m;
                }).injectNull(0.03);
        Arbitrary<Boolean> gone = Arbitraries.integers().between(0, 9)
                .map(i -> i == 0 ? Boolean.TRUE : i == 1 ? Boolean.FALSE : null);
        return Combinators.combine(key, ver, at, val, clock, gone)
                .as((k, v, t, x, c, g) -> Row.of(SCHEMA, k, v, t, x, c, g));
    }

    /** The batch engine's survivors for all records, as a set (one entry per visible row). */
    static Set<Row> batchResult(DatasetSpec spec, Collection<Row> all) {
        return new HashSet<>(BatchEngine.forRows(spec, SCHEMA).dedupe(all).survivors());
    }

    /**
     * What the simulated consumer service writes to: an online table written at every emit, and a store that
     * receives acknowledged emits in batches and answers exact mode's stored-state lookups.
     */
    interface Sink extends StoredStateLookup {
        void write(Decision<Row> emit);

        /** Stores a batch of emits durably; the consumer acknowledges them to the gate only afterwards. */
        void durablyStore(List<Decision<Row>> emits);
    }

    /**
     * A sink as a consumer service has one: an online table written at every emit in emission order (upsert of
     * the key's visible rows), and a merging store of acknowledged states that exact mode looks up (an archive).
     * Writes to both survive a crash of the consumer; only acknowledged states reach the merging store.
     */
    static final class ModelSink implements Sink {
        final BoundDataset dataset;
        final Policy<Object> policy;
        final Map<KeyBytes, List<Row>> table = new HashMap<>();
        final Map<KeyBytes, byte[]> stored = new HashMap<>();

        ModelSink(DatasetSpec spec) {
            this.dataset = BoundDataset.bind(spec, SCHEMA);
            this.policy = dataset.policy();
        }

        /** Seeds the store and table with already folded history (as an archive would hold it). */
        void seed(KeyBytes key, byte[] state) {
            stored.put(key, state);
            table.put(key, policy.visible(policy.read(new ByteReader(state, "seed"))));
        }

        @Override
        public void write(Decision<Row> emit) {
            table.put(new KeyBytes(emit.keyBytes()), emit.visible());
        }

        @Override
        public void durablyStore(List<Decision<Row>> emits) {
            emits.forEach(this::durablyStore);
        }

        void durablyStore(Decision<Row> emit) {
            KeyBytes key = new KeyBytes(emit.keyBytes());
            byte[] mine = emit.stateBytes();
            byte[] old = stored.get(key);
            if (old == null) {
                stored.put(key, mine);
            } else {
                Object merged = policy.merge(policy.read(new ByteReader(old, "stored")),
                        policy.read(new ByteReader(mine, "emitted")), new MergeCounts());
                stored.put(key, policy.toBytes(merged));
            }
        }

        @Override
        public byte[] storedState(byte[] key) {
            return stored.get(new KeyBytes(key));
        }

        Set<Row> tableRows() {
            Set<Row> out = new HashSet<>();
            table.values().forEach(out::addAll);
            return out;
        }

        int tableRowCount() {
            return table.values().stream().mapToInt(List::size).sum();
        }

        Set<Row> storedRows() {
            Set<Row> out = new HashSet<>();
            for (byte[] s : stored.values()) {
                out.addAll(policy.visible(policy.read(new ByteReader(s, "stored"))));
            }
            return out;
        }
    }

    /** Records as partition logs: each record lands once or more, in random partitions (producer retries). */
    static List<List<Row>> logs(List<Row> records, int partitions, java.util.Random rnd) {
        List<List<Row>> logs = new ArrayList<>();
        for (int p = 0; p < partitions; p++) {
            logs.add(new ArrayList<>());
        }
        for (Row r : records) {
            int copies = 1 + (rnd.nextInt(4) == 0 ? 1 + rnd.nextInt(2) : 0);
            for (int c = 0; c < copies; c++) {
                logs.get(rnd.nextInt(partitions)).add(r);
            }
        }
        for (List<Row> log : logs) {
            java.util.Collections.shuffle(log, rnd);
        }
        return logs;
    }
}
