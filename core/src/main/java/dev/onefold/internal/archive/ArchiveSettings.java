package dev.onefold.internal.archive;

import java.nio.file.Path;
import java.time.Clock;

/**
 * The knobs of an archive: memory budget for consolidating a batch, spill directory, worker threads for
 * partition rewrites, tombstone horizon in milliseconds (-1 keeps tombstones forever), chunk size target,
 * clock, and how many commit attempts a writer makes before giving up. Immutable.
 */
public record ArchiveSettings(long memoryBudgetBytes, Path spillDirectory, int parallelism, long tombstoneHorizonMillis,
        long chunkTargetBytes, Clock clock, int maxCommitAttempts) {}
