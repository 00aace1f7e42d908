package dev.onefold.internal.merge;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.record.Row;
import java.util.List;

/**
 * A merge policy over one key's merge state {@code S}.
 *
 * <h2>Invariants</h2>
 * Let {@code m = merge}. Then for all states a, b, c of one key: {@code m(a, b) = m(b, a)},
 * {@code m(m(a, b), c) = m(a, m(b, c))} and {@code m(a, a) = a}, where equality is equality of the bytes
 * {@link #write} produces (a join-semilattice; user policies missing a law are the documented exception).
 * {@link #visible} and {@link #anchor} are pure functions of the state, so any delivery of the same set of
 * records gives the same output.
 *
 * <h2>Complexity</h2>
 * Merging is linear in the sizes of the two states; last-writer states hold one record, vector-clock states
 * one record per sibling, field-wise states one stamp per field (plus one per distinct version for sums and
 * per element for unions).
 *
 * <p>Implementations are immutable and thread-safe; states are immutable.
 */
public interface Policy<S> {

    /**
     * The state of a single record.
     *
     * @throws dev.onefold.OnefoldException (INVALID_RECORD) when the record's version or clock is unusable
     */
    S lift(Row record);

    /** The join of two states of one key; bumps {@code counts} for what it observed. */
    S merge(S a, S b, MergeCounts counts);

    /** The records a reader sees for this key, in a deterministic order; empty when deleted. */
    List<Row> visible(S state);

    /** The record that places the key (its partition), deleted or not. */
    Row anchor(S state);

    /** Whether the key is currently deleted. */
    default boolean isDeleted(S state) {
        return visible(state).isEmpty();
    }

    /** Whether the state holds more than one concurrent version. */
    default boolean hasSiblings(S state) {
        return false;
    }

    /** The canonical bytes of a state. */
    void write(ByteWriter out, S state);

    /** Reads what {@link #write} wrote. */
    S read(ByteReader in);

    /**
     * Whether two states of one key certainly have different canonical bytes, judged without computing them;
     * false when unsure. Returning true also promises that {@link #merge} gives the same state and the same
     * counts in either argument order. Then folding exactly two such states, which in canonical order is one
     * merge of the smaller into the greater, is one merge in any order, and the in-memory path skips encoding
     * them. The default is always unsure.
     */
    default boolean surelyDistinct(S a, S b) {
        return false;
    }

    /** Whether merge is a join (all three laws hold); otherwise the engine folds in canonical order. */
    default boolean isJoin() {
        return true;
    }

    /** Convenience: the canonical bytes of a state as an array. */
    default byte[] toBytes(S state) {
        ByteWriter w = new ByteWriter(64);
        write(w, state);
        return w.toByteArray();
    }
}
