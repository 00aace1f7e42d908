package dev.onefold.internal.archive;

import dev.onefold.spi.Storage;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * Cleanup: expires old manifest versions and deletes files that no retained version references.
 *
 * <h2>Invariants</h2>
 * The latest version is always kept, so reading the latest snapshot returns the same records before and after.
 * A file newer than the grace period is never deleted, which protects chunks a writer has written but not yet
 * committed; after the grace period such files are orphans of a crashed or beaten writer. Expired versions
 * can no longer be opened as snapshots.
 *
 * <h2>Complexity</h2>
 * Lists the manifest and chunk directories once and reads each retained manifest. Thread-safe; may run while
 * writers commit (their new files are younger than the grace period), but only one cleanup at a time is useful.
 */
public final class Sweeper {
    private final Storage storage;
    private final Committer committer;

    public Sweeper(Storage storage, Committer committer) {
        this.storage = storage;
        this.committer = committer;
    }

    /** What one cleanup removed. */
    public record Result(List<Long> expiredVersions, List<String> deletedFiles) {}

    /**
     * Runs one cleanup.
     *
     * @param keepVersions how many of the newest versions to keep (at least 1)
     * @param keepNewerThanMillis also keep versions whose manifest is younger than this (-1: no age rule)
     * @param graceMillis only delete unreferenced files older than this
     */
    public Result sweep(int keepVersions, long keepNewerThanMillis, long graceMillis, long nowMillis) {
        List<Long> versions = committer.versions();
        List<Long> expired = new ArrayList<>();
        Set<String> referenced = new HashSet<>();
        for (int i = 0; i < versions.size(); i++) {
            long v = versions.get(i);
            String name = Manifest.fileName(v);
            boolean keep = i >= versions.size() - Math.max(1, keepVersions)
                    || (keepNewerThanMillis >= 0 && storage.modifiedMillis(name) >= nowMillis - keepNewerThanMillis);
            if (keep) {
                for (PartitionEntry p : committer.read(v).partitions()) {
                    p.chunks().forEach(c -> referenced.add(c.name()));
                }
            } else {
                expired.add(v);
            }
        }
        List<String> deleted = new ArrayList<>();
        for (long v : expired) {
            storage.delete(Manifest.fileName(v));
        }
        for (String name : storage.list("chunks/")) {
            if (!referenced.contains(name) && isOld(name, graceMillis, nowMillis)) {
                storage.delete(name);
                deleted.add(name);
            }
        }
        for (String name : storage.list(ManifestFormat.PREFIX)) {
            if (ManifestFormat.versionOf(name) < 0 && isOld(name, graceMillis, nowMillis)) {
                storage.delete(name);
                deleted.add(name);
            }
        }
        return new Result(expired, deleted);
    }

    private boolean isOld(String name, long graceMillis, long nowMillis) {
        long modified = storage.modifiedMillis(name);
        return modified >= 0 && modified < nowMillis - graceMillis;
    }
}
