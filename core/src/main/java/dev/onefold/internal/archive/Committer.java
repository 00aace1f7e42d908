package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import dev.onefold.spi.Storage;
import java.time.Clock;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;
import org.roaringbitmap.RoaringBitmap;

/**
 * Publishes rewritten partitions as the next manifest version, and reads manifests.
 *
 * <h2>Atomicity</h2>
 * A version exists exactly when its manifest file exists, and the manifest file is published by one
 * {@link Storage#createIfAbsent} of {@code manifests/v<N+1>}: readers see all of a commit or none of it. Chunk
 * files are immutable and uniquely named, so a commit never changes a file another version references.
 *
 * <h2>Ordering</h2>
 * Chunk files are written and synced by the workers before a {@link RewriteResult} exists; only then is the
 * manifest created, itself durably. So a published manifest never references a file a crash could lose. Of two
 * writers racing for version N+1 exactly one create succeeds. The loser reads the newer versions and rebases:
 * if no partition it rewrote changed since its base (and, without stable partitions, no newly committed chunk
 * may hold one of its keys, by key-hash index), its results still hold and it commits them on top of the newer
 * version; otherwise it reports a {@link Conflict} so the caller re-plans only against the newer version
 * (the apply loop reuses every partition result whose task did not change). Attempts are bounded.
 *
 * <h2>Crash recovery</h2>
 * Nothing to recover: a crash before the create leaves the previous version current and some unreferenced chunk
 * files, which {@link Sweeper} deletes after a grace period; a crash after it leaves the new version complete.
 * Re-applying the same batch afterwards converges to the same content, because merging is idempotent.
 *
 * <p>Thread-safe: holds no mutable state; concurrency control lives in the storage's create.
 */
public final class Committer {
    private final Storage storage;
    private final ChunkStore chunks;
    private final DatasetCodecs codecs;
    private final Clock clock;

    public Committer(ChunkStore chunks, DatasetCodecs codecs, Clock clock) {
        this.storage = chunks.storage();
        this.chunks = chunks;
        this.codecs = codecs;
        this.clock = clock;
    }

    /** How a commit attempt ended. */
    public sealed interface Outcome permits Committed, Conflict {}

    /** The plan's results are published as {@code manifest}. */
    public record Committed(Manifest manifest, int attempts) implements Outcome {}

    /** A concurrent writer changed what the plan depends on; re-plan against {@code newer}. */
    public record Conflict(Manifest newer, int attempts) implements Outcome {}

    /** All committed versions, ascending. */
    public List<Long> versions() {
        List<Long> out = new java.util.ArrayList<>();
        for (String n : storage.list(ManifestFormat.PREFIX)) {
            long v = ManifestFormat.versionOf(n);
            if (v >= 0) {
                out.add(v);
            }
        }
        return out;
    }

    /**
     * The latest committed version (the empty version 0 for a new archive).
     *
     * @throws OnefoldException CORRUPT naming the manifest file when it is damaged; USAGE when it was written
     *     under another dataset spec
     */
    public Manifest latest() {
        List<Long> v = versions();
        return v.isEmpty() ? Manifest.empty(codecs.specHash()) : read(v.get(v.size() - 1));
    }

    /** Reads one version. */
    public Manifest read(long version) {
        String name = Manifest.fileName(version);
        if (storage.size(name) < 0) {
            throw OnefoldException.usage("archive version " + version + " does not exist (no " + name + ")");
        }
        Manifest m = ManifestFormat.read(name, storage.read(name), version);
        if (m.specHash() != codecs.specHash()) {
            throw OnefoldException.usage(name + " was written under a different dataset spec than " + codecs.spec().toJson());
        }
        return m;
    }

    /**
     * Publishes the results of a plan, rebasing on newer versions when they do not interfere.
     *
     * @throws OnefoldException USAGE when results do not answer the plan's tasks one to one; CONCURRENT_COMMIT
     *     when other writers kept winning for {@code maxAttempts} attempts
     */
    public Outcome commit(Plan plan, List<RewriteResult> results, String commitId, int maxAttempts) {
        Map<String, RewriteResult> byName = matchResults(plan, results);
        if (byName.isEmpty()) {
            return new Committed(plan.base(), 0);
        }
        Manifest current = plan.base();
        for (int attempt = 1; attempt <= maxAttempts; attempt++) {
            if (current.version() != plan.base().version() && interferes(plan, current)) {
                return new Conflict(current, attempt);
            }
            TreeMap<String, PartitionEntry> parts = new TreeMap<>(current.byName());
            for (RewriteResult r : byName.values()) {
                if (r.isEmpty()) {
                    parts.remove(r.partition().name());
                } else {
                    parts.put(r.partition().name(), r.partition());
                }
            }
            Manifest next = new Manifest(current.version() + 1, commitId, clock.millis(), codecs.specHash(),
                    List.copyOf(parts.values()));
            if (storage.createIfAbsent(Manifest.fileName(next.version()), ManifestFormat.write(next))) {
                return new Committed(next, attempt);
            }
            current = latest();
        }
        throw new OnefoldException(OnefoldException.Kind.CONCURRENT_COMMIT, "other writers committed first "
                + maxAttempts + " times in a row; the batch was not committed (its chunk files are orphans that "
                + "cleanup removes)");
    }

    private static Map<String, RewriteResult> matchResults(Plan plan, List<RewriteResult> results) {
        Map<String, RewriteResult> byName = new TreeMap<>();
        for (RewriteResult r : results) {
            if (byName.put(r.partition().name(), r) != null) {
                throw OnefoldException.usage("two results for partition " + r.partition().name());
            }
        }
        for (Map.Entry<String, Long> t : plan.fingerprints().entrySet()) {
            RewriteResult r = byName.get(t.getKey());
            if (r == null) {
                throw OnefoldException.usage("no result for partition " + t.getKey() + " of the plan");
            }
            if (r.taskFingerprint() != t.getValue()) {
                throw OnefoldException.usage("the result for partition " + t.getKey() + " answers a different task");
            }
        }
        if (!plan.fingerprints().keySet().containsAll(byName.keySet())) {
            throw OnefoldException.usage("results name partitions the plan does not touch");
        }
        return byName;
    }

    /** Whether versions committed after the plan's base change what the plan read. */
    private boolean interferes(Plan plan, Manifest current) {
        Map<String, PartitionEntry> before = plan.base().byName();
        Map<String, PartitionEntry> now = current.byName();
        Set<String> touched = plan.fingerprints().keySet();
        TreeSet<String> names = new TreeSet<>(before.keySet());
        names.addAll(now.keySet());
        IoCounters io = new IoCounters();
        for (String name : names) {
            PartitionEntry b = before.get(name);
            PartitionEntry n = now.get(name);
            if (n != null ? n.sameChunks(b) : b == null) {
                continue;
            }
            if (touched.contains(name)) {
                return true;
            }
            if (!codecs.stablePartitions() && n != null) {
                Set<String> old = new HashSet<>();
                if (b != null) {
                    b.chunks().forEach(c -> old.add(c.name()));
                }
                for (ChunkRef c : n.chunks()) {
                    if (!old.contains(c.name()) && RoaringBitmap.intersects(plan.batchKeyHashes(), chunks.index(c, io))) {
                        return true;
                    }
                }
            }
        }
        return false;
    }
}
