package dev.onefold.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.Consolidator;
import dev.onefold.internal.engine.ExternalSorter;
import dev.onefold.internal.engine.KeyedState;
import dev.onefold.internal.merge.Policy;
import dev.onefold.internal.reconcile.PackedEntries;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.nio.ByteBuffer;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.HashMap;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Set;
import java.util.SortedMap;
import java.util.TreeMap;
import java.util.function.Consumer;
import java.util.function.Supplier;
import java.util.stream.Stream;

/**
 * A {@link DigestSource} computed from any stream of records passed through a spec: an export file, rows mapped
 * from a JDBC result set ({@link JdbcDigests}), decoded container files. {@link #builder} reads the stream once
 * and computes every partition's digest and key entries; drill-down reads it again for the few keys asked for,
 * so the stream supplier must give the same records each time it is called.
 *
 * <p>What the content is depends on the {@link Mode}:
 * <ul>
 *   <li>{@link Mode#DELIVERIES}: the records are deliveries (duplicated, replayed, old versions, tombstones)
 *       and the content is what they fold to under the spec's merge policy, exactly as the batch engine would
 *       publish it; a key belongs to the partition of its anchor record. Equal content gives an equal digest
 *       whatever the order, duplication or batching of the deliveries.</li>
 *   <li>{@link Mode#STORE}: the records are what a store holds (a table, an export) and are taken as they
 *       are: every record counts, a record belongs to its own partition, nothing is merged. A key held twice
 *       (a duplicate row) or a stale version shows up as a difference rather than being folded away.</li>
 * </ul>
 *
 * <p>Records that cannot be read (they do not fit the schema, or their key, version or clock is unusable) are
 * kept in {@link #rejections()} with their reason; {@code records() == accepted() + rejections().size()}.
 *
 * <p>Cost: reading is one pass plus a sort by key (spilling to disk beyond the memory budget), O(n log n);
 * memory holds the key entries, about key length + 9 bytes per live key. An instance is immutable once built
 * and may be used from one thread at a time.
 */
public final class RecordDigests<R> implements DigestSource {

    /** Whether records are deliveries to fold or a store's content to take as it is. */
    public enum Mode { DELIVERIES, STORE }

    private final String name;
    private final BoundDataset dataset;
    private final RecordAccess<R> access;
    private final Supplier<? extends Stream<? extends R>> records;
    private final Mode mode;
    private final long budget;
    private final Path spillDir;
    private final SortedMap<PartitionId, Digest> digests;
    private final Map<PartitionId, PackedEntries> entries;
    private final List<Rejection> rejections;
    private final long recordCount;

    private RecordDigests(Builder<R> b) {
        this.name = b.name;
        this.dataset = BoundDataset.bind(b.spec, b.access.schema());
        this.access = b.access;
        this.records = b.records;
        this.mode = b.mode;
        this.budget = b.budget;
        this.spillDir = b.spillDir;
        TreeMap<PartitionId, Digest.Builder> builders = new TreeMap<>();
        Map<PartitionId, PackedEntries> packed = new HashMap<>();
        List<Rejection> rejected = new ArrayList<>();
        this.recordCount = scan(null, rejected::add, (key, partition, rows) -> {
            Digest.Builder d = builders.computeIfAbsent(partition, p -> new Digest.Builder(b.spec, b.access.schema()));
            packed.computeIfAbsent(partition, p -> new PackedEntries()).add(key, d.addKey(key, rows));
        });
        TreeMap<PartitionId, Digest> built = new TreeMap<>();
        builders.forEach((p, d) -> built.put(p, d.build()));
        this.digests = Collections.unmodifiableSortedMap(built);
        this.entries = packed;
        this.rejections = List.copyOf(rejected);
    }

    /**
     * Starts a source over records of type R.
     *
     * @param name    names the source in reports and rejections
     * @param records opens the records; called once when built and again for each drill-down, it must give the
     *                same records each time (the stream is closed after use)
     */
    public static <R> Builder<R> builder(String name, DatasetSpec spec, RecordAccess<R> access,
            Supplier<? extends Stream<? extends R>> records, Mode mode) {
        return new Builder<>(name, spec, access, records, mode);
    }

    /** Starts a source over onefold's own rows. */
    public static Builder<Row> ofRows(String name, DatasetSpec spec, RowSchema schema,
            Supplier<? extends Stream<Row>> rows, Mode mode) {
        return builder(name, spec, RecordAccess.rows(schema), rows, mode);
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public DatasetSpec spec() {
        return dataset.spec();
    }

    public Mode mode() {
        return mode;
    }

    @Override
    public SortedMap<PartitionId, Digest> digests() {
        return digests;
    }

    /** Entries in ascending key order (unsigned bytes). Costs O(keys of the partition); reads nothing. */
    @Override
    public void entries(PartitionId partition, EntryConsumer consumer) {
        PackedEntries e = entries.get(partition);
        if (e != null) {
            e.forEach(consumer);
        }
    }

    /** Reads the records again, keeping only the requested keys: one pass, memory for those keys only. */
    @Override
    public Map<ByteBuffer, List<Row>> versions(PartitionId partition, Set<ByteBuffer> keys) {
        Map<ByteBuffer, List<Row>> out = new LinkedHashMap<>();
        if (keys.isEmpty()) {
            return out;
        }
        // records rejected here were already rejected, and reported, when the digests were computed
        scan(keys, rejection -> { }, (key, p, rows) -> {
            if (p.equals(partition)) {
                out.put(ByteBuffer.wrap(key), rows);
            }
        });
        return out;
    }

    @Override
    public List<Rejection> rejections() {
        return rejections;
    }

    /** How many records the stream held when the digests were computed. */
    public long records() {
        return recordCount;
    }

    /** How many of them were read into the digests. */
    public long accepted() {
        return recordCount - rejections.size();
    }

    /** Receives each live key's visible records in one partition. */
    private interface KeyVisitor {
        void visit(byte[] key, PartitionId partition, List<Row> rows);
    }

    /**
     * Reads the stream once, keeping only the wanted keys (all when null), and visits each live key per
     * partition in ascending key order.
     *
     * @return the number of records read
     */
    private long scan(Set<ByteBuffer> wanted, Consumer<Rejection> rejects, KeyVisitor visitor) {
        try (Stream<? extends R> stream = Objects.requireNonNull(records.get(), "records supplier returned null")) {
            return mode == Mode.DELIVERIES ? fold(stream.iterator(), wanted, rejects, visitor)
                    : group(stream.iterator(), wanted, rejects, visitor);
        }
    }

    private long fold(Iterator<? extends R> it, Set<ByteBuffer> wanted, Consumer<Rejection> rejects, KeyVisitor visitor) {
        Policy<Object> policy = dataset.policy();
        long position = 0;
        try (Consolidator consolidator = new Consolidator(dataset, budget, spillDir, true)) {
            while (it.hasNext()) {
                R record = it.next();
                long at = position++;
                Row row = readRow(record, at, rejects);
                if (row != null && isWanted(row, wanted)) {
                    consolidator.add(row, name, at, record, rejects);
                }
            }
            try (CloseableIterator<KeyedState> folded = consolidator.folded()) {
                while (folded.hasNext()) {
                    KeyedState ks = folded.next();
                    Object state = ks.state(policy);
                    List<Row> visible = policy.visible(state);
                    if (!visible.isEmpty()) {
                        visitor.visit(ks.key(), new PartitionId(dataset.partition(policy.anchor(state))), visible);
                    }
                }
            }
        }
        return position;
    }

    private long group(Iterator<? extends R> it, Set<ByteBuffer> wanted, Consumer<Rejection> rejects, KeyVisitor visitor) {
        long position = 0;
        RowSchema schema = dataset.schema();
        try (ExternalSorter<KeyedRow> sorter = new ExternalSorter<>(KeyedRow.BY_KEY_THEN_CONTENT, KeyedRow.codec(schema),
                budget, spillDir, true)) {
            while (it.hasNext()) {
                R record = it.next();
                long at = position++;
                Row row = readRow(record, at, rejects);
                if (row == null) {
                    continue;
                }
                byte[] key;
                try {
                    key = dataset.key(row);
                } catch (OnefoldException e) {
                    rejectOrThrow(e, at, record, rejects);
                    continue;
                }
                if (wanted == null || wanted.contains(ByteBuffer.wrap(key))) {
                    sorter.add(new KeyedRow(key, RowCodec.encode(row), row));
                }
            }
            try (CloseableIterator<KeyedRow> sorted = sorter.sorted()) {
                KeyedRow pending = sorted.hasNext() ? sorted.next() : null;
                while (pending != null) {
                    byte[] key = pending.key;
                    Map<PartitionId, List<Row>> byPartition = new TreeMap<>();
                    while (pending != null && Arrays.equals(pending.key, key)) {
                        byPartition.computeIfAbsent(new PartitionId(dataset.partition(pending.row)), p -> new ArrayList<>())
                                .add(pending.row);
                        pending = sorted.hasNext() ? sorted.next() : null;
                    }
                    byPartition.forEach((p, rows) -> visitor.visit(key, p, rows));
                }
            }
        }
        return position;
    }

    private Row readRow(R record, long position, Consumer<Rejection> rejects) {
        try {
            return access.toRow(record);
        } catch (OnefoldException e) {
            rejectOrThrow(e, position, record, rejects);
            return null;
        }
    }

    private void rejectOrThrow(OnefoldException e, long position, Object record, Consumer<Rejection> rejects) {
        if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
            throw e;
        }
        rejects.accept(new Rejection(name, position, e.getMessage(), record));
    }

    private boolean isWanted(Row row, Set<ByteBuffer> wanted) {
        if (wanted == null) {
            return true;
        }
        try {
            return wanted.contains(ByteBuffer.wrap(dataset.key(row)));
        } catch (OnefoldException e) {
            // a record whose key cannot be read was rejected when the digests were computed; it is no wanted key
            return false;
        }
    }

    /** A stored record with its key and canonical bytes, sorted by key then content. */
    private static final class KeyedRow {
        static final java.util.Comparator<KeyedRow> BY_KEY_THEN_CONTENT = (a, b) -> {
            int c = Arrays.compareUnsigned(a.key, b.key);
            return c != 0 ? c : Arrays.compareUnsigned(a.content, b.content);
        };

        final byte[] key;
        final byte[] content;
        final Row row;

        KeyedRow(byte[] key, byte[] content, Row row) {
            this.key = key;
            this.content = content;
            this.row = row;
        }

        static ExternalSorter.Codec<KeyedRow> codec(RowSchema schema) {
            return new ExternalSorter.Codec<>() {
                @Override
                public void write(ByteWriter out, KeyedRow item) {
                    out.writeBlob(item.key);
                    out.writeBlob(item.content);
                }

                @Override
                public KeyedRow read(ByteReader in) {
                    byte[] key = in.readBlob();
                    byte[] content = in.readBlob();
                    return new KeyedRow(key, content, RowCodec.decode(schema, content, "spill run"));
                }

                @Override
                public long estimatedBytes(KeyedRow item) {
                    // arrays, headers, and the decoded row, typically about twice its canonical bytes
                    return 96L + item.key.length + 3L * item.content.length;
                }
            };
        }
    }

    /** Settings for a source; {@link #build()} reads the records. Not thread-safe. */
    public static final class Builder<R> {
        private final String name;
        private final DatasetSpec spec;
        private final RecordAccess<R> access;
        private final Supplier<? extends Stream<? extends R>> records;
        private final Mode mode;
        private long budget = Math.min(128L << 20, Runtime.getRuntime().maxMemory() / 8);
        private Path spillDir = Path.of(System.getProperty("java.io.tmpdir"));

        private Builder(String name, DatasetSpec spec, RecordAccess<R> access, Supplier<? extends Stream<? extends R>> records,
                Mode mode) {
            this.name = Objects.requireNonNull(name, "name");
            this.spec = Objects.requireNonNull(spec, "spec");
            this.access = Objects.requireNonNull(access, "access");
            this.records = Objects.requireNonNull(records, "records");
            this.mode = Objects.requireNonNull(mode, "mode");
        }

        /** Memory the sort may hold before spilling (default: an eighth of the heap, at most 128 MiB). */
        public Builder<R> memoryBudgetBytes(long bytes) {
            this.budget = dev.onefold.internal.engine.MemoryBudget.check(bytes);
            return this;
        }

        /** Where sorted runs spill (default: java.io.tmpdir). */
        public Builder<R> spillDirectory(Path dir) {
            this.spillDir = Objects.requireNonNull(dir, "dir");
            return this;
        }

        /**
         * Reads the records and computes the digests.
         *
         * @throws OnefoldException (INVALID_SPEC) when the spec does not fit the record access's schema
         */
        public RecordDigests<R> build() {
            return new RecordDigests<>(this);
        }
    }
}
