package dev.onefold.internal.archive;

import java.util.Collections;
import java.util.List;
import java.util.SortedMap;
import java.util.TreeMap;
import org.roaringbitmap.RoaringBitmap;

/**
 * The planned rewrite of one batch against one base version: one task per touched partition (sorted by name),
 * the fingerprint of the task each touched partition's result must answer, the key hashes of the batch (to detect
 * concurrent writers that may hold the same keys), and what planning found and read. A batch applied in several
 * slices commits a plan with no tasks left (they ran slice by slice) but the fingerprints of each partition's last
 * task. Immutable once built (the bitmap is never modified after planning).
 */
public record Plan(Manifest base, List<RewriteTask> tasks, SortedMap<String, Long> fingerprints,
        RoaringBitmap batchKeyHashes, long keysMoved, long archiveSuperseded, long archiveConflicts, long planBytesRead) {
    public Plan {
        tasks = List.copyOf(tasks);
        fingerprints = Collections.unmodifiableSortedMap(new TreeMap<>(fingerprints));
    }

    /** A plan whose tasks are all still to run. */
    public Plan(Manifest base, List<RewriteTask> tasks, RoaringBitmap batchKeyHashes, long keysMoved,
            long archiveSuperseded, long archiveConflicts, long planBytesRead) {
        this(base, tasks, fingerprintsOf(tasks), batchKeyHashes, keysMoved, archiveSuperseded, archiveConflicts,
                planBytesRead);
    }

    private static SortedMap<String, Long> fingerprintsOf(List<RewriteTask> tasks) {
        SortedMap<String, Long> out = new TreeMap<>();
        for (RewriteTask t : tasks) {
            out.put(t.name(), t.fingerprint());
        }
        return out;
    }
}
