package dev.onefold.archive;

import dev.onefold.reconcile.Digest;
import java.util.List;

/**
 * One partition of a snapshot: its values (one per partition field; a time bucket such as
 * {@code 2024-02-29T13}; empty for an unpartitioned dataset), its storage name, how many keys it stores
 * ({@code entries}, deleted ones included), how many of them are tombstones, its chunk files and bytes, and the
 * content digest of its visible records (live keys, records, order-independent hash, declared aggregates).
 * Immutable.
 */
public record PartitionInfo(List<String> values, String name, long entries, long tombstones, int chunkFiles, long bytes,
        Digest digest) {
    public PartitionInfo {
        values = java.util.Collections.unmodifiableList(new java.util.ArrayList<>(values));
    }
}
