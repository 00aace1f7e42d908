package dev.onefold.archive;

import dev.onefold.internal.archive.RewriteTask;
import java.util.List;

/**
 * The rewrite of one partition, planned by {@link Archive#plan} and run by {@link Archive#rewrite} in any
 * thread or process that opens the same archive. It carries everything the rewrite needs (the partition's base
 * chunks, the keys it drops, the batch's merged states for it), so it can travel as {@link #toBytes()}.
 * Immutable and thread-safe.
 */
public final class PartitionTask {
    final RewriteTask task;

    PartitionTask(RewriteTask task) {
        this.task = task;
    }

    /** The partition's values. */
    public List<String> partition() {
        return task.values();
    }

    /** How many of the batch's keys land in this partition. */
    public int incomingKeys() {
        return task.incoming().size();
    }

    public byte[] toBytes() {
        return task.toBytes();
    }

    /**
     * Reads a task sent by {@link #toBytes()}.
     *
     * @throws dev.onefold.OnefoldException CORRUPT when the bytes are damaged
     */
    public static PartitionTask fromBytes(byte[] bytes) {
        return new PartitionTask(RewriteTask.fromBytes(bytes));
    }
}
