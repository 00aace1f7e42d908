package dev.onefold;

import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.Consolidator;
import dev.onefold.internal.engine.HashConsolidator;
import dev.onefold.internal.engine.KeyedState;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.engine.Publisher;
import dev.onefold.internal.engine.Workspace;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.Objects;
import java.util.function.Consumer;

/**
 * Deduplicates, merges and orders one batch of records under a {@link DatasetSpec}: exactly one record per
 * unique key (or one per sibling under vector-clock {@code keep-all}), chosen by the merge policy, sorted by the
 * order with the key as final tie-breaker, plus a {@link BatchReport}. Records whose key, version or clock is
 * unusable, or that do not fit the schema, are rejected with a reason and the batch carries on.
 *
 * <p>Let B be a multiset of records and S the survivors of {@code dedupe(B)}. Then S is sorted and holds one
 * record per visible key; for the built-in policies S depends only on the set of distinct records in B, never
 * on their order or repetition; and the same B gives the same S on every run, in memory or spilled.
 *
 * <p>Memory: records collect up to the memory budget ({@link Builder#memoryBudgetBytes}); beyond it sorted runs
 * spill to the spill directory and are merged, so a batch can exceed the heap. Spill files are deleted when the
 * call returns or fails.
 *
 * <p>Cost: O(n log n) in the batch size; the sort uses all cores given by {@link Builder#parallel}; output is
 * byte-identical to a single-threaded run. An engine is thread-safe and its calls are independent; between calls it
 * keeps the scratch arrays of its last in-memory batch, softly and at most half its memory budget, so a stream of
 * batches through one engine allocates little beyond its output.
 */
public final class BatchEngine<R> {
    private final BoundDataset dataset;
    private final RecordAccess<R> access;
    private final long budget;
    private final Path spillDir;
    private final boolean parallel;
    /** Scratch arrays of the in-memory path, passed from batch to batch (at most the in-memory half of the budget). */
    private final Workspace.Keeper workspaces;

    private BatchEngine(Builder<R> b) {
        this.access = b.access;
        this.dataset = BoundDataset.bind(b.spec, b.access.schema());
        this.budget = b.budget;
        this.spillDir = b.spillDir;
        this.parallel = b.parallel;
        this.workspaces = new Workspace.Keeper(budget / 2);
    }

    /**
     * Starts an engine for one dataset and record type.
     *
     * @throws OnefoldException (INVALID_SPEC) from {@link Builder#build()} when the spec does not fit the schema
     */
    public static <R> Builder<R> builder(DatasetSpec spec, RecordAccess<R> access) {
        return new Builder<>(spec, access);
    }

    /** An engine for onefold's own rows with default settings. */
    public static BatchEngine<Row> forRows(DatasetSpec spec, dev.onefold.record.RowSchema schema) {
        return builder(spec, RecordAccess.rows(schema)).build();
    }

    public DatasetSpec spec() {
        return dataset.spec();
    }

    /** Deduplicates a batch held in memory; survivors and rejections are collected in the result. */
    public BatchResult<R> dedupe(Iterable<? extends R> records) {
        List<R> survivors = new ArrayList<>();
        List<Rejection> rejections = new ArrayList<>();
        BatchReport report = dedupe(records.iterator(), "batch", survivors::add, rejections::add);
        return new BatchResult<>(survivors, rejections, report);
    }

    /**
     * Deduplicates a batch of any size, streaming survivors in order to {@code survivors} and rejected records
     * to {@code rejects} (positions are 0-based indexes in {@code records}).
     */
    public BatchReport dedupe(Iterator<? extends R> records, String source, Consumer<? super R> survivors,
            Consumer<Rejection> rejects) {
        Objects.requireNonNull(records, "records");
        long in = 0;
        Workspace workspace = workspaces.take();
        HashConsolidator fast = new HashConsolidator(dataset, source, budget / 2, parallel, workspace);
        Consolidator spilling = null;
        try (Publisher publisher = new Publisher(dataset, budget / 2, spillDir, parallel)) {
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
                    if (spilling != null) {
                        spilling.reject(source, position, e.getMessage(), record, rejects);
                    } else {
                        fast.reject(position, e.getMessage(), record);
                    }
                    continue;
                }
                if (spilling == null && !fast.add(row, position, record)) {
                    // the batch outgrew memory: continue on the sorting, spilling path
                    spilling = new Consolidator(dataset, budget / 2, spillDir, parallel);
                    fast.transferTo(spilling, rejects);
                    workspaces.give(workspace);
                }
                if (spilling != null) {
                    spilling.add(row, source, position, record, rejects);
                }
            }
            if (spilling == null) {
                HashConsolidator.Ordered ordered = fast.foldAndOrder(rejects);
                ordered.forEachInOrder(r -> survivors.accept(access.fromRow(r)));
                fast.release();
                workspaces.give(workspace);
                return report(in, fast.accepted(), fast.rejected(), fast.counts(), ordered.keys(),
                        ordered.keysWithSiblings(), ordered.deletedKeys(), ordered.rows(), 0);
            }
            try (Consolidator c = spilling; CloseableIterator<KeyedState> folded = c.folded()) {
                publisher.addAll(folded);
            }
            try (CloseableIterator<Row> out = publisher.sorted()) {
                while (out.hasNext()) {
                    survivors.accept(access.fromRow(out.next()));
                }
            }
            return report(in, spilling.accepted(), spilling.rejected(), spilling.counts(), publisher.keys(),
                    publisher.keysWithSiblings(), publisher.deletedKeys(), publisher.out(),
                    spilling.spilledRuns() + publisher.spilledRuns());
        } finally {
            if (spilling != null) {
                spilling.close();
            }
        }
    }

    private BatchReport report(long in, long accepted, long rejected, MergeCounts counts, long keys, long siblings,
            long deleted, long out, int runs) {
        return new BatchReport(in, accepted, rejected, counts.duplicates, counts.superseded, counts.conflicts, keys,
                siblings, deleted, out, runs, !dataset.policy().isJoin());
    }

    /** Settings for an engine; {@link #build()} checks the spec against the record access's schema. */
    public static final class Builder<R> {
        private final DatasetSpec spec;
        private final RecordAccess<R> access;
        private long budget = Runtime.getRuntime().maxMemory() * 2 / 5;
        private Path spillDir = Path.of(System.getProperty("java.io.tmpdir"));
        private boolean parallel = true;

        private Builder(DatasetSpec spec, RecordAccess<R> access) {
            this.spec = Objects.requireNonNull(spec, "spec");
            this.access = Objects.requireNonNull(access, "access");
        }

        /** Memory the engine may hold for records before spilling (default: 40% of the maximum heap). */
        public Builder<R> memoryBudgetBytes(long bytes) {
            this.budget = dev.onefold.internal.engine.MemoryBudget.check(bytes);
            return this;
        }

        /** Where sorted runs spill (default: java.io.tmpdir). */
        public Builder<R> spillDirectory(Path dir) {
            this.spillDir = Objects.requireNonNull(dir, "dir");
            return this;
        }

        /** Whether sorting may use every core (default true); the output is the same either way. */
        public Builder<R> parallel(boolean parallel) {
            this.parallel = parallel;
            return this;
        }

        public BatchEngine<R> build() {
            return new BatchEngine<>(this);
        }
    }
}
