package dev.onefold.internal.archive;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.reconcile.PackedEntries;
import dev.onefold.reconcile.Digest;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.reconcile.PartitionId;
import dev.onefold.record.Row;
import java.nio.ByteBuffer;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Set;
import java.util.SortedMap;
import java.util.TreeMap;

/**
 * One archive version as a {@link DigestSource}. Digests are the manifest's stored per-partition digests, which
 * the partition rewriter builds with {@link Digest.Builder#addKey} over each stored key's visible records, so
 * they equal the digests of any record stream folding to the same content. A partition's id is its manifest
 * values, which are {@code BoundDataset.partition} of each key's anchor record ({@link PartitionId#WHOLE} when
 * the dataset is unpartitioned).
 *
 * <h2>Cost</h2>
 * {@link #digests()} reads nothing (the manifest was read when the snapshot was opened), with one exception:
 * a partition not rewritten since the payload codec's writer id changed (a schema evolution) has its digest
 * recomputed from its chunks once per archive instance, because the stored one hashed records of the older
 * schema. {@link #entries} reads every chunk of that one partition once and decodes each state;
 * {@link #versions} reads only that partition's chunks whose key-hash index holds a wanted key. Every other file is left alone. Drill-down asks for a
 * partition's entries twice (to build its sketch, then to map decoded differences back to keys), so the entries
 * of the last partition read are kept, packed (about key length + 9 bytes per key), and served again.
 *
 * <p>Thread-safe: the manifest is fixed, chunk files are immutable, and the kept entries are guarded by this
 * object's lock.
 */
public final class SnapshotDigests implements DigestSource {
    private final String name;
    private final DatasetSpec spec;
    private final SnapshotReader reader;
    private final SortedMap<PartitionId, Digest> digests;
    private final Map<PartitionId, PartitionEntry> partitions;
    private PartitionId keptPartition;
    private PackedEntries keptEntries;

    /**
     * @param digestOf a partition's digest as the current schema reads it (the archive's cached
     *     {@code digestAsRead}, so older-schema partitions are read once per archive, not once per source)
     */
    public SnapshotDigests(String name, DatasetSpec spec, Manifest manifest, SnapshotReader reader,
            java.util.function.Function<PartitionEntry, Digest> digestOf) {
        this.name = Objects.requireNonNull(name, "name");
        this.spec = spec;
        this.reader = reader;
        TreeMap<PartitionId, Digest> d = new TreeMap<>();
        TreeMap<PartitionId, PartitionEntry> p = new TreeMap<>();
        for (PartitionEntry e : manifest.partitions()) {
            PartitionId id = new PartitionId(e.values());
            d.put(id, digestOf.apply(e));
            p.put(id, e);
        }
        this.digests = Collections.unmodifiableSortedMap(d);
        this.partitions = p;
    }

    @Override
    public String name() {
        return name;
    }

    @Override
    public DatasetSpec spec() {
        return spec;
    }

    @Override
    public SortedMap<PartitionId, Digest> digests() {
        return digests;
    }

    @Override
    public void entries(PartitionId partition, EntryConsumer consumer) {
        PartitionEntry p = partitions.get(partition);
        if (p != null) {
            entriesOf(partition, p).forEach(consumer);
        }
    }

    private synchronized PackedEntries entriesOf(PartitionId id, PartitionEntry p) {
        if (!id.equals(keptPartition)) {
            PackedEntries packed = new PackedEntries();
            reader.keyHashes(p, packed::add, new IoCounters());
            keptPartition = id;
            keptEntries = packed;
        }
        return keptEntries;
    }

    @Override
    public Map<ByteBuffer, List<Row>> versions(PartitionId partition, Set<ByteBuffer> keys) {
        PartitionEntry p = partitions.get(partition);
        return p == null || keys.isEmpty() ? Map.of() : reader.lookup(p, keys, new IoCounters());
    }
}
