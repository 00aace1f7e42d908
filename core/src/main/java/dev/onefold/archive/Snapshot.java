package dev.onefold.archive;

import dev.onefold.internal.archive.IoCounters;
import dev.onefold.internal.archive.Manifest;
import dev.onefold.internal.archive.PartitionEntry;
import dev.onefold.internal.archive.PartitionNames;
import dev.onefold.internal.archive.SnapshotDigests;
import dev.onefold.internal.archive.SnapshotReader;
import dev.onefold.reconcile.Digest;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Spliterator;
import java.util.Spliterators;
import java.util.stream.Stream;
import java.util.stream.StreamSupport;

/**
 * One committed version of an archive, fixed: later commits do not change what it returns (until cleanup expires
 * the version). Rows come out one per visible key (one per sibling under vector-clock {@code keep-all}), sorted
 * by the spec's order with the key as final tie-breaker within each partition; partitions follow one another by
 * name, which is global order when the partition rule is a time bucket of the leading ascending order field
 * ({@link #globallyOrdered()}).
 *
 * <p>Let A be an archive after applying batches B1..Bn in any order and grouping. Then {@code rows()} equals
 * the batch engine's survivors of B1 ∪ .. ∪ Bn, taken partition by partition (for join policies, with
 * tombstones kept; with a tombstone horizon, keys deleted longer ago may reappear only if an older version of
 * them arrives after the horizon).
 *
 * <p>Immutable and thread-safe. Streams read chunk files lazily and must be closed (try-with-resources); a
 * lookup costs one key-hash index probe per chunk (cached) and one chunk read per chunk that may hold the key.
 */
public final class Snapshot<R> {
    private final Manifest manifest;
    private final SnapshotReader reader;
    private final RecordAccess<R> access;
    private final Archive<R> archive;

    Snapshot(Archive<R> archive, Manifest manifest, SnapshotReader reader, RecordAccess<R> access) {
        this.archive = archive;
        this.manifest = manifest;
        this.reader = reader;
        this.access = access;
    }

    /** The version number (0 for an archive nothing was committed to). */
    public long version() {
        return manifest.version();
    }

    public Instant committedAt() {
        return Instant.ofEpochMilli(manifest.createdMillis());
    }

    /** The partitions in name order, with digests as in {@link #digest()}. */
    public List<PartitionInfo> partitions() {
        List<PartitionInfo> out = new ArrayList<>();
        for (PartitionEntry p : manifest.partitions()) {
            out.add(new PartitionInfo(p.values(), p.name(), p.entries(), p.tombstones(), p.chunks().size(), p.bytes(),
                    archive.digestAsRead(p)));
        }
        return out;
    }

    /** Whether {@link #rows()} is in the spec's order across partitions too. */
    public boolean globallyOrdered() {
        return manifest.partitions().size() <= 1 || archive.engine.codecs().dataset().partitionsFollowOrder();
    }

    /**
     * The digest of the whole snapshot: the partitions' digests combined, each over the records as the current
     * schema reads them (a partition written under an earlier schema is read once to compute it).
     */
    public Digest digest() {
        var checks = archive.engine.codecs().spec().checks();
        Digest d = Digest.empty(checks.size());
        for (PartitionEntry p : manifest.partitions()) {
            d = d.combine(archive.digestAsRead(p), checks);
        }
        return d;
    }

    /**
     * This snapshot as a reconciliation source named {@code name}: digests straight from the manifest (no file
     * is read; only partitions last written under an older codec writer id are re-digested from their chunks),
     * drill-down reading only the chunks of the partition asked about. Partition ids are the
     * partitions' values ({@link dev.onefold.reconcile.PartitionId#WHOLE} when the dataset is unpartitioned), so
     * an archive and a record stream of the same content under the same spec give equal digests. Thread-safe.
     */
    public DigestSource digestSource(String name) {
        return new SnapshotDigests(name, archive.engine.codecs().spec(), manifest, reader, archive::digestAsRead);
    }

    /** All visible records, partition by partition, each partition in order. Close the stream. */
    public Stream<R> rows() {
        return stream(reader.rows(manifest.partitions(), new IoCounters()));
    }

    /** The visible records of one partition in order (empty when the partition does not exist). Close the stream. */
    public Stream<R> rows(List<String> partition) {
        PartitionEntry p = manifest.byName().get(PartitionNames.encode(partition));
        return stream(reader.rows(p == null ? List.of() : List.of(p), new IoCounters()));
    }

    private Stream<R> stream(Iterator<Row> rows) {
        return StreamSupport.stream(Spliterators.spliteratorUnknownSize(rows, Spliterator.ORDERED | Spliterator.NONNULL),
                false).map(access::fromRow);
    }

    /**
     * The stored merge state of a key, tombstones included, in the canonical bytes a
     * {@link dev.onefold.gate.StreamGate} compares (as its {@code Policy} writes them, whatever the archive's payload
     * codec; states written under an older schema are read as the current one); null when the key is not stored
     * in this version. {@code key} is the key's encoded bytes, as {@link dev.onefold.gate.Decision#keyBytes()}
     * carries them.
     *
     * <p>Cost: one key-hash index probe per chunk (cached) and one chunk read per chunk whose index may hold the
     * key, stopping at the first chunk that holds it.
     */
    public byte[] storedState(byte[] key) {
        Object state = reader.state(manifest.partitions(), java.util.Objects.requireNonNull(key, "key"), new IoCounters());
        return state == null ? null : archive.engine.codecs().canonicalBytes(state);
    }

    /**
     * The visible records of the key that {@code probe} carries (its other fields are ignored): empty when the
     * key is absent or deleted, several for siblings under {@code keep-all}.
     *
     * @throws dev.onefold.OnefoldException INVALID_RECORD when the probe has no usable key
     */
    public List<R> lookup(R probe) {
        byte[] key = archive.engine.codecs().dataset().key(access.toRow(probe));
        List<R> out = new ArrayList<>();
        for (Row r : reader.lookup(manifest.partitions(), key, new IoCounters())) {
            out.add(access.fromRow(r));
        }
        return out;
    }
}
