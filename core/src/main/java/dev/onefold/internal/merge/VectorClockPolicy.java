package dev.onefold.internal.merge;

import dev.onefold.DatasetSpec.Concurrent;
import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.encoding.RowSerde;
import dev.onefold.record.FieldPath;
import dev.onefold.record.Row;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.SortedMap;
import java.util.TreeMap;

/**
 * Vector-clock dominance. A clock maps writer to a non-negative counter; a missing writer counts 0, so zero
 * entries are dropped when a clock is read. Clock a dominates b when a[w] >= b[w] for every writer w and
 * a != b (Fidge/Mattern). The state is the set of maximal versions, the siblings, kept sorted by
 * (clock bytes, content bytes); the join of two states is the set of maximal elements of their union, where a
 * version with an equal clock but smaller content bytes also counts as dominated (a conflict). That set
 * operation is commutative, associative and idempotent.
 *
 * <p>Output: {@code pick} shows one sibling, the one with the greatest counter sum, then greatest content
 * bytes (a pure function of the set, never arrival order); a picked tombstone hides the key.
 * {@code keep-all} shows every sibling that is not a tombstone, in state order.
 */
public final class VectorClockPolicy implements Policy<VectorClockPolicy.State> {

    /** One maximal version. */
    public static final class Sibling {
        private final SortedMap<String, Long> clock;
        private final Row row;
        private final boolean deleted;
        private byte[] clockBytes;
        private byte[] content;

        Sibling(SortedMap<String, Long> clock, Row row, boolean deleted) {
            this.clock = clock;
            this.row = row;
            this.deleted = deleted;
        }

        public SortedMap<String, Long> clock() {
            return clock;
        }

        public Row row() {
            return row;
        }

        public boolean deleted() {
            return deleted;
        }

        /** Canonical clock bytes, computed when a comparison first needs them. */
        byte[] clockBytes() {
            if (clockBytes == null) {
                clockBytes = VectorClockPolicy.clockBytes(clock);
            }
            return clockBytes;
        }

        /** Canonical row bytes, computed when a comparison first needs them. */
        byte[] content() {
            if (content == null) {
                content = RowCodec.encode(row);
            }
            return content;
        }

        long counterSum() {
            long s = 0;
            for (long v : clock.values()) {
                s += v;
            }
            return s;
        }
    }

    /** The siblings of one key, sorted. */
    public record State(List<Sibling> siblings) {}

    private static final Comparator<Sibling> CANONICAL = (x, y) -> {
        int c = Arrays.compareUnsigned(x.clockBytes(), y.clockBytes());
        return c != 0 ? c : Arrays.compareUnsigned(x.content(), y.content());
    };

    private final FieldPath clock;
    private final FieldPath tombstone;
    private final Concurrent concurrent;
    private final RowSerde serde;

    public VectorClockPolicy(FieldPath clock, FieldPath tombstone, Concurrent concurrent, RowSerde serde) {
        this.clock = clock;
        this.tombstone = tombstone;
        this.concurrent = concurrent;
        this.serde = serde;
    }

    @Override
    public State lift(Row record) {
        return new State(List.of(sibling(record)));
    }

    private Sibling sibling(Row record) {
        Object v = clock.read(record);
        if (v == null) {
            throw OnefoldException.record("clock field '" + clock.path() + "' is null");
        }
        Map<?, ?> counters = (Map<?, ?>) v;
        boolean hasZero = false;
        for (Map.Entry<?, ?> e : counters.entrySet()) {
            Object n = e.getValue();
            if (!(n instanceof Long || n instanceof Integer)) {
                throw OnefoldException.record("clock field '" + clock.path() + "': counter of writer '" + e.getKey()
                        + "' is not an integer: " + n);
            }
            long counter = ((Number) n).longValue();
            if (counter < 0) {
                throw OnefoldException.record("clock field '" + clock.path() + "': counter of writer '" + e.getKey()
                        + "' is negative: " + counter);
            }
            hasZero |= counter == 0;
        }
        return new Sibling(canonicalClock(counters, hasZero), record, Tombstones.isSet(tombstone, record));
    }

    /**
     * The clock as a map sorted by writer without zero counters. A row's map already is one (rows hold maps as
     * unmodifiable maps sorted by key, with long values), so it is used as it is unless a zero must go; other
     * maps are copied.
     */
    @SuppressWarnings("unchecked")
    private static SortedMap<String, Long> canonicalClock(Map<?, ?> counters, boolean hasZero) {
        if (!hasZero && counters instanceof SortedMap<?, ?> sorted && sorted.comparator() == null
                && allLong(counters)) {
            return (SortedMap<String, Long>) sorted;
        }
        TreeMap<String, Long> c = new TreeMap<>();
        for (Map.Entry<?, ?> e : counters.entrySet()) {
            long counter = ((Number) e.getValue()).longValue();
            if (counter > 0) {
                c.put((String) e.getKey(), counter);
            }
        }
        return Collections.unmodifiableSortedMap(c);
    }

    private static boolean allLong(Map<?, ?> counters) {
        for (Object n : counters.values()) {
            if (!(n instanceof Long)) {
                return false;
            }
        }
        return true;
    }

    static byte[] clockBytes(SortedMap<String, Long> clock) {
        ByteWriter w = new ByteWriter(16 * (clock.size() + 1));
        w.writeVarInt(clock.size());
        for (Map.Entry<String, Long> e : clock.entrySet()) {
            w.writeString(e.getKey());
            w.writeVarLong(e.getValue());
        }
        return w.toByteArray();
    }

    /** Whether a's clock is >= b's at every writer. */
    public static boolean covers(Map<String, Long> a, Map<String, Long> b) {
        for (Map.Entry<String, Long> e : b.entrySet()) {
            if (a.getOrDefault(e.getKey(), 0L) < e.getValue()) {
                return false;
            }
        }
        return true;
    }

    /** Whether a's clock dominates b's: covers it and differs. */
    public static boolean dominates(Map<String, Long> a, Map<String, Long> b) {
        return covers(a, b) && !a.equals(b);
    }

    @Override
    public State merge(State a, State b, MergeCounts counts) {
        List<Sibling> all = new ArrayList<>(a.siblings.size() + b.siblings.size());
        all.addAll(a.siblings);
        all.addAll(b.siblings);
        all.sort(CANONICAL);
        List<Sibling> kept = new ArrayList<>(all.size());
        for (int i = 0; i < all.size(); i++) {
            Sibling s = all.get(i);
            if (i + 1 < all.size() && CANONICAL.compare(s, all.get(i + 1)) == 0) {
                counts.duplicates++;
                continue;
            }
            boolean beaten = false;
            for (Sibling o : all) {
                if (o == s) {
                    continue;
                }
                if (Arrays.equals(o.clockBytes(), s.clockBytes())) {
                    if (Arrays.compareUnsigned(o.content(), s.content()) > 0) {
                        counts.conflicts++;
                        beaten = true;
                        break;
                    }
                } else if (dominates(o.clock(), s.clock())) {
                    counts.superseded++;
                    beaten = true;
                    break;
                }
            }
            if (!beaten) {
                kept.add(s);
            }
        }
        return new State(List.copyOf(kept));
    }

    private Sibling picked(State state) {
        Sibling best = null;
        for (Sibling s : state.siblings) {
            if (best == null) {
                best = s;
                continue;
            }
            int c = Long.compare(s.counterSum(), best.counterSum());
            if (c == 0) {
                c = Arrays.compareUnsigned(s.content(), best.content());
            }
            if (c > 0) {
                best = s;
            }
        }
        return best;
    }

    @Override
    public List<Row> visible(State state) {
        if (concurrent == Concurrent.PICK) {
            Sibling p = picked(state);
            return p.deleted() ? List.of() : List.of(p.row());
        }
        List<Row> out = new ArrayList<>(state.siblings.size());
        for (Sibling s : state.siblings) {
            if (!s.deleted()) {
                out.add(s.row());
            }
        }
        return out;
    }

    @Override
    public Row anchor(State state) {
        return picked(state).row;
    }

    /**
     * Single versions with different clocks (zero counters dropped) hold different rows, so their state bytes
     * differ; merge sorts its siblings canonically before counting, so argument order does not matter. Clocks
     * without zero counters are equal as maps exactly when their bytes are, and comparing the maps is cheaper.
     */
    @Override
    public boolean surelyDistinct(State a, State b) {
        return a.siblings.size() == 1 && b.siblings.size() == 1
                && !a.siblings.get(0).clock().equals(b.siblings.get(0).clock());
    }

    @Override
    public boolean hasSiblings(State state) {
        return state.siblings.size() > 1;
    }

    @Override
    public void write(ByteWriter out, State state) {
        out.writeVarInt(state.siblings.size());
        for (Sibling s : state.siblings) {
            serde.write(out, s.row());
        }
    }

    @Override
    public State read(ByteReader in) {
        int n = in.readVarInt();
        if (n < 1 || n > in.remaining()) {
            throw OnefoldException.corrupt(in.source() + ": implausible sibling count " + n);
        }
        List<Sibling> out = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            out.add(sibling(serde.read(in)));
        }
        out.sort(CANONICAL);
        return new State(List.copyOf(out));
    }
}
