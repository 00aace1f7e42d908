package dev.onefold.gate;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.gate.Arrival;
import dev.onefold.internal.gate.KeyBytes;
import dev.onefold.internal.gate.PartitionOffsets;
import dev.onefold.internal.gate.ReorderBuffer;
import dev.onefold.internal.gate.SeenStates;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.FieldPath;
import dev.onefold.record.FieldType.Kind;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.EnumSet;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.OptionalLong;
import java.util.Set;
import java.util.TreeMap;
import java.util.concurrent.locks.Condition;
import java.util.concurrent.locks.ReentrantLock;
import java.util.function.LongSupplier;

/**
 * The streaming gate for a consumer service: for each record read from a partitioned log (source partition,
 * offset, record) it decides, one record at a time, whether the sink must write something (emit), nothing (drop
 * as duplicate, superseded or redelivered) or later (hold for reordering), and it tracks per source partition
 * which offset is safe to commit.
 *
 * <h2>Decisions</h2>
 * Decisions follow the dataset's merge policy exactly as {@link dev.onefold.BatchEngine} does. Let {@code S} be
 * the merge state the gate knows for the record's key and {@code S'} the join of {@code S} with the record. When
 * {@code S'} has the same canonical bytes as {@code S} the record changes nothing and is dropped; otherwise it is
 * emitted with {@code S'}'s visible records, and {@code S'} becomes the key's state. So for a join policy the
 * last emit of each key is the key's batch result over every record the gate has seen.
 *
 * <h2>Modes</h2>
 * Known states live in a window bounded by keys and by age (plus every state emitted and not yet acknowledged).
 * <ul>
 *   <li>{@linkplain Builder#exact(StoredStateLookup) Exact}: a key that missed the window is looked up in the
 *       store the sink writes to. Let the sink store each emit and acknowledge it once stored; then, across
 *       evictions, crashes and replays, the store ends equal to the batch engine's result over every record
 *       delivered, and a record already reflected in the store is never emitted again.</li>
 *   <li>{@linkplain Builder#windowed() Windowed}: a key that missed the window counts as unseen; no store is
 *       read. A record whose key's state is in the window is decided exactly; a duplicate whose first copy has
 *       left the window is emitted again (counted in {@link GateMetrics#windowEvictions()}), which is harmless
 *       for a sink that merges or keeps the greater version, not for one that blindly overwrites.</li>
 * </ul>
 *
 * <h2>Offsets</h2>
 * An offset is done when its record was dropped, or emitted and {@linkplain #acknowledge(String, long)
 * acknowledged}; acknowledgements may arrive late, out of order and in batches, from any thread. The safe commit
 * offset of a partition ({@link #committableOffset}) is the first offset that is not done: committing it never
 * skips an unacknowledged or held record. Each partition must be delivered in ascending offset order, as a log
 * does; skipped offsets (compaction, transaction markers) count as done, and an offset delivered again is
 * dropped as {@link Decision.Reason#REDELIVERED}. After a restart from committed offsets, replayed records are
 * recognised through the window and, in exact mode, the store.
 *
 * <h2>Reordering</h2>
 * With {@link Builder#reorder(String, long)}, records are held until the watermark (greatest event time seen
 * minus the lateness bound) passes them, then released in (event time, order) order. A record behind what was
 * already released takes the late path: decided at once, merged like any other, flagged {@link Decision#late()}
 * and counted. Released decisions are returned by whichever call released them.
 *
 * <h2>Memory bounds</h2>
 * Two bounds, each by count and estimated bytes. Emitted records awaiting acknowledgement: an offer waits (back
 * pressure) while that bound is full, so acknowledge from another thread than the one that offers, or before
 * offering again. Held records: when that bound is full, {@link WhenFull#RELEASE_EARLY} (the default) releases
 * the earliest held records before the watermark passes them (flagged {@link Decision#releasedEarly()} and
 * counted; they stay in event-time order), and {@link WhenFull#BLOCK} waits until another thread's call
 * releases some. Waiting gives up after the block timeout with an exception, and the record is not taken. After
 * every offer, held records are at most their bound, and held plus awaiting records at most the sum of both
 * bounds (one call may release several held records into emits).
 *
 * <h2>Thread-safety and cost</h2>
 * Safe to share: every method takes one lock, and a blocked {@link #offer} releases it while waiting, so sinks
 * may acknowledge from their own threads. Sharing serialises offers; one gate per consumer thread (each owning
 * its partitions) scales better. An offer costs one key extraction, one merge and one state encoding, O(log n)
 * in held records, and in exact mode at most one store lookup per window miss. If the store lookup or the merge
 * fails, the gate stops: every later offer throws, and the service restarts from the committed offsets, which
 * lose nothing.
 */
public final class StreamGate<R> {

    /** What an offer does when the bound on held records is full. */
    public enum WhenFull {
        /** Wait until another thread's call releases held records (or {@link #flush()} runs). */
        BLOCK,
        /** Release the earliest held records before the watermark passes them. */
        RELEASE_EARLY
    }

    private static final Set<Kind> EVENT_TIME = EnumSet.of(Kind.INT, Kind.LONG, Kind.TIMESTAMP_MILLIS,
            Kind.TIMESTAMP_MICROS, Kind.DATE);

    private record Unacked(KeyBytes key, long sizeBytes) {}

    private final ReentrantLock lock = new ReentrantLock();
    private final Condition roomFreed = lock.newCondition();
    private final BoundDataset dataset;
    private final Policy<Object> policy;
    private final RecordAccess<R> access;
    private final SeenStates seen;
    private final ReorderBuffer<R> reorder;
    private final FieldPath eventTime;
    private final long maxHeldRecords;
    private final long maxHeldBytes;
    private final WhenFull whenHeldFull;
    private final long maxAwaitingRecords;
    private final long maxAwaitingBytes;
    private final long blockTimeoutNanos;
    private final Map<String, PartitionOffsets> offsets = new HashMap<>();
    private final Map<String, Map<Long, Unacked>> unacked = new HashMap<>();
    private long awaitingAck;
    private long awaitingBytes;
    private long sequence;
    private RuntimeException failure;
    private long offered;
    private long emitted;
    private long duplicates;
    private long superseded;
    private long conflictsLost;
    private long redelivered;
    private long rejected;
    private long late;
    private long releasedEarly;

    private StreamGate(Builder<R> b) {
        this.access = b.access;
        this.dataset = BoundDataset.bind(b.spec, b.access.schema());
        this.policy = dataset.policy();
        this.seen = new SeenStates(policy, b.lookup, b.windowKeys, b.windowAge, b.windowClock);
        if (b.eventTimeField != null) {
            FieldPath p;
            try {
                p = dataset.schema().resolve(b.eventTimeField);
            } catch (OnefoldException e) {
                throw OnefoldException.usage("reorder: " + e.getMessage());
            }
            if (!EVENT_TIME.contains(p.type().kind())) {
                throw OnefoldException.usage("reorder: event-time field '" + b.eventTimeField + "' is " + p.type()
                        + "; it must be int, long, timestamp-millis, timestamp-micros or date");
            }
            this.eventTime = p;
            this.reorder = new ReorderBuffer<>(b.lateness);
        } else {
            this.eventTime = null;
            this.reorder = null;
        }
        this.maxHeldRecords = b.maxHeldRecords;
        this.maxHeldBytes = b.maxHeldBytes;
        this.whenHeldFull = b.whenHeldFull;
        this.maxAwaitingRecords = b.maxAwaitingRecords;
        this.maxAwaitingBytes = b.maxAwaitingBytes;
        this.blockTimeoutNanos = b.blockTimeout.toNanos();
    }

    /**
     * Starts a gate for one dataset and record type; choose a mode with {@link Builder#exact} or
     * {@link Builder#windowed} before {@link Builder#build()}.
     */
    public static <R> Builder<R> builder(DatasetSpec spec, RecordAccess<R> access) {
        return new Builder<>(spec, access);
    }

    /**
     * Offers one record read from a source partition at an offset.
     *
     * @return the decisions this call made, in the order the sink should apply them: the decisions of held records
     *     the watermark released, then this record's own decision (which may also be among the released ones,
     *     or be a {@link Decision.Action#HOLD}). Never empty.
     * @throws OnefoldException (USAGE) when the offset is negative or too far ahead, or a bound stayed full for
     *     the block timeout (the record was not taken and may be offered again); any exception from the
     *     stored-state lookup or the merge policy, after which the gate is stopped
     */
    public List<Decision<R>> offer(String partition, long offset, R record) {
        Objects.requireNonNull(partition, "partition");
        Objects.requireNonNull(record, "record");
        lock.lock();
        try {
            requireRunning();
            PartitionOffsets po = offsets.computeIfAbsent(partition, PartitionOffsets::new);
            if (po.isRedelivery(offset)) {
                offered++;
                redelivered++;
                return List.of(dropped(Decision.Reason.REDELIVERED, partition, offset, record, null, false, false, null));
            }
            po.checkDeliverable(offset);
            awaitRoom();
            List<Decision<R>> out = new ArrayList<>(2);
            try {
                while (whenHeldFull == WhenFull.RELEASE_EARLY && heldFull()) {
                    releaseEarly(out);
                }
                po.deliver(offset);
                offered++;
                accept(po, partition, offset, record, out);
            } catch (RuntimeException e) {
                throw stop(e);
            }
            return out;
        } finally {
            lock.unlock();
        }
    }

    private void accept(PartitionOffsets po, String partition, long offset, R record, List<Decision<R>> out) {
        Arrival<R> a;
        try {
            Row row = access.toRow(record);
            byte[] key = dataset.key(row);
            Object lifted = policy.lift(row);
            byte[] liftedBytes = policy.toBytes(lifted);
            long time = reorder == null ? 0 : eventTimeOf(row);
            byte[] order = reorder == null ? null : dataset.order(row);
            a = new Arrival<>(partition, offset, record, row, new KeyBytes(key), lifted, liftedBytes, time, order,
                    sequence++, Arrival.OVERHEAD_BYTES + 2L * key.length + liftedBytes.length);
        } catch (OnefoldException e) {
            if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                throw e;
            }
            rejected++;
            po.markDone(offset);
            out.add(dropped(Decision.Reason.REJECTED, partition, offset, record, null, false, false,
                    new Rejection(partition, offset, e.getMessage(), record)));
            return;
        }
        if (reorder == null) {
            out.add(decide(a, false, false));
        } else if (reorder.isLate(a.eventTime())) {
            late++;
            out.add(decide(a, true, false));
        } else {
            reorder.hold(a);
            releaseDue(out);
            if (a.eventTime() > reorder.watermark()) {
                out.add(new Decision<>(Decision.Action.HOLD, Decision.Reason.WAITING, partition, offset, record,
                        a.key().bytes(), null, List.of(), false, false, false, null));
            }
        }
    }

    private long eventTimeOf(Row row) {
        Object v = eventTime.read(row);
        if (v == null) {
            throw OnefoldException.record("reorder field '" + eventTime.path() + "' is null");
        }
        return ((Number) v).longValue();
    }

    private boolean heldFull() {
        return reorder != null && (reorder.heldRecords() >= maxHeldRecords || reorder.heldBytes() >= maxHeldBytes);
    }

    private boolean mustWait() {
        return awaitingAck >= maxAwaitingRecords || awaitingBytes >= maxAwaitingBytes
                || (whenHeldFull == WhenFull.BLOCK && heldFull());
    }

    /** Waits, before anything of this offer is decided, until both bounds have room. */
    private void awaitRoom() {
        long remaining = blockTimeoutNanos;
        while (mustWait()) {
            if (remaining <= 0) {
                throw OnefoldException.usage("no room for another record for " + Duration.ofNanos(blockTimeoutNanos)
                        + ": " + awaitingAck + " emits await acknowledgement (bound " + maxAwaitingRecords + " records, "
                        + maxAwaitingBytes + " bytes), " + (reorder == null ? 0 : reorder.heldRecords())
                        + " records held (bound " + maxHeldRecords + " records, " + maxHeldBytes
                        + " bytes); acknowledge from the sink's thread, or raise the bounds");
            }
            try {
                remaining = roomFreed.awaitNanos(remaining);
            } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
                throw new OnefoldException(OnefoldException.Kind.USAGE, "interrupted while waiting for room", e);
            }
        }
    }

    private void releaseDue(List<Decision<R>> out) {
        for (Arrival<R> a = reorder.releasable(); a != null; a = reorder.releasable()) {
            out.add(decide(a, false, false));
            roomFreed.signalAll();
        }
    }

    private void releaseEarly(List<Decision<R>> out) {
        releasedEarly++;
        out.add(decide(reorder.take(), false, true));
    }

    private Decision<R> decide(Arrival<R> a, boolean isLate, boolean early) {
        SeenStates.Known before = seen.get(a.key());
        Object after;
        byte[] afterBytes;
        Decision.Reason reason;
        if (before == null) {
            after = a.lifted();
            afterBytes = a.liftedBytes();
            reason = Decision.Reason.NEW_KEY;
        } else {
            MergeCounts counts = new MergeCounts();
            after = policy.merge(before.state(), a.lifted(), counts);
            afterBytes = policy.toBytes(after);
            if (Arrays.equals(afterBytes, before.bytes())) {
                return dropUnchanged(a, counts, isLate, early);
            }
            if (policy.hasSiblings(after)) {
                reason = Decision.Reason.SIBLINGS;
            } else if (counts.conflicts > 0) {
                reason = Decision.Reason.CONFLICT;
            } else if (Arrays.equals(afterBytes, a.liftedBytes())) {
                reason = Decision.Reason.NEWER_VERSION;
            } else {
                reason = Decision.Reason.MERGED;
            }
        }
        seen.emitted(a.key(), new SeenStates.Known(afterBytes, after));
        long size = Arrival.OVERHEAD_BYTES + 2L * a.key().bytes().length + afterBytes.length;
        unacked.computeIfAbsent(a.partition(), p -> new HashMap<>()).put(a.offset(), new Unacked(a.key(), size));
        awaitingAck++;
        awaitingBytes += size;
        emitted++;
        List<Row> rows = policy.visible(after);
        List<R> visible = new ArrayList<>(rows.size());
        for (Row r : rows) {
            visible.add(access.fromRow(r));
        }
        return new Decision<>(Decision.Action.EMIT, reason, a.partition(), a.offset(), a.record(), a.key().bytes(),
                afterBytes, List.copyOf(visible), policy.isDeleted(after), isLate, early, null);
    }

    private Decision<R> dropUnchanged(Arrival<R> a, MergeCounts counts, boolean isLate, boolean early) {
        Decision.Reason reason;
        if (counts.conflicts > 0) {
            conflictsLost++;
            reason = Decision.Reason.CONFLICT_LOST;
        } else if (counts.superseded > 0) {
            superseded++;
            reason = Decision.Reason.SUPERSEDED;
        } else {
            duplicates++;
            reason = Decision.Reason.DUPLICATE;
        }
        offsets.get(a.partition()).markDone(a.offset());
        return dropped(reason, a.partition(), a.offset(), a.record(), a.key().bytes(), isLate, early, null);
    }

    private Decision<R> dropped(Decision.Reason reason, String partition, long offset, R record, byte[] key,
            boolean isLate, boolean early, Rejection rejection) {
        return new Decision<>(Decision.Action.DROP, reason, partition, offset, record, key, null, List.of(), false,
                isLate, early, rejection);
    }

    /**
     * Releases every held record now, in release order (for example at the end of a bounded input or before a
     * planned shutdown). Later records behind the released ones take the late path. Cost: O(n log n) in held
     * records.
     */
    public List<Decision<R>> flush() {
        lock.lock();
        try {
            requireRunning();
            List<Decision<R>> out = new ArrayList<>();
            try {
                while (reorder != null && !reorder.isEmpty()) {
                    out.add(decide(reorder.take(), false, false));
                }
                roomFreed.signalAll();
            } catch (RuntimeException e) {
                throw stop(e);
            }
            return out;
        } finally {
            lock.unlock();
        }
    }

    /**
     * Acknowledges that the sink has durably stored an emitted decision. Acknowledging an offset that awaits no
     * acknowledgement (already acknowledged, dropped, or from before a restart) does nothing, so acknowledgements
     * may repeat. Cost: O(1) amortised.
     */
    public void acknowledge(String partition, long offset) {
        lock.lock();
        try {
            acknowledgeLocked(partition, offset);
        } finally {
            lock.unlock();
        }
    }

    /** Acknowledges one decision; a no-op for drops and holds. */
    public void acknowledge(Decision<?> decision) {
        if (decision.isEmit()) {
            acknowledge(decision.partition(), decision.offset());
        }
    }

    /** Acknowledges a batch of decisions under one lock acquisition, in any order. */
    public void acknowledgeAll(Iterable<? extends Decision<?>> decisions) {
        lock.lock();
        try {
            for (Decision<?> d : decisions) {
                if (d.isEmit()) {
                    acknowledgeLocked(d.partition(), d.offset());
                }
            }
        } finally {
            lock.unlock();
        }
    }

    private void acknowledgeLocked(String partition, long offset) {
        Map<Long, Unacked> m = unacked.get(partition);
        Unacked u = m == null ? null : m.remove(offset);
        if (u == null) {
            return;
        }
        awaitingAck--;
        awaitingBytes -= u.sizeBytes();
        seen.acknowledged(u.key());
        offsets.get(partition).markDone(offset);
        roomFreed.signalAll();
    }

    /**
     * Starts a partition at its committed offset before its first delivery, so offsets below it count as done
     * (replays of them are dropped as redelivered) and a first delivery above it marks the gap done. Without it,
     * a partition starts at its first delivered offset.
     *
     * @throws OnefoldException (USAGE) when the partition already had deliveries
     */
    public void resumeAt(String partition, long committedOffset) {
        lock.lock();
        try {
            offsets.computeIfAbsent(partition, PartitionOffsets::new).resumeAt(committedOffset);
        } finally {
            lock.unlock();
        }
    }

    /** The safe commit offset of a partition (every offset below it is done), if it had any delivery. */
    public OptionalLong committableOffset(String partition) {
        lock.lock();
        try {
            PartitionOffsets po = offsets.get(partition);
            return po == null || po.committable() < 0 ? OptionalLong.empty() : OptionalLong.of(po.committable());
        } finally {
            lock.unlock();
        }
    }

    /** The safe commit offset of every partition that had a delivery, sorted by partition. */
    public Map<String, Long> committableOffsets() {
        lock.lock();
        try {
            Map<String, Long> out = new TreeMap<>();
            offsets.forEach((p, po) -> {
                if (po.committable() >= 0) {
                    out.put(p, po.committable());
                }
            });
            return out;
        } finally {
            lock.unlock();
        }
    }

    /** A consistent snapshot of the counters and gauges. Cost: O(partitions) plus cache maintenance. */
    public GateMetrics metrics() {
        lock.lock();
        try {
            seen.cleanUp();
            Map<String, GateMetrics.PartitionProgress> parts = new TreeMap<>();
            offsets.forEach((p, po) -> parts.put(p,
                    new GateMetrics.PartitionProgress(po.committable(), po.nextExpected(), po.lag())));
            long heldNow = reorder == null ? 0 : reorder.heldRecords();
            long heldBytes = reorder == null ? 0 : reorder.heldBytes();
            return new GateMetrics(offered, emitted, duplicates, superseded, conflictsLost, redelivered, rejected,
                    late, releasedEarly, heldNow, awaitingAck, heldBytes + awaitingBytes, seen.windowEntries(),
                    seen.evictions(), seen.lookups(), seen.lookupHits(), parts);
        } finally {
            lock.unlock();
        }
    }

    /**
     * Stops the gate after a failure inside a call: decisions that call made were never returned, so only a
     * restart from the committed offsets (which none of them passed) recovers them.
     */
    private RuntimeException stop(RuntimeException e) {
        failure = e;
        return e;
    }

    private void requireRunning() {
        if (failure != null) {
            throw new OnefoldException(OnefoldException.Kind.USAGE,
                    "gate stopped after an earlier failure; restart from the committed offsets: " + failure.getMessage(),
                    failure);
        }
    }

    /**
     * Settings for a gate. Defaults: window of 100,000 keys kept for 1 hour since last access, no reordering;
     * at most 100,000 records or 64 MiB held, {@link WhenFull#RELEASE_EARLY}; at most 100,000 records or 64 MiB
     * awaiting acknowledgement; 60 s block timeout.
     */
    public static final class Builder<R> {
        private final DatasetSpec spec;
        private final RecordAccess<R> access;
        private boolean modeChosen;
        private StoredStateLookup lookup;
        private long windowKeys = 100_000;
        private Duration windowAge = Duration.ofHours(1);
        private LongSupplier windowClock = System::nanoTime;
        private String eventTimeField;
        private long lateness;
        private long maxHeldRecords = 100_000;
        private long maxHeldBytes = 64L << 20;
        private WhenFull whenHeldFull = WhenFull.RELEASE_EARLY;
        private long maxAwaitingRecords = 100_000;
        private long maxAwaitingBytes = 64L << 20;
        private Duration blockTimeout = Duration.ofSeconds(60);

        private Builder(DatasetSpec spec, RecordAccess<R> access) {
            this.spec = Objects.requireNonNull(spec, "spec");
            this.access = Objects.requireNonNull(access, "access");
        }

        /** Exact mode: keys beyond the window are looked up in the sink's store. */
        public Builder<R> exact(StoredStateLookup storedStates) {
            this.lookup = Objects.requireNonNull(storedStates, "storedStates");
            this.modeChosen = true;
            return this;
        }

        /** Windowed mode: keys beyond the window count as unseen. */
        public Builder<R> windowed() {
            this.lookup = null;
            this.modeChosen = true;
            return this;
        }

        /** How many keys the window keeps at most. */
        public Builder<R> windowKeys(long maxKeys) {
            if (maxKeys < 1) {
                throw OnefoldException.usage("window keys must be at least 1, got " + maxKeys);
            }
            this.windowKeys = maxKeys;
            return this;
        }

        /** How long a key stays in the window after it was last used. */
        public Builder<R> windowAge(Duration age) {
            if (age.isNegative() || age.isZero()) {
                throw OnefoldException.usage("window age must be positive, got " + age);
            }
            this.windowAge = age;
            return this;
        }

        /** The nanosecond clock that ages the window (for tests; default System.nanoTime). */
        public Builder<R> windowClock(LongSupplier nanoTime) {
            this.windowClock = Objects.requireNonNull(nanoTime, "nanoTime");
            return this;
        }

        /**
         * Reorders by an event-time field (int, long, timestamp or date), holding each record until the greatest
         * event time seen minus {@code lateness} (in the field's own unit) has passed it.
         */
        public Builder<R> reorder(String eventTimeField, long lateness) {
            if (lateness < 0) {
                throw OnefoldException.usage("lateness must not be negative, got " + lateness);
            }
            this.eventTimeField = Objects.requireNonNull(eventTimeField, "eventTimeField");
            this.lateness = lateness;
            return this;
        }

        /** The bound on records held for reordering, by count and estimated bytes, and what happens when full. */
        public Builder<R> maxHeld(long records, long bytes, WhenFull whenFull) {
            checkBound(records, bytes, "held");
            this.maxHeldRecords = records;
            this.maxHeldBytes = bytes;
            this.whenHeldFull = Objects.requireNonNull(whenFull, "whenFull");
            return this;
        }

        /** The bound on emitted records awaiting acknowledgement, by count and estimated bytes. */
        public Builder<R> maxAwaitingAck(long records, long bytes) {
            checkBound(records, bytes, "awaiting-acknowledgement");
            this.maxAwaitingRecords = records;
            this.maxAwaitingBytes = bytes;
            return this;
        }

        private static void checkBound(long records, long bytes, String what) {
            if (records < 1) {
                throw OnefoldException.usage(what + " records bound must be at least 1, got " + records);
            }
            if (bytes < 1024) {
                throw OnefoldException.usage(what + " bytes bound must be at least 1024, got " + bytes);
            }
        }

        /** How long an offer waits for room before it throws. */
        public Builder<R> blockTimeout(Duration timeout) {
            if (timeout.isNegative() || timeout.isZero()) {
                throw OnefoldException.usage("block timeout must be positive, got " + timeout);
            }
            this.blockTimeout = timeout;
            return this;
        }

        /**
         * Builds the gate.
         *
         * @throws OnefoldException (USAGE) when no mode was chosen or the reorder field does not fit;
         *     (INVALID_SPEC) when the spec does not fit the schema
         */
        public StreamGate<R> build() {
            if (!modeChosen) {
                throw OnefoldException.usage("choose a mode: exact(storedStates) or windowed()");
            }
            return new StreamGate<>(this);
        }
    }
}
