package dev.onefold.gate;

import dev.onefold.Rejection;
import java.util.List;

/**
 * What the gate decided for one offered record: emit it (with what happened to its key), drop it, or hold it
 * for reordering. An emit carries what the sink must now store for the key: the visible records of the merged
 * state (empty when the key is deleted; several for siblings kept by a vector-clock {@code keep-all} dataset) and
 * the canonical merge-state bytes (for stores that merge, like the archive).
 *
 * <p>Every offered record gets exactly one final decision ({@link Action#EMIT} or {@link Action#DROP}); a held
 * record gets a {@link Action#HOLD} first and its final decision when it is released. A dropped record's offset
 * is done at once; an emitted one's when the sink {@linkplain StreamGate#acknowledge(Decision) acknowledges} it.
 *
 * <p>Immutable and thread-safe; the byte accessors return copies.
 */
public final class Decision<R> {

    /** What the caller does with the record. */
    public enum Action {
        /** Write {@link #visible()} (or delete the key when {@link #deleted()}), then acknowledge. */
        EMIT,
        /** Nothing to write; the offset is already done. */
        DROP,
        /** Held for reordering; its final decision comes from a later call. */
        HOLD
    }

    /** What happened to the key. */
    public enum Reason {
        /** EMIT: the key was unseen (beyond the window in windowed mode, or absent from the store). */
        NEW_KEY,
        /** EMIT: the record replaced the key's state wholesale. */
        NEWER_VERSION,
        /** EMIT: the output combines this record with earlier ones (field-wise or user merge). */
        MERGED,
        /** EMIT: the record has the key's current version with different content and won the tie-break. */
        CONFLICT,
        /** EMIT: the key now holds concurrent versions (vector clocks). */
        SIBLINGS,
        /** DROP: byte-identical to what the key's state already holds. */
        DUPLICATE,
        /** DROP: older than the key's state, which it does not change. */
        SUPERSEDED,
        /** DROP: same version, different content, lost the tie-break. */
        CONFLICT_LOST,
        /** DROP: this offset of this partition was delivered before (a replay); decided then. */
        REDELIVERED,
        /** DROP: the record is invalid; {@link #rejection()} says why. */
        REJECTED,
        /** HOLD: waiting for the watermark. */
        WAITING
    }

    private final Action action;
    private final Reason reason;
    private final String partition;
    private final long offset;
    private final R record;
    private final byte[] key;
    private final byte[] state;
    private final List<R> visible;
    private final boolean deleted;
    private final boolean late;
    private final boolean releasedEarly;
    private final Rejection rejection;

    Decision(Action action, Reason reason, String partition, long offset, R record, byte[] key, byte[] state,
            List<R> visible, boolean deleted, boolean late, boolean releasedEarly, Rejection rejection) {
        this.action = action;
        this.reason = reason;
        this.partition = partition;
        this.offset = offset;
        this.record = record;
        this.key = key;
        this.state = state;
        this.visible = visible;
        this.deleted = deleted;
        this.late = late;
        this.releasedEarly = releasedEarly;
        this.rejection = rejection;
    }

    public Action action() { return action; }
    public Reason reason() { return reason; }
    public String partition() { return partition; }
    public long offset() { return offset; }

    /** The record as offered. */
    public R record() { return record; }

    /** The key bytes (order-preserving encoding of the key fields), or null for a rejected record. */
    public byte[] keyBytes() { return key == null ? null : key.clone(); }

    /** For an emit, the key's merged state as canonical bytes; otherwise null. */
    public byte[] stateBytes() { return state == null ? null : state.clone(); }

    /** For an emit, the records a reader now sees for the key (empty when deleted); otherwise empty. */
    public List<R> visible() { return visible; }

    /** For an emit, whether the key is now deleted. */
    public boolean deleted() { return deleted; }

    /** Whether the record arrived behind the reorder frontier and was decided at once, out of order. */
    public boolean late() { return late; }

    /** Whether the record was released before the watermark passed it, because the bound on held records was full. */
    public boolean releasedEarly() { return releasedEarly; }

    /** For a rejected record, why; otherwise null. */
    public Rejection rejection() { return rejection; }

    public boolean isEmit() { return action == Action.EMIT; }

    @Override
    public String toString() {
        return action + "(" + reason + (late ? ", late" : "") + (releasedEarly ? ", early" : "") + ") " + partition
                + "@" + offset;
    }
}
