package dev.onefold.internal.archive;

import dev.onefold.BatchReport;
import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.Consolidator;
import dev.onefold.internal.engine.KeyedState;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.UUID;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.function.Consumer;
import org.roaringbitmap.RoaringBitmap;

/**
 * Drives an apply: consolidate the batch, plan against the latest version, rewrite the touched partitions (in
 * parallel, each a pure function of its task, so the result equals a serial run), commit, and on a conflicting
 * concurrent commit re-plan against the newer version, rewriting only partitions whose task changed.
 *
 * <h2>Invariants</h2>
 * One apply publishes at most one version; content after applying B1 then B2 equals content after applying
 * their union (for join policies), because each key's stored state is merged with its batch state and placed
 * by the merged anchor.
 *
 * <h2>Complexity</h2>
 * O(batch log batch) to consolidate and group by partition, plus reading and writing the touched partitions once
 * (a partition whose share of the batch spans several slices is rewritten once per slice), plus the key-hash
 * probes described in {@link Planner}. Memory: the budget (half for folding by key, half for grouping by
 * partition, both spilling), then one slice of a quarter of the budget with what planning it finds, the batch's
 * key hashes (a few bytes per key, kept to detect concurrent writers), and about two chunks per worker thread.
 * Thread-safe: every call works on its own objects.
 */
public final class ArchiveEngine {
    private final DatasetCodecs codecs;
    private final ChunkStore chunks;
    private final Committer committer;
    private final PartitionRewriter rewriter;
    private final ArchiveSettings settings;

    public ArchiveEngine(Storage storage, DatasetCodecs codecs, ArchiveSettings settings) {
        this.codecs = codecs;
        // the index cache is part of the memory an archive may use: a quarter of the budget, at most 64 MiB
        this.chunks = new ChunkStore(storage, Math.min(64L << 20, settings.memoryBudgetBytes() / 4));
        this.committer = new Committer(chunks, codecs, settings.clock());
        this.rewriter = new PartitionRewriter(codecs, chunks);
        this.settings = settings;
    }

    public DatasetCodecs codecs() { return codecs; }
    public ChunkStore chunks() { return chunks; }
    public Committer committer() { return committer; }
    public ArchiveSettings settings() { return settings; }

    /**
     * Consolidates records: rejects go to {@code rejects}, the rest fold into one state per key (spilling under
     * half the memory budget), grouped by partition (spilling under the other half). Close the batch.
     */
    public <R> GroupedBatch consolidate(Iterator<? extends R> records, RecordAccess<R> access, String source,
            Consumer<Rejection> rejects) {
        Policy<Object> policy = codecs.policy();
        long in = 0;
        long half = Math.max(1, settings.memoryBudgetBytes() / 2);
        try (Consolidator c = new Consolidator(codecs.dataset(), half, settings.spillDirectory(), settings.parallelism() > 1);
                GroupedBatch.Grouper grouper = new GroupedBatch.Grouper(half, settings.spillDirectory(),
                        settings.parallelism() > 1)) {
            while (records.hasNext()) {
                R record = records.next();
                long position = in++;
                Row row;
                try {
                    row = access.toRow(record);
                } catch (OnefoldException e) {
                    if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                        throw e;
                    }
                    c.reject(source, position, e.getMessage(), record, rejects);
                    continue;
                }
                c.add(row, source, position, record, rejects);
            }
            long keys = 0;
            long siblings = 0;
            long deleted = 0;
            long out = 0;
            try (CloseableIterator<KeyedState> folded = c.folded()) {
                while (folded.hasNext()) {
                    KeyedState ks = folded.next();
                    Object s = ks.state(policy);
                    grouper.add(PartitionNames.encode(codecs.partition(s)), ks);
                    keys++;
                    siblings += policy.hasSiblings(s) ? 1 : 0;
                    int visible = policy.visible(s).size();
                    deleted += visible == 0 ? 1 : 0;
                    out += visible;
                }
            }
            var counts = c.counts();
            BatchReport report = new BatchReport(in, c.accepted(), c.rejected(), counts.duplicates, counts.superseded,
                    counts.conflicts, keys, siblings, deleted, out, c.spilledRuns(), !policy.isJoin());
            return grouper.finish(report);
        }
    }

    /** Plans a whole batch, held in memory, against the latest version (or {@code base} when given). */
    public Plan plan(GroupedBatch batch, Manifest base, long nowMillis) {
        return plan(batch.all(), base == null ? committer.latest() : base, nowMillis);
    }

    private Plan plan(List<KeyedState> states, Manifest base, long nowMillis) {
        return new Planner(codecs, chunks).plan(states, base, nowMillis, settings.tombstoneHorizonMillis(),
                settings.chunkTargetBytes());
    }

    /** Rewrites one partition. */
    public RewriteResult rewrite(RewriteTask task) {
        return rewriter.run(task);
    }

    /** What an apply did: the plan that was committed, its results and the published version. */
    public record Applied(Manifest manifest, Plan plan, List<RewriteResult> results, int attempts, long planBytesRead) {}

    /**
     * Applies a consolidated batch: plan and rewrite it slice by slice, commit once, re-plan on conflict.
     *
     * @throws OnefoldException CONCURRENT_COMMIT when other writers won {@link ArchiveSettings#maxCommitAttempts()}
     *     times; IO or CORRUPT from storage
     */
    public Applied apply(GroupedBatch batch) {
        long now = settings.clock().millis();
        String commitId = UUID.randomUUID().toString();
        Map<Long, RewriteResult> done = new HashMap<>();
        Manifest base = committer.latest();
        long planRead = 0;
        int attempts = 0;
        while (true) {
            Staged staged = stage(batch, base, now, done);
            planRead += staged.plan().planBytesRead();
            Committer.Outcome o = committer.commit(staged.plan(), staged.results(), commitId,
                    settings.maxCommitAttempts() - attempts);
            if (o instanceof Committer.Committed c) {
                for (String name : staged.superseded()) {
                    chunks.storage().delete(name);
                }
                return new Applied(c.manifest(), staged.plan(), staged.results(), attempts + c.attempts(), planRead);
            }
            Committer.Conflict conflict = (Committer.Conflict) o;
            attempts += conflict.attempts();
            if (attempts >= settings.maxCommitAttempts()) {
                throw new OnefoldException(OnefoldException.Kind.CONCURRENT_COMMIT, "other writers changed the same "
                        + "partitions " + attempts + " times in a row; the batch was not committed");
            }
            base = conflict.newer();
        }
    }

    /**
     * A batch planned and rewritten against one base: the plan to commit, each touched partition's final result,
     * and chunk files that a later slice rewrote again (never published, deleted once the commit succeeds).
     */
    private record Staged(Plan plan, List<RewriteResult> results, List<String> superseded) {}

    /**
     * Plans and rewrites the batch slice by slice, each slice against the base plus the earlier slices' results.
     * Slices hold disjoint keys, so this equals planning the whole batch at once (each key merges only with its
     * own stored state), while memory holds one slice: a quarter of the budget, leaving room for the states found
     * in the archive and the tasks built from them. A batch that fits one slice is planned exactly once.
     */
    private Staged stage(GroupedBatch batch, Manifest base, long now, Map<Long, RewriteResult> done) {
        TreeMap<String, RewriteResult> last = new TreeMap<>();
        TreeMap<String, Long> fingerprints = new TreeMap<>();
        List<String> superseded = new ArrayList<>();
        RoaringBitmap hashes = new RoaringBitmap();
        Manifest[] working = {base};
        long[] sums = new long[4];
        Staged[] only = {null};
        int[] slices = {0};
        batch.forEachSlice(Math.max(1, settings.memoryBudgetBytes() / 4), slice -> {
            Plan p = plan(slice, working[0], now);
            List<RewriteResult> results = runAll(p.tasks(), done);
            for (int i = 0; i < results.size(); i++) {
                RewriteResult earlier = last.put(results.get(i).partition().name(), results.get(i));
                if (earlier != null) {
                    earlier.partition().chunks().forEach(c -> superseded.add(c.name()));
                }
                fingerprints.put(p.tasks().get(i).name(), p.tasks().get(i).fingerprint());
            }
            working[0] = withResults(working[0], results);
            hashes.or(p.batchKeyHashes());
            sums[0] += p.keysMoved();
            sums[1] += p.archiveSuperseded();
            sums[2] += p.archiveConflicts();
            sums[3] += p.planBytesRead();
            only[0] = new Staged(p, results, List.of());
            slices[0]++;
        });
        if (slices[0] == 0) {
            return new Staged(plan(List.of(), base, now), List.of(), List.of());
        }
        if (slices[0] == 1) {
            return only[0];
        }
        Plan combined = new Plan(base, List.of(), fingerprints, hashes, sums[0], sums[1], sums[2], sums[3]);
        return new Staged(combined, new ArrayList<>(last.values()), superseded);
    }

    /** The base version with results replacing (or, when empty, removing) their partitions; not published. */
    private static Manifest withResults(Manifest base, List<RewriteResult> results) {
        TreeMap<String, PartitionEntry> parts = new TreeMap<>(base.byName());
        for (RewriteResult r : results) {
            if (r.isEmpty()) {
                parts.remove(r.partition().name());
            } else {
                parts.put(r.partition().name(), r.partition());
            }
        }
        return new Manifest(base.version(), base.commitId(), base.createdMillis(), base.specHash(),
                List.copyOf(parts.values()));
    }

    /**
     * Runs tasks on the worker pool, reusing results of identical tasks already run; results in task order. The
     * new files of all tasks are synced together at the end (one storage call, so directories the partitions
     * share are synced once rather than once per partition), before any result can be committed.
     */
    private List<RewriteResult> runAll(List<RewriteTask> tasks, Map<Long, RewriteResult> done) {
        List<RewriteResult> out = new ArrayList<>(tasks.size());
        List<RewriteTask> todo = new ArrayList<>();
        for (RewriteTask t : tasks) {
            if (!done.containsKey(t.fingerprint())) {
                todo.add(t);
            }
        }
        int threads = Math.min(settings.parallelism(), todo.size());
        if (threads <= 1) {
            for (RewriteTask t : todo) {
                done.put(t.fingerprint(), rewriter.runUnsynced(t));
            }
        } else {
            ExecutorService pool = Executors.newFixedThreadPool(threads, r -> {
                Thread th = new Thread(r, "onefold-rewrite");
                th.setDaemon(true);
                return th;
            });
            try {
                List<Future<RewriteResult>> futures = new ArrayList<>();
                for (RewriteTask t : todo) {
                    futures.add(pool.submit(() -> rewriter.runUnsynced(t)));
                }
                RuntimeException failure = null;
                for (int i = 0; i < todo.size(); i++) {
                    try {
                        done.put(todo.get(i).fingerprint(), futures.get(i).get());
                    } catch (ExecutionException e) {
                        RuntimeException cause = e.getCause() instanceof RuntimeException re ? re
                                : new OnefoldException(OnefoldException.Kind.IO, "partition rewrite failed: " + e.getCause(), e.getCause());
                        if (failure == null) {
                            failure = cause;
                        } else {
                            failure.addSuppressed(cause);
                        }
                    } catch (InterruptedException e) {
                        Thread.currentThread().interrupt();
                        throw new OnefoldException(OnefoldException.Kind.IO, "interrupted while rewriting partitions", e);
                    }
                }
                if (failure != null) {
                    throw failure;
                }
            } finally {
                pool.shutdownNow();
            }
        }
        List<RewriteResult> fresh = new ArrayList<>(todo.size());
        for (RewriteTask t : todo) {
            fresh.add(done.get(t.fingerprint()));
        }
        PartitionRewriter.sync(chunks.storage(), fresh);
        for (RewriteTask t : tasks) {
            out.add(done.get(t.fingerprint()));
        }
        return out;
    }

    /**
     * Commits results produced elsewhere for a plan, rebasing when possible.
     *
     * @throws OnefoldException CONCURRENT_COMMIT when a newer version interferes (plan again) or attempts ran out
     */
    public Manifest commit(Plan plan, List<RewriteResult> results) {
        Committer.Outcome o = committer.commit(plan, results, UUID.randomUUID().toString(), settings.maxCommitAttempts());
        if (o instanceof Committer.Committed c) {
            return c.manifest();
        }
        throw new OnefoldException(OnefoldException.Kind.CONCURRENT_COMMIT, "version "
                + ((Committer.Conflict) o).newer().version() + " changed partitions this plan rewrites; plan again");
    }
}
