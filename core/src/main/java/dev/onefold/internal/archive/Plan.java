package dev.onefold.internal.archive;

import java.util.List;
import org.roaringbitmap.RoaringBitmap;

/**
 * The planned rewrite of one batch against one base version: one task per touched partition (sorted by name),
 * the key hashes of the batch (to detect concurrent writers that may hold the same keys), and what planning
 * found and read. Immutable once built (the bitmap is never modified after planning).
 */
public record Plan(Manifest base, List<RewriteTask> tasks, RoaringBitmap batchKeyHashes, long keysMoved,
        long archiveSuperseded, long archiveConflicts, long planBytesRead) {
    public Plan {
        tasks = List.copyOf(tasks);
    }
}
