package dev.onefold.internal.archive;

import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.merge.Policy;
import dev.onefold.reconcile.Digest;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.record.Row;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.NoSuchElementException;
import java.util.PriorityQueue;
import java.util.Set;
import java.util.function.BiConsumer;
import org.roaringbitmap.RoaringBitmap;

/**
 * Reads the visible records of a manifest version: per partition in order, across partitions in partition-name
 * order, and by key.
 *
 * <h2>Invariants</h2>
 * Records come out sorted by (order bytes, canonical record bytes), the same total order the batch engine uses.
 * Entries are stored by their smallest visible order, so a record can be emitted as soon as the next entry's
 * order passes it; only siblings still waiting are buffered (bounded by the siblings of a few keys).
 *
 * <h2>Complexity</h2>
 * Streaming: one chunk in memory at a time. A key lookup probes every chunk's key-hash index (cached after the
 * first read) and reads only chunks whose index holds the key's hash. Thread-safe: holds no mutable state.
 */
public final class SnapshotReader {
    private final DatasetCodecs codecs;
    private final ChunkStore chunks;

    public SnapshotReader(DatasetCodecs codecs, ChunkStore chunks) {
        this.codecs = codecs;
        this.chunks = chunks;
    }

    private record Pending(byte[] order, byte[] content, Row row) {}

    private static final Comparator<Pending> ORDER = (a, b) -> {
        int c = Arrays.compareUnsigned(a.order, b.order);
        return c != 0 ? c : Arrays.compareUnsigned(a.content, b.content);
    };

    /** The visible records of the given partitions, one partition after the other, each in order. */
    public Iterator<Row> rows(List<PartitionEntry> partitions, IoCounters io) {
        Iterator<PartitionEntry> parts = partitions.iterator();
        return new Iterator<>() {
            Iterator<Row> current = java.util.Collections.emptyIterator();

            @Override
            public boolean hasNext() {
                while (!current.hasNext()) {
                    if (!parts.hasNext()) {
                        return false;
                    }
                    current = rows(parts.next(), io);
                }
                return true;
            }

            @Override
            public Row next() {
                if (!hasNext()) {
                    throw new NoSuchElementException();
                }
                return current.next();
            }
        };
    }

    private Iterator<Row> rows(PartitionEntry partition, IoCounters io) {
        Iterator<ChunkStore.Located> entries = chunks.entries(partition.chunks(), io);
        BoundDataset dataset = codecs.dataset();
        Policy<Object> policy = codecs.policy();
        return new Iterator<>() {
            final PriorityQueue<Pending> pending = new PriorityQueue<>(ORDER);
            ChunkStore.Located lookahead = entries.hasNext() ? entries.next() : null;

            private void fill() {
                while (lookahead != null && (pending.isEmpty()
                        || Arrays.compareUnsigned(pending.peek().order, lookahead.entry().order()) >= 0)) {
                    ChunkStore.Located l = lookahead;
                    Object state = codecs.decode(l.writerId(), l.entry().state(), l.file());
                    for (Row r : policy.visible(state)) {
                        pending.add(new Pending(dataset.order(r), RowCodec.encode(r), r));
                    }
                    lookahead = entries.hasNext() ? entries.next() : null;
                }
            }

            @Override
            public boolean hasNext() {
                fill();
                return !pending.isEmpty();
            }

            @Override
            public Row next() {
                if (!hasNext()) {
                    throw new NoSuchElementException();
                }
                return pending.poll().row;
            }
        };
    }

    /**
     * The digest of a partition's visible records as the current schema reads them. Equals the manifest's digest
     * when every chunk was written under the current writer id; after a schema change, chunks written earlier
     * read differently (defaults filled in, fields dropped or widened), and so does their digest. Cost: one read
     * of the partition.
     */
    public Digest digest(PartitionEntry partition, IoCounters io) {
        Digest.Builder digest = new Digest.Builder(codecs.spec(), codecs.schema());
        Iterator<ChunkStore.Located> entries = chunks.entries(partition.chunks(), io);
        while (entries.hasNext()) {
            ChunkStore.Located l = entries.next();
            for (Row r : codecs.policy().visible(codecs.decode(l.writerId(), l.entry().state(), l.file()))) {
                digest.add(l.entry().key(), r);
            }
        }
        return digest.build();
    }

    /** The visible records of one key (empty when absent or deleted). */
    public List<Row> lookup(List<PartitionEntry> partitions, byte[] key, IoCounters io) {
        Object state = state(partitions, key, io);
        if (state == null) {
            return List.of();
        }
        List<Row> rows = new ArrayList<>(codecs.policy().visible(state));
        rows.sort(Comparator.comparing((Row r) -> codecs.dataset().order(r), Arrays::compareUnsigned)
                .thenComparing(RowCodec::encode, Arrays::compareUnsigned));
        return rows;
    }

    /**
     * The stored merge state of one key, tombstones included, decoded as the current schema; null when the key
     * is not stored. Reads only chunks whose key-hash index holds the key's hash, and stops at the first match
     * (a key is stored once per version).
     */
    public Object state(List<PartitionEntry> partitions, byte[] key, IoCounters io) {
        int hash = ChunkFormat.keyHash(key);
        for (PartitionEntry p : partitions) {
            for (ChunkRef c : p.chunks()) {
                if (!chunks.index(c, io).contains(hash)) {
                    continue;
                }
                Iterator<ChunkEntry> it = chunks.open(c, io).iterator();
                while (it.hasNext()) {
                    ChunkEntry e = it.next();
                    if (Arrays.equals(e.key(), key)) {
                        return codecs.decode(c.writerId(), e.state(), c.name());
                    }
                }
            }
        }
        return null;
    }

    /**
     * The visible records of the wanted keys that one partition holds live, each key's records in order. Reads
     * only the partition's chunks whose key-hash index holds a wanted key's hash.
     */
    public Map<ByteBuffer, List<Row>> lookup(PartitionEntry partition, Set<ByteBuffer> keys, IoCounters io) {
        RoaringBitmap hashes = new RoaringBitmap();
        for (ByteBuffer k : keys) {
            hashes.add(ChunkFormat.keyHash(bytes(k)));
        }
        Map<ByteBuffer, List<Row>> out = new LinkedHashMap<>();
        for (ChunkRef c : partition.chunks()) {
            if (!RoaringBitmap.intersects(chunks.index(c, io), hashes)) {
                continue;
            }
            Iterator<ChunkEntry> it = chunks.open(c, io).iterator();
            while (it.hasNext()) {
                ChunkEntry e = it.next();
                if (!e.deleted() && keys.contains(ByteBuffer.wrap(e.key()))) {
                    List<Row> rows = new ArrayList<>(codecs.policy().visible(codecs.decode(c.writerId(), e.state(), c.name())));
                    rows.sort(Comparator.comparing((Row r) -> codecs.dataset().order(r), Arrays::compareUnsigned)
                            .thenComparing(RowCodec::encode, Arrays::compareUnsigned));
                    out.put(ByteBuffer.wrap(e.key()), rows);
                }
            }
        }
        return out;
    }

    /**
     * Passes every live key of one partition with its {@link Digest#keyHash}, in stored order. Reads each of the
     * partition's chunks once and decodes every state; reads no other file.
     */
    public void keyHashes(PartitionEntry partition, DigestSource.EntryConsumer consumer, IoCounters io) {
        forEachLive(partition, io, (key, visible) -> consumer.accept(key, Digest.keyHash(key, visible)));
    }

    private void forEachLive(PartitionEntry partition, IoCounters io, BiConsumer<byte[], List<Row>> visitor) {
        Iterator<ChunkStore.Located> entries = chunks.entries(partition.chunks(), io);
        while (entries.hasNext()) {
            ChunkStore.Located l = entries.next();
            if (!l.entry().deleted()) {
                visitor.accept(l.entry().key(), codecs.policy().visible(codecs.decode(l.writerId(), l.entry().state(), l.file())));
            }
        }
    }

    private static byte[] bytes(ByteBuffer b) {
        byte[] out = new byte[b.remaining()];
        b.duplicate().get(out);
        return out;
    }
}
