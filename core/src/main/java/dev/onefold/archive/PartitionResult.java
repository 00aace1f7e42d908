package dev.onefold.archive;

import dev.onefold.internal.archive.RewriteResult;
import java.util.List;

/**
 * The outcome of one {@link PartitionTask}: the partition's new chunk files (written and synced) with their
 * statistics and digest, ready for {@link Archive#commit}. Travels between processes as {@link #toBytes()}.
 * Immutable and thread-safe.
 */
public final class PartitionResult {
    final RewriteResult result;

    PartitionResult(RewriteResult result) {
        this.result = result;
    }

    public List<String> partition() {
        return result.partition().values();
    }

    /** Entries (keys) the partition holds after the rewrite. */
    public long entries() {
        return result.partition().entries();
    }

    public byte[] toBytes() {
        return result.toBytes();
    }

    /**
     * Reads a result sent by {@link #toBytes()}.
     *
     * @throws dev.onefold.OnefoldException CORRUPT when the bytes are damaged
     */
    public static PartitionResult fromBytes(byte[] bytes) {
        return new PartitionResult(RewriteResult.fromBytes(bytes));
    }
}
