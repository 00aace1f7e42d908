package dev.onefold.internal.engine;

import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.NoSuchElementException;
import java.util.function.Consumer;

/**
 * Stage one of a batch: lifts each record into a merge state, sorts by key (spilling under the memory budget)
 * and folds each key's states in canonical order into one. Exact duplicates (identical key and state bytes)
 * are counted and skipped without a merge.
 *
 * <h2>Invariants</h2>
 * The folded states come out in ascending key order, one per key. For a join policy the result depends only
 * on the set of records; for any policy it is a pure function of the multiset (the fold order is canonical).
 *
 * <h2>Complexity</h2>
 * O(n log n) for the sort, one merge per non-duplicate record; memory bounded by the budget plus one key's
 * states. Not thread-safe; one instance per batch.
 */
public final class Consolidator implements AutoCloseable {
    private final BoundDataset dataset;
    private final Policy<Object> policy;
    private final ExternalSorter<KeyedState> sorter;
    private final MergeCounts counts = new MergeCounts();
    private long accepted;
    private long rejected;

    public Consolidator(BoundDataset dataset, long budgetBytes, Path tempDir, boolean parallel) {
        this.dataset = dataset;
        this.policy = dataset.policy();
        this.sorter = new ExternalSorter<>(KeyedState.BY_KEY_THEN_STATE, KeyedState.codec(), budgetBytes, tempDir, parallel);
    }

    /**
     * Adds one record; a record whose key, version or clock is unusable goes to {@code rejects} instead.
     *
     * @return whether the record was accepted
     */
    public boolean add(Row row, String source, long position, Object original, Consumer<Rejection> rejects) {
        KeyedState ks;
        try {
            ks = lift(row);
        } catch (OnefoldException e) {
            if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                throw e;
            }
            reject(source, position, e.getMessage(), original, rejects);
            return false;
        }
        sorter.add(ks);
        accepted++;
        return true;
    }

    /** Lifts one row into its keyed state. */
    public KeyedState lift(Row row) {
        byte[] key = dataset.key(row);
        Object state = policy.lift(row);
        return new KeyedState(key, policy.toBytes(state), state);
    }

    /** Adds an already merged state (for example read from an archive chunk); not counted as accepted. */
    public void addState(KeyedState state) {
        sorter.add(state);
    }

    /** Records a rejection found before a row could be built (for example a record that fails conversion). */
    public void reject(String source, long position, String reason, Object original, Consumer<Rejection> rejects) {
        rejected++;
        rejects.accept(new Rejection(source, position, reason, original));
    }

    public long accepted() {
        return accepted;
    }

    public long rejected() {
        return rejected;
    }

    public MergeCounts counts() {
        return counts;
    }

    public int spilledRuns() {
        return sorter.spilledRuns();
    }

    /** The folded states in key order. Call once. */
    public CloseableIterator<KeyedState> folded() {
        CloseableIterator<KeyedState> sorted = sorter.sorted();
        return new CloseableIterator<>() {
            KeyedState pending = sorted.hasNext() ? sorted.next() : null;

            @Override
            public boolean hasNext() {
                return pending != null;
            }

            @Override
            public KeyedState next() {
                if (pending == null) {
                    throw new NoSuchElementException();
                }
                KeyedState first = pending;
                Object acc = null;
                byte[] lastBytes = first.stateBytes();
                pending = null;
                while (sorted.hasNext()) {
                    KeyedState n = sorted.next();
                    if (!Arrays.equals(n.key(), first.key())) {
                        pending = n;
                        break;
                    }
                    if (Arrays.equals(n.stateBytes(), lastBytes)) {
                        counts.duplicates++;
                        continue;
                    }
                    lastBytes = n.stateBytes();
                    if (acc == null) {
                        acc = first.state(policy);
                    }
                    acc = policy.merge(acc, n.state(policy), counts);
                }
                if (acc == null) {
                    return first;
                }
                return new KeyedState(first.key(), policy.toBytes(acc), acc);
            }

            @Override
            public void close() {
                sorted.close();
            }
        };
    }

    @Override
    public void close() {
        sorter.close();
    }
}
