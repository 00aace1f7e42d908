package dev.onefold.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.Rejection;
import dev.onefold.record.Row;
import java.nio.ByteBuffer;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.SortedMap;

/**
 * A store's content as reconciliation sees it: one {@link Digest} per partition and, for drill-down, the
 * (key, key hash) entries of one partition and the visible records of chosen keys. Implemented for record
 * streams and JDBC queries ({@link RecordDigests}, {@link JdbcDigests}) and by archive snapshots
 * ({@link dev.onefold.archive.Snapshot#digestSource}, digests from the manifest).
 *
 * <p>Vocabulary. Key bytes are {@code BoundDataset.key(row)} under the source's spec. A key's visible records are
 * what a reader of the store sees for it (one record, or one per sibling; none when deleted). A key's hash is
 * {@link Digest#keyHash}; a partition's digest counts its live keys and visible records and its content hash is
 * the sum of its keys' hashes.
 *
 * <p>Let {@code s} be a source and {@code p} a partition of {@code s.digests()}. Then {@code s.entries(p, c)}
 * calls {@code c} exactly once per live key of p, {@code s.digests().get(p).keys()} times in all, and the sum of
 * the hashes passed equals {@code s.digests().get(p).contentHash()} modulo 2^64; and for every key k so passed,
 * {@code s.versions(p, {k}).get(k)} are k's visible records, whose {@link Digest#keyHash} is the hash passed.
 * Partitions without live keys may be absent or present with an empty digest; both mean the same.
 *
 * <p>Implementations must be safe to call from one thread at a time; the content must not change while a
 * comparison runs (read a snapshot). Cost: {@link #digests()} should be cheap (stored or computed once);
 * {@link #entries} and {@link #versions} may read the partition.
 */
public interface DigestSource {

    /** Receives one (key bytes, key hash) entry; the key array must not be modified. */
    @FunctionalInterface
    interface EntryConsumer {
        void accept(byte[] key, long keyHash);
    }

    /** A short name for reports, for example {@code archive /data/shipments} or {@code h2 table readings}. */
    String name();

    /** The spec the digests were computed under; two sources compare only when key and checks agree. */
    DatasetSpec spec();

    /** The digest of every partition, in partition order. */
    SortedMap<PartitionId, Digest> digests();

    /** Passes every live key of a partition with its key hash, in any order; nothing for an unknown partition. */
    void entries(PartitionId partition, EntryConsumer consumer);

    /**
     * The visible records of the requested keys in one partition, by key bytes (wrapped in a ByteBuffer);
     * keys the partition does not hold live are absent from the result.
     */
    Map<ByteBuffer, List<Row>> versions(PartitionId partition, Set<ByteBuffer> keys);

    /** Records the source could not read while computing its digests, each with its reason (default: none). */
    default List<Rejection> rejections() {
        return List.of();
    }
}
