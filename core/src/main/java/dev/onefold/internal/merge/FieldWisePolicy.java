package dev.onefold.internal.merge;

import dev.onefold.DatasetSpec.FieldRule;
import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.OrderedBytes;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.record.FieldPath;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * Field-wise merge: every top-level field has a rule and its own version stamps, so the state is a product of
 * per-field joins (a product of joins is a join):
 * <ul>
 *   <li>{@code latest}: max of (version, canonical value bytes); {@code latest-non-null} the same over non-null
 *       values only; {@code first}: min of (version, value bytes).</li>
 *   <li>{@code max} / {@code min}: max / min of the value's order bytes; nulls ignored.</li>
 *   <li>{@code union}: lists as sets of elements (output in canonical byte order); maps key-wise, each entry
 *       latest by (version, value bytes).</li>
 *   <li>{@code sum}: one contribution per distinct version (equal versions keep the greater value bytes), summed
 *       in version order, so replays never double-count. Integer sums wrap like Java arithmetic.</li>
 * </ul>
 * A record is deleted while the tombstone field's {@code latest} value is true; a newer record brings the key
 * back with all merged fields (including contributions from before the delete: discarding them would break
 * associativity for max, min and sum). Counting uses the record-level latest (version, content hash).
 */
public final class FieldWisePolicy implements Policy<FieldWisePolicy.State> {

    /**
     * A value stamped with the version that contributed it, and the value's bytes that break ties: canonical
     * bytes, or order-preserving bytes for max and min. Most stamps are compared by version alone, so the bytes
     * of a lifted value are computed only when a comparison first needs them.
     */
    public static final class Stamp {
        private final long version;
        private final Object value;
        private final FieldType type;
        private final boolean ordered;
        private byte[] bytes;

        private Stamp(long version, Object value, FieldType type, boolean ordered, byte[] bytes) {
            this.version = version;
            this.value = value;
            this.type = type;
            this.ordered = ordered;
            this.bytes = bytes;
        }

        /** A stamp whose bytes are encoded from the value of {@code type} when first needed. */
        static Stamp of(long version, FieldType type, boolean ordered, Object value) {
            return new Stamp(version, value, type, ordered, null);
        }

        /** A stamp whose bytes are already known. */
        static Stamp withBytes(long version, byte[] bytes, Object value) {
            return new Stamp(version, value, null, false, bytes);
        }

        public long version() {
            return version;
        }

        public Object value() {
            return value;
        }

        byte[] bytes() {
            if (bytes == null) {
                bytes = ordered ? OrderedBytes.encode(type, value) : RowCodec.encodeValue(type, value);
            }
            return bytes;
        }
    }

    /**
     * Per-field state: {@code single} for latest, latest-non-null, first, max, min (null when nothing
     * contributed); {@code entries} for union and sum, keyed by element bytes, map key or version.
     */
    public record FieldState(Stamp single, TreeMap<Object, Stamp> entries) {}

    /**
     * The merge state of one key. A state lifted from a single record keeps just that record; its per-field
     * stamps are built the first time a merge or an encoding needs them, and the content hash of its latest
     * record the first time a count or an encoding needs it (a merge of two different versions takes the
     * newer one's hash without computing it), so keys delivered once cost no more than their record.
     */
    public static final class State {
        private final long latestVersion;
        private final Row single;
        /** The single-record state whose record is this one's latest, while its hash is not yet known. */
        private final State hashFrom;
        private volatile FieldState[] fields;
        private long latestHash;
        private volatile boolean hashKnown;

        State(long latestVersion, long latestHash, FieldState[] fields) {
            this.latestVersion = latestVersion;
            this.latestHash = latestHash;
            this.hashKnown = true;
            this.fields = fields;
            this.single = null;
            this.hashFrom = null;
        }

        /** A merged state whose latest record is {@code newer}'s; the hash is looked up at most one state away. */
        State(long latestVersion, State newer, FieldState[] fields) {
            this.latestVersion = latestVersion;
            this.fields = fields;
            this.single = null;
            if (newer.hashKnown) {
                this.latestHash = newer.latestHash;
                this.hashKnown = true;
                this.hashFrom = null;
            } else {
                // newer is a single record's state or points at one, so chains never grow past one link
                this.hashFrom = newer.single != null ? newer : newer.hashFrom;
            }
        }

        State(long version, Row single) {
            this.latestVersion = version;
            this.single = single;
            this.hashFrom = null;
        }

        public long latestVersion() {
            return latestVersion;
        }
    }

    private FieldState[] fields(State s) {
        FieldState[] f = s.fields;
        if (f == null) {
            FieldState[] lifted = new FieldState[rules.length];
            for (int i = 0; i < rules.length; i++) {
                lifted[i] = liftField(i, s.latestVersion, s.single.get(i));
            }
            s.fields = lifted;
            f = lifted;
        }
        return f;
    }

    private static long latestHash(State s) {
        if (!s.hashKnown) {
            s.latestHash = s.single != null ? XxHash64.hash(RowCodec.encode(s.single)) : latestHash(s.hashFrom);
            s.hashKnown = true;
        }
        return s.latestHash;
    }

    private final RowSchema schema;
    private final FieldRule[] rules;
    private final FieldPath version;
    private final int tombstoneIndex;
    private final boolean plainSingle;

    public FieldWisePolicy(RowSchema schema, FieldRule[] rules, FieldPath version, int tombstoneIndex) {
        this.schema = schema;
        this.rules = rules.clone();
        this.version = version;
        this.tombstoneIndex = tombstoneIndex;
        boolean plain = true;
        for (FieldRule r : rules) {
            plain &= r != FieldRule.UNION && r != FieldRule.SUM;
        }
        this.plainSingle = plain;
    }

    private static final java.util.Comparator<Object> ENTRY_KEYS = (a, b) -> {
        if (a instanceof Long x && b instanceof Long y) {
            return Long.compare(x, y);
        }
        if (a instanceof String x && b instanceof String y) {
            return x.compareTo(y);
        }
        return Arrays.compareUnsigned((byte[]) a, (byte[]) b);
    };

    @Override
    public State lift(Row record) {
        Object v = version.read(record);
        if (v == null) {
            throw OnefoldException.record("version field '" + version.path() + "' is null");
        }
        return new State(((Number) v).longValue(), record);
    }

    private FieldState liftField(int i, long ver, Object value) {
        FieldType type = schema.field(i).type();
        switch (rules[i]) {
            case LATEST:
            case FIRST:
                return new FieldState(Stamp.of(ver, type, false, value), null);
            case LATEST_NON_NULL:
                return new FieldState(value == null ? null : Stamp.of(ver, type, false, value), null);
            case MAX:
            case MIN:
                return new FieldState(value == null ? null : Stamp.of(ver, type, true, value), null);
            case UNION: {
                TreeMap<Object, Stamp> entries = new TreeMap<>(ENTRY_KEYS);
                if (value instanceof List<?> list) {
                    for (Object e : list) {
                        byte[] b = RowCodec.encodeValue(type.element(), e);
                        entries.put(b, Stamp.withBytes(ver, b, e));
                    }
                } else if (value instanceof Map<?, ?> map) {
                    for (Map.Entry<?, ?> e : map.entrySet()) {
                        entries.put(e.getKey(), Stamp.of(ver, type.element(), false, e.getValue()));
                    }
                }
                return new FieldState(null, entries);
            }
            case SUM: {
                TreeMap<Object, Stamp> entries = new TreeMap<>(ENTRY_KEYS);
                if (value != null) {
                    entries.put(ver, Stamp.of(ver, type, false, value));
                }
                return new FieldState(null, entries);
            }
            default:
                throw new AssertionError(rules[i]);
        }
    }

    /**
     * The state bytes begin with the latest version, so different latest versions mean different bytes; merge
     * counts by comparing the two latest versions and stamps, which does not depend on argument order.
     */
    @Override
    public boolean surelyDistinct(State a, State b) {
        return a.latestVersion != b.latestVersion;
    }

    @Override
    public State merge(State a, State b, MergeCounts counts) {
        if (a.latestVersion == b.latestVersion) {
            if (latestHash(a) == latestHash(b)) {
                counts.duplicates++;
            } else {
                counts.conflicts++;
            }
        } else {
            counts.superseded++;
        }
        FieldState[] out = new FieldState[rules.length];
        for (int i = 0; i < rules.length; i++) {
            out[i] = mergeField(rules[i], fields(a)[i], fields(b)[i]);
        }
        if (a.latestVersion != b.latestVersion) {
            State newer = a.latestVersion > b.latestVersion ? a : b;
            return new State(newer.latestVersion, newer, out);
        }
        long lh = Long.compareUnsigned(latestHash(a), latestHash(b)) >= 0 ? latestHash(a) : latestHash(b);
        return new State(a.latestVersion, lh, out);
    }

    private static int byVersionThenBytes(Stamp x, Stamp y) {
        int c = Long.compare(x.version, y.version);
        return c != 0 ? c : Arrays.compareUnsigned(x.bytes(), y.bytes());
    }

    private static int byBytesThenVersion(Stamp x, Stamp y) {
        int c = Arrays.compareUnsigned(x.bytes(), y.bytes());
        return c != 0 ? c : Long.compare(x.version, y.version);
    }

    private static FieldState mergeField(FieldRule rule, FieldState x, FieldState y) {
        switch (rule) {
            case LATEST:
            case LATEST_NON_NULL:
                return new FieldState(pick(x.single, y.single, true, true), null);
            case FIRST:
                return new FieldState(pick(x.single, y.single, true, false), null);
            case MAX:
                return new FieldState(pick(x.single, y.single, false, true), null);
            case MIN:
                return new FieldState(pick(x.single, y.single, false, false), null);
            case UNION:
            case SUM: {
                TreeMap<Object, Stamp> merged = new TreeMap<>(x.entries);
                for (Map.Entry<Object, Stamp> e : y.entries.entrySet()) {
                    merged.merge(e.getKey(), e.getValue(), (p, q) -> byVersionThenBytes(p, q) >= 0 ? p : q);
                }
                return new FieldState(null, merged);
            }
            default:
                throw new AssertionError(rule);
        }
    }

    private static Stamp pick(Stamp x, Stamp y, boolean versionFirst, boolean greatest) {
        if (x == null) {
            return y;
        }
        if (y == null) {
            return x;
        }
        int c = versionFirst ? byVersionThenBytes(x, y) : byBytesThenVersion(x, y);
        return (c >= 0) == greatest ? x : y;
    }

    @Override
    public List<Row> visible(State state) {
        return isDeleted(state) ? List.of() : List.of(anchor(state));
    }

    @Override
    public boolean isDeleted(State state) {
        if (tombstoneIndex < 0) {
            return false;
        }
        if (state.fields == null) {
            return Boolean.TRUE.equals(state.single.get(tombstoneIndex));
        }
        Stamp s = state.fields[tombstoneIndex].single;
        return s != null && Boolean.TRUE.equals(s.value);
    }

    @Override
    public Row anchor(State state) {
        if (state.fields == null && isPlainSingle()) {
            return state.single;
        }
        FieldState[] fs = fields(state);
        Object[] values = new Object[rules.length];
        for (int i = 0; i < rules.length; i++) {
            FieldType type = schema.field(i).type();
            FieldState f = fs[i];
            switch (rules[i]) {
                case UNION -> values[i] = unionValue(type, f.entries);
                case SUM -> values[i] = sumValue(type, f.entries);
                default -> values[i] = f.single == null ? null : f.single.value;
            }
        }
        return Row.of(schema, values);
    }

    /**
     * Whether a single record is its own merged view: true when no field uses union or sum, whose outputs
     * normalise a lone value (union sorts and de-duplicates elements, sum turns null into zero).
     */
    private boolean isPlainSingle() {
        return plainSingle;
    }

    private static Object unionValue(FieldType type, TreeMap<Object, Stamp> entries) {
        if (type.kind() == FieldType.Kind.MAP) {
            if (entries.isEmpty() && type.isNullable()) {
                return null;
            }
            TreeMap<String, Object> m = new TreeMap<>();
            entries.forEach((k, s) -> m.put((String) k, s.value));
            return Collections.unmodifiableSortedMap(m);
        }
        if (entries.isEmpty() && type.isNullable()) {
            return null;
        }
        List<Object> l = new ArrayList<>(entries.size());
        entries.values().forEach(s -> l.add(s.value));
        return Collections.unmodifiableList(l);
    }

    private static Object sumValue(FieldType type, TreeMap<Object, Stamp> entries) {
        if (entries.isEmpty()) {
            return type.isNullable() ? null : zero(type);
        }
        Object acc = zero(type);
        for (Stamp s : entries.values()) {
            acc = add(type, acc, s.value);
        }
        return acc;
    }

    private static Object zero(FieldType type) {
        return switch (type.kind()) {
            case INT -> 0;
            case LONG -> 0L;
            case FLOAT -> 0f;
            case DOUBLE -> 0d;
            case DECIMAL -> BigDecimal.ZERO.setScale(type.scale());
            default -> throw new AssertionError(type);
        };
    }

    private static Object add(FieldType type, Object a, Object b) {
        return switch (type.kind()) {
            case INT -> (Integer) a + (Integer) b;
            case LONG -> (Long) a + (Long) b;
            case FLOAT -> (Float) a + (Float) b;
            case DOUBLE -> (Double) a + (Double) b;
            case DECIMAL -> ((BigDecimal) a).add((BigDecimal) b);
            default -> throw new AssertionError(type);
        };
    }

    @Override
    public void write(ByteWriter out, State state) {
        FieldState[] fs = fields(state);
        out.writeZigZag(state.latestVersion);
        out.writeLong(latestHash(state));
        for (int i = 0; i < rules.length; i++) {
            FieldType type = schema.field(i).type();
            FieldState f = fs[i];
            switch (rules[i]) {
                case UNION, SUM -> {
                    out.writeVarInt(f.entries.size());
                    for (Map.Entry<Object, Stamp> e : f.entries.entrySet()) {
                        if (type.kind() == FieldType.Kind.MAP && rules[i] == FieldRule.UNION) {
                            out.writeString((String) e.getKey());
                        }
                        writeStamp(out, e.getValue(), rules[i] == FieldRule.UNION ? type.element() : type);
                    }
                }
                default -> {
                    if (f.single == null) {
                        out.write(0);
                    } else {
                        out.write(1);
                        writeStamp(out, f.single, type);
                    }
                }
            }
        }
    }

    private static void writeStamp(ByteWriter out, Stamp s, FieldType type) {
        out.writeZigZag(s.version);
        RowCodec.writeValue(out, type.nullable(), s.value);
    }

    @Override
    public State read(ByteReader in) {
        long lv = in.readZigZag();
        long lh = in.readLong();
        FieldState[] fs = new FieldState[rules.length];
        for (int i = 0; i < rules.length; i++) {
            FieldType type = schema.field(i).type();
            switch (rules[i]) {
                case UNION, SUM -> {
                    int n = in.readVarInt();
                    if (n > in.remaining()) {
                        throw OnefoldException.corrupt(in.source() + ": implausible entry count " + n);
                    }
                    TreeMap<Object, Stamp> entries = new TreeMap<>(ENTRY_KEYS);
                    for (int k = 0; k < n; k++) {
                        if (rules[i] == FieldRule.UNION && type.kind() == FieldType.Kind.MAP) {
                            String key = in.readString();
                            Stamp s = readStamp(in, type.element(), false);
                            entries.put(key, s);
                        } else if (rules[i] == FieldRule.UNION) {
                            Stamp s = readStamp(in, type.element(), false);
                            entries.put(s.bytes(), s);
                        } else {
                            Stamp s = readStamp(in, type, false);
                            entries.put(s.version, s);
                        }
                    }
                    fs[i] = new FieldState(null, entries);
                }
                default -> {
                    int present = in.read();
                    boolean ordered = rules[i] == FieldRule.MAX || rules[i] == FieldRule.MIN;
                    fs[i] = new FieldState(present == 0 ? null : readStamp(in, type, ordered), null);
                }
            }
        }
        return new State(lv, lh, fs);
    }

    private static Stamp readStamp(ByteReader in, FieldType type, boolean ordered) {
        long v = in.readZigZag();
        Object value = RowCodec.readValue(in, type.nullable());
        return Stamp.of(v, type, ordered, value);
    }
}
