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
import java.util.UUID;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.function.Consumer;

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
 * O(batch log batch) to consolidate, plus reading and writing the touched partitions once, plus the key-hash
 * probes described in {@link Planner}. Memory: the consolidation budget, the batch's folded states (one per
 * distinct key) and about two chunks per worker thread. Thread-safe: every call works on its own objects.
 */
public final class ArchiveEngine {
    private final DatasetCodecs codecs;
    private final ChunkStore chunks;
    private final Committer committer;
    private final PartitionRewriter rewriter;
    private final ArchiveSettings settings;

    public ArchiveEngine(Storage storage, DatasetCodecs codecs, ArchiveSettings settings) {
        this.codecs = codecs;
        this.chunks = new ChunkStore(storage);
        this.committer = new Committer(chunks, codecs, settings.clock());
        this.rewriter = new PartitionRewriter(codecs, chunks);
        this.settings = settings;
    }

    public DatasetCodecs codecs() { return codecs; }
    public ChunkStore chunks() { return chunks; }
    public Committer committer() { return committer; }
    public ArchiveSettings settings() { return settings; }

    /** A consolidated batch: one folded state per key in key order, and the batch's report. */
    public record Batch(List<KeyedState> states, BatchReport report) {}

    /** Consolidates records: rejects go to {@code rejects}, the rest fold into one state per key. */
    public <R> Batch consolidate(Iterator<? extends R> records, RecordAccess<R> access, String source,
            Consumer<Rejection> rejects) {
        Policy<Object> policy = codecs.policy();
        long in = 0;
        try (Consolidator c = new Consolidator(codecs.dataset(), settings.memoryBudgetBytes(), settings.spillDirectory(),
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
            List<KeyedState> states = new ArrayList<>();
            long siblings = 0;
            long deleted = 0;
            long out = 0;
            try (CloseableIterator<KeyedState> folded = c.folded()) {
                while (folded.hasNext()) {
                    KeyedState ks = folded.next();
                    Object s = ks.state(policy);
                    states.add(ks);
                    siblings += policy.hasSiblings(s) ? 1 : 0;
                    int visible = policy.visible(s).size();
                    deleted += visible == 0 ? 1 : 0;
                    out += visible;
                }
            }
            var counts = c.counts();
            BatchReport report = new BatchReport(in, c.accepted(), c.rejected(), counts.duplicates, counts.superseded,
                    counts.conflicts, states.size(), siblings, deleted, out, c.spilledRuns(), !policy.isJoin());
            return new Batch(states, report);
        }
    }

    /** Plans a batch against the latest version (or {@code base} when given). */
    public Plan plan(Batch batch, Manifest base, long nowMillis) {
        return new Planner(codecs, chunks).plan(batch.states(), base == null ? committer.latest() : base, nowMillis,
                settings.tombstoneHorizonMillis(), settings.chunkTargetBytes());
    }

    /** Rewrites one partition. */
    public RewriteResult rewrite(RewriteTask task) {
        return rewriter.run(task);
    }

    /** What an apply did: the plan that was committed, its results and the published version. */
    public record Applied(Manifest manifest, Plan plan, List<RewriteResult> results, int attempts, long planBytesRead) {}

    /**
     * Applies a consolidated batch: plan, rewrite, commit, re-plan on conflict.
     *
     * @throws OnefoldException CONCURRENT_COMMIT when other writers won {@link ArchiveSettings#maxCommitAttempts()}
     *     times; IO or CORRUPT from storage
     */
    public Applied apply(Batch batch) {
        long now = settings.clock().millis();
        String commitId = UUID.randomUUID().toString();
        Map<Long, RewriteResult> done = new HashMap<>();
        Plan plan = plan(batch, null, now);
        long planRead = plan.planBytesRead();
        int attempts = 0;
        while (true) {
            List<RewriteResult> results = runAll(plan.tasks(), done);
            Committer.Outcome o = committer.commit(plan, results, commitId, settings.maxCommitAttempts() - attempts);
            if (o instanceof Committer.Committed c) {
                return new Applied(c.manifest(), plan, results, attempts + c.attempts(), planRead);
            }
            Committer.Conflict conflict = (Committer.Conflict) o;
            attempts += conflict.attempts();
            if (attempts >= settings.maxCommitAttempts()) {
                throw new OnefoldException(OnefoldException.Kind.CONCURRENT_COMMIT, "other writers changed the same "
                        + "partitions " + attempts + " times in a row; the batch was not committed");
            }
            plan = plan(batch, conflict.newer(), now);
            planRead += plan.planBytesRead();
        }
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
