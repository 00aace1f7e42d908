package dev.onefold.archive;

import dev.onefold.BatchReport;
import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.archive.ArchiveEngine;
import dev.onefold.internal.archive.ArchiveSettings;
import dev.onefold.internal.archive.ChunkRef;
import dev.onefold.internal.archive.DatasetCodecs;
import dev.onefold.internal.archive.GroupedBatch;
import dev.onefold.internal.archive.IoCounters;
import dev.onefold.internal.archive.Manifest;
import dev.onefold.internal.archive.PartitionEntry;
import dev.onefold.internal.archive.Plan;
import dev.onefold.internal.archive.RewriteResult;
import dev.onefold.internal.archive.SnapshotReader;
import dev.onefold.internal.archive.Sweeper;
import dev.onefold.internal.archive.Verifier;
import dev.onefold.reconcile.Digest;
import dev.onefold.spi.PayloadCodec;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicReference;
import java.util.function.Consumer;

/**
 * A durable, partitioned archive of one dataset that batches are applied to incrementally: every apply merges
 * the batch into the partitions it touches, writes them as new immutable chunk files, and publishes one new
 * version atomically. Readers open a {@link Snapshot} of any retained version and always see one consistent,
 * deduplicated, ordered state. Opened with {@link #builder}.
 *
 * <p>Let B1, B2 be batches and A an archive. Then applying B1 then B2 gives the same snapshot content as
 * applying B1 ∪ B2 once (for the built-in policies: a join-semilattice merge), however the records are ordered,
 * repeated or split; applying a batch again changes nothing and publishes no version; a key is stored in
 * exactly one partition, the partition of its merged record's anchor, so a key whose partition value changes
 * moves. A crash at any point leaves the last committed version intact.
 *
 * <p>Cost: an apply costs the batch (consolidated and grouped by partition under the memory budget, spilling to
 * the spill directory, then planned in slices) plus reading and rewriting only the partitions it touches, never
 * the history; finding keys that moved costs a key-hash index probe per
 * chunk unless the partition rule is declared {@code stable}. Concurrent writers, in threads or processes,
 * are safe: one commit wins each version, the others rebase and retry (bounded). Work can also be split:
 * {@link #plan} a batch, {@link #rewrite} its {@link PartitionTask}s anywhere, {@link #commit} the results.
 *
 * <p>Thread-safe: any number of threads may apply, read, verify and sweep at once.
 */
public final class Archive<R> {
    final ArchiveEngine engine;
    private final RecordAccess<R> access;
    private final SnapshotReader reader;
    /** The newest manifest {@link #storedState} has read; newer versions are found by probing the next name. */
    private final AtomicReference<Manifest> newestSeen = new AtomicReference<>();
    /** Digests, as the current schema reads them, of partitions written under an older one; by chunk names. */
    private final ConcurrentHashMap<List<String>, Digest> digestsAsRead = new ConcurrentHashMap<>();

    private Archive(Builder<R> b) {
        DatasetCodecs codecs = new DatasetCodecs(b.spec, b.access.schema(),
                b.codec != null ? b.codec : PayloadCodec.canonical(b.access.schema()));
        this.engine = new ArchiveEngine(b.storage, codecs, new ArchiveSettings(b.budget, b.spillDir, b.parallelism,
                b.horizon == null ? -1 : b.horizon.toMillis(), b.chunkTarget, b.clock, b.maxAttempts));
        this.access = b.access;
        this.reader = new SnapshotReader(codecs, engine.chunks());
    }

    /**
     * Starts an archive for one dataset and record type.
     *
     * @throws OnefoldException (INVALID_SPEC) from {@link Builder#open()} when the spec does not fit the schema
     */
    public static <R> Builder<R> builder(DatasetSpec spec, RecordAccess<R> access) {
        return new Builder<>(spec, access);
    }

    /** Applies a batch held in memory; rejected records are listed in the report. */
    public ApplyReport apply(Iterable<? extends R> records) {
        List<Rejection> rejections = new ArrayList<>();
        return apply(records.iterator(), "batch", rejections::add, rejections);
    }

    /**
     * Applies a batch of any length, sending rejected records (positions are 0-based in {@code records}) to
     * {@code rejects}.
     *
     * @throws OnefoldException CONCURRENT_COMMIT when other writers kept winning; IO or CORRUPT from storage.
     *     Nothing is published then; applying the batch again is safe.
     */
    public ApplyReport apply(Iterator<? extends R> records, String source, Consumer<Rejection> rejects) {
        return apply(records, source, rejects, List.of());
    }

    private ApplyReport apply(Iterator<? extends R> records, String source, Consumer<Rejection> rejects,
            List<Rejection> collected) {
        Objects.requireNonNull(records, "records");
        try (GroupedBatch batch = engine.consolidate(records, access, source, rejects)) {
            ArchiveEngine.Applied a = engine.apply(batch);
            return report(a.manifest(), batch.report(), collected, a.plan(), a.results(), a.attempts(), a.planBytesRead());
        }
    }

    private static ApplyReport report(Manifest m, BatchReport batch, List<Rejection> rejections, Plan plan,
            List<RewriteResult> results, int attempts, long planRead) {
        long read = planRead;
        long written = 0;
        long files = 0;
        long dropped = 0;
        Map<List<String>, Long> per = new LinkedHashMap<>();
        for (RewriteResult r : results) {
            read += r.bytesRead();
            written += r.bytesWritten();
            files += r.partition().chunks().size();
            dropped += r.tombstonesDropped();
            per.put(r.partition().values(), r.partition().entries());
        }
        return new ApplyReport(m.version(), batch, rejections, results.size(), files, read, written, per,
                plan.keysMoved(), plan.archiveSuperseded(), dropped, attempts);
    }

    /** A snapshot of the latest version. */
    public Snapshot<R> snapshot() {
        return new Snapshot<>(this, engine.committer().latest(), reader, access);
    }

    /**
     * A snapshot of one version.
     *
     * @throws OnefoldException USAGE when the version does not exist (never committed or expired); CORRUPT when
     *     its manifest is damaged
     */
    public Snapshot<R> snapshot(long version) {
        return new Snapshot<>(this, version == 0 ? Manifest.empty(engine.codecs().specHash())
                : engine.committer().read(version), reader, access);
    }

    /**
     * The stored merge state of a key in the latest committed version, in the canonical bytes a
     * {@link dev.onefold.gate.StreamGate} reads, or null when the key is not stored: usable as an exact-mode gate's
     * {@link dev.onefold.gate.StoredStateLookup} ({@code archive::storedState}) when the gate's sink applies the
     * records of acknowledged emits to this archive. See {@link Snapshot#storedState}.
     *
     * <p>Cost: one existence probe of the next manifest name (plus reading each manifest committed since the
     * previous call), then {@link Snapshot#storedState}'s key-hash index probes and at most the chunk reads of
     * chunks whose index may hold the key.
     */
    public byte[] storedState(byte[] key) {
        Manifest m = newestSeen.get();
        if (m == null) {
            m = engine.committer().latest();
        }
        Storage storage = engine.chunks().storage();
        while (storage.size(Manifest.fileName(m.version() + 1)) >= 0) {
            m = engine.committer().read(m.version() + 1);
        }
        Manifest found = m;
        newestSeen.accumulateAndGet(found, (a, b) -> a == null || b.version() > a.version() ? b : a);
        return new Snapshot<>(this, found, reader, access).storedState(key);
    }

    /**
     * A partition's digest as the current schema reads it: the manifest's, unless some chunk was written under
     * another writer id (an earlier schema), whose rows now read differently; that partition is read once per
     * archive instance and its digest kept (chunk files are immutable).
     */
    Digest digestAsRead(PartitionEntry p) {
        if (engine.codecs().readsAsWritten(p)) {
            return p.digest();
        }
        List<String> chunks = p.chunks().stream().map(ChunkRef::name).toList();
        return digestsAsRead.computeIfAbsent(chunks, k -> reader.digest(p, new IoCounters()));
    }

    /** The committed versions that can be opened, ascending. */
    public List<Long> versions() {
        return engine.committer().versions();
    }

    /**
     * Consolidates a batch and plans it against the latest version, for workers to {@link #rewrite}. The plan
     * carries the batch's merged states inside its tasks, so the batch is held in memory (unlike {@link #apply},
     * which works through a batch of any size in slices under the memory budget).
     */
    public ApplyPlan plan(Iterable<? extends R> records) {
        List<Rejection> rejections = new ArrayList<>();
        try (GroupedBatch batch = engine.consolidate(records.iterator(), access, "batch", rejections::add)) {
            Plan plan = engine.plan(batch, null, engine.settings().clock().millis());
            return new ApplyPlan(plan, batch.report(), rejections);
        }
    }

    /** Rewrites one partition of a plan; its files are written and synced when it returns. Any thread or process. */
    public PartitionResult rewrite(PartitionTask task) {
        return new PartitionResult(engine.rewrite(task.task));
    }

    /**
     * Publishes a plan's results as one version, on top of newer versions when they touched other partitions.
     *
     * @throws OnefoldException USAGE when results are missing or answer other tasks; CONCURRENT_COMMIT when a
     *     newer version rewrote one of the plan's partitions (plan the batch again)
     */
    public ApplyReport commit(ApplyPlan plan, List<PartitionResult> results) {
        List<RewriteResult> rs = new ArrayList<>(results.size());
        results.forEach(r -> rs.add(r.result));
        Manifest m = engine.commit(plan.plan, rs);
        return report(m, plan.batch, plan.rejections, plan.plan, rs, 1, plan.plan.planBytesRead());
    }

    /** Cleanup with {@link SweepRules#defaults()}. */
    public SweepReport sweep() {
        return sweep(SweepRules.defaults());
    }

    /**
     * Cleanup: expires versions the rules do not keep and deletes chunk files no kept version references
     * (including orphans of crashed writers) once older than the grace period. The latest snapshot reads the same
     * before and after.
     */
    public SweepReport sweep(SweepRules rules) {
        Sweeper.Result r = new Sweeper(engine.chunks().storage(), engine.committer()).sweep(rules.keepVersions(),
                rules.keepNewerThan().isZero() ? -1 : rules.keepNewerThan().toMillis(), rules.orphanGrace().toMillis(),
                engine.settings().clock().millis());
        return new SweepReport(r.expiredVersions(), r.deletedFiles());
    }

    /** Verifies the latest version; see {@link #verify(long)}. */
    public VerifyReport verify() {
        return verify(-1);
    }

    /**
     * Checks every manifest and, for the given version, every chunk: checksums, order inside and across chunks,
     * partition membership, key-hash indexes, counts and digests against the manifest, key uniqueness across
     * partitions. Reports every problem with its file name; never throws for damage it finds.
     */
    public VerifyReport verify(long version) {
        var problems = new Verifier(engine.codecs(), engine.chunks(), engine.committer(),
                engine.settings().memoryBudgetBytes(), engine.settings().spillDirectory()).verify(version);
        List<VerifyReport.Problem> out = new ArrayList<>();
        problems.forEach(p -> out.add(new VerifyReport.Problem(p.file(), p.message())));
        long checked = version;
        if (checked < 0) {
            List<Long> v = versions();
            checked = v.isEmpty() ? 0 : v.get(v.size() - 1);
        }
        return new VerifyReport(checked, out);
    }

    /** Settings for an archive; {@link #open()} checks the spec against the schema and the storage's versions. */
    public static final class Builder<R> {
        private final DatasetSpec spec;
        private final RecordAccess<R> access;
        private Storage storage;
        private PayloadCodec codec;
        private long budget = Math.min(256L << 20, Runtime.getRuntime().maxMemory() / 4);
        private Path spillDir = Path.of(System.getProperty("java.io.tmpdir"));
        private int parallelism = Runtime.getRuntime().availableProcessors();
        private Duration horizon;
        private long chunkTarget = 8L << 20;
        private Clock clock = Clock.systemUTC();
        private int maxAttempts = 10;

        private Builder(DatasetSpec spec, RecordAccess<R> access) {
            this.spec = Objects.requireNonNull(spec, "spec");
            this.access = Objects.requireNonNull(access, "access");
        }

        /** Where the archive lives (required). */
        public Builder<R> storage(Storage storage) {
            this.storage = Objects.requireNonNull(storage, "storage");
            return this;
        }

        /** Shorthand for {@code storage(Storage.local(dir))}. */
        public Builder<R> directory(Path dir) {
            return storage(Storage.local(dir));
        }

        /** How records inside states become bytes (default: {@link PayloadCodec#canonical}). */
        public Builder<R> codec(PayloadCodec codec) {
            this.codec = Objects.requireNonNull(codec, "codec");
            return this;
        }

        /**
         * Memory for one apply (default: a quarter of the heap, at most 256 MiB): folding the batch by key and
         * grouping it by partition (each half of it, spilling beyond), then planning it in slices of a quarter of
         * it; a quarter of it (at most 64 MiB) also caches key-hash indexes.
         */
        public Builder<R> memoryBudgetBytes(long bytes) {
            this.budget = dev.onefold.internal.engine.MemoryBudget.check(bytes);
            return this;
        }

        /** Where consolidation and verification spill (default: java.io.tmpdir). */
        public Builder<R> spillDirectory(Path dir) {
            this.spillDir = Objects.requireNonNull(dir, "dir");
            return this;
        }

        /** Threads rewriting partitions of one apply (default: the number of cores); results do not depend on it. */
        public Builder<R> parallelism(int threads) {
            if (threads < 1) {
                throw OnefoldException.usage("parallelism must be at least 1, got " + threads);
            }
            this.parallelism = threads;
            return this;
        }

        /**
         * Drop tombstones older than {@code horizon} when their partition is rewritten (default: keep forever).
         * After that a late record older than the delete can bring the key back: choose a horizon longer than
         * any lateness the sources can produce.
         */
        public Builder<R> tombstoneHorizon(Duration horizon) {
            if (horizon.isNegative()) {
                throw OnefoldException.usage("tombstone horizon must not be negative, got " + horizon);
            }
            this.horizon = horizon;
            return this;
        }

        /** Approximate size at which a partition's output is cut into another chunk file (default 8 MiB). */
        public Builder<R> chunkTargetBytes(long bytes) {
            if (bytes < 1024) {
                throw OnefoldException.usage("chunk target must be at least 1024 bytes, got " + bytes);
            }
            this.chunkTarget = bytes;
            return this;
        }

        /** The clock for commit times, tombstone ages and cleanup (default: system UTC). */
        public Builder<R> clock(Clock clock) {
            this.clock = Objects.requireNonNull(clock, "clock");
            return this;
        }

        /** How many commit attempts an apply makes while other writers win (default 10). */
        public Builder<R> maxCommitAttempts(int attempts) {
            if (attempts < 1) {
                throw OnefoldException.usage("commit attempts must be at least 1, got " + attempts);
            }
            this.maxAttempts = attempts;
            return this;
        }

        /**
         * Opens the archive, creating it on first commit.
         *
         * @throws OnefoldException INVALID_SPEC when the spec does not fit the schema; USAGE without storage
         *     (a storage holding an archive of another spec is refused when its manifest is first read)
         */
        public Archive<R> open() {
            if (storage == null) {
                throw OnefoldException.usage("an archive needs a storage or directory");
            }
            return new Archive<>(this);
        }
    }
}
