package dev.onefold.internal.merge;

/**
 * Counters a policy bumps while merging: exact duplicates, superseded versions and conflicts (equal version,
 * different content). Not thread-safe: one instance per worker, summed with {@link #add}.
 */
public final class MergeCounts {
    public long duplicates;
    public long superseded;
    public long conflicts;

    public void add(MergeCounts other) {
        duplicates += other.duplicates;
        superseded += other.superseded;
        conflicts += other.conflicts;
    }
}
