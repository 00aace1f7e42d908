package dev.onefold.internal.archive;

import dev.onefold.reconcile.Digest;
import java.util.List;

/**
 * A partition in a manifest: its values, its storage name step ({@link PartitionNames}), its chunks in order,
 * the content digest of its visible records, and its entry (key), tombstone and byte counts. Immutable.
 */
public record PartitionEntry(List<String> values, String name, List<ChunkRef> chunks, Digest digest, long entries,
        long tombstones, long bytes) {
    public PartitionEntry {
        values = java.util.Collections.unmodifiableList(new java.util.ArrayList<>(values));
        chunks = List.copyOf(chunks);
    }

    /** First order bytes of the partition. */
    public byte[] minOrder() {
        return chunks.get(0).minOrder();
    }

    /** Last order bytes of the partition. */
    public byte[] maxOrder() {
        return chunks.get(chunks.size() - 1).maxOrder();
    }

    /** Whether two entries list the very same chunk files. */
    public boolean sameChunks(PartitionEntry other) {
        if (other == null || other.chunks.size() != chunks.size()) {
            return false;
        }
        for (int i = 0; i < chunks.size(); i++) {
            if (!chunks.get(i).name().equals(other.chunks.get(i).name())) {
                return false;
            }
        }
        return true;
    }
}
