package dev.onefold.internal.engine;

import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import java.util.List;
import java.util.function.Consumer;

/**
 * Turns one folded key state into its visible rows, counting keys, keys with siblings and deleted keys on the
 * way. The in-memory and the spilling path both resolve keys here, so their rows and counts are the same. Not
 * thread-safe: one per worker, summed with {@link #add}.
 */
final class KeyResolver {
    private final BoundDataset dataset;
    private final Policy<Object> policy;
    long keys;
    long keysWithSiblings;
    long deletedKeys;

    KeyResolver(BoundDataset dataset) {
        this.dataset = dataset;
        this.policy = dataset.policy();
    }

    /** Counts one key and returns the rows a reader sees for it (empty when deleted). */
    List<Row> visible(Object state) {
        if (policy.hasSiblings(state)) {
            keysWithSiblings++;
        }
        List<Row> rows = policy.visible(state);
        count(rows.isEmpty());
        return rows;
    }

    /** Counts one key whose single winner is known without a state (a last-writer key with distinct versions). */
    void count(boolean deleted) {
        keys++;
        if (deleted) {
            deletedKeys++;
        }
    }

    /** Counts one key and hands its visible rows, with their order bytes, to {@code out}. */
    void resolve(byte[] key, Object state, Consumer<OrderedRow> out) {
        for (Row r : visible(state)) {
            out.accept(new OrderedRow(dataset.order(r, key), r, null));
        }
    }

    void add(KeyResolver other) {
        keys += other.keys;
        keysWithSiblings += other.keysWithSiblings;
        deletedKeys += other.deletedKeys;
    }
}
