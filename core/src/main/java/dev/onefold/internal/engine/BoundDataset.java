package dev.onefold.internal.engine;

import dev.onefold.DatasetSpec;
import dev.onefold.DatasetSpec.FieldRule;
import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.OrderedBytes;
import dev.onefold.internal.encoding.RowSerde;
import dev.onefold.internal.merge.FieldWisePolicy;
import dev.onefold.internal.merge.LastWriterPolicy;
import dev.onefold.internal.merge.Policy;
import dev.onefold.internal.merge.UserPolicy;
import dev.onefold.internal.merge.VectorClockPolicy;
import dev.onefold.record.FieldPath;
import dev.onefold.record.FieldType;
import dev.onefold.record.FieldType.Kind;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.time.LocalDateTime;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.EnumSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * A {@link DatasetSpec} checked against one {@link RowSchema}: every path resolved once, every type checked
 * for its role, the merge policy built. Then it extracts from a row its key bytes, order bytes (order fields,
 * then the key) and partition value. Immutable and thread-safe.
 */
public final class BoundDataset {
    private static final Set<Kind> NUMERIC = EnumSet.of(Kind.INT, Kind.LONG, Kind.FLOAT, Kind.DOUBLE, Kind.DECIMAL);
    private static final Set<Kind> VERSION = EnumSet.of(Kind.INT, Kind.LONG);
    private static final Set<Kind> TIME = EnumSet.of(Kind.TIMESTAMP_MILLIS, Kind.TIMESTAMP_MICROS, Kind.LONG, Kind.DATE);

    private final DatasetSpec spec;
    private final RowSchema schema;
    private final FieldPath[] key;
    private final FieldPath[] order;
    private final int constantOrderBytes;
    private final boolean[] descending;
    private final FieldPath[] partitionFields;
    private final DatasetSpec.TimeUnit partitionUnit;
    private final Policy<Object> policy;

    private BoundDataset(DatasetSpec spec, RowSchema schema, RowSerde serde) {
        this.spec = spec;
        this.schema = schema;
        List<String> problems = new ArrayList<>();
        key = new FieldPath[spec.key().size()];
        for (int i = 0; i < key.length; i++) {
            key[i] = resolve(spec.key().get(i), "key", problems);
            if (key[i] != null) {
                FieldType t = key[i].type();
                if (!t.kind().isOrderable()) {
                    problems.add("key field '" + key[i].path() + "' is " + t + ", which has no order (use a primitive or logical type)");
                } else if (t.isNullable() && !spec.allowNullKey()) {
                    problems.add("key field '" + key[i].path() + "' is nullable; set \"allow_null_key\": true to accept null keys");
                }
            }
        }
        order = new FieldPath[spec.order().size()];
        descending = new boolean[order.length];
        for (int i = 0; i < order.length; i++) {
            DatasetSpec.OrderField of = spec.order().get(i);
            order[i] = resolve(of.path(), "order", problems);
            descending[i] = of.descending();
            if (order[i] != null && !order[i].type().kind().isOrderable()) {
                problems.add("order field '" + of.path() + "' is " + order[i].type() + ", which cannot be ordered");
            }
        }
        // a top-level field that is not nullable is never null in a row, so its presence byte never varies
        constantOrderBytes = order.length > 0 && order[0] != null && order[0].isTopLevel()
                && !order[0].type().isNullable() ? 1 : 0;
        FieldPath tombstone = null;
        if (spec.tombstone() != null) {
            tombstone = resolve(spec.tombstone(), "tombstone", problems);
            if (tombstone != null && tombstone.type().kind() != Kind.BOOLEAN) {
                problems.add("tombstone field '" + spec.tombstone() + "' must be boolean, is " + tombstone.type());
            }
        }
        DatasetSpec.PartitionRule pr = spec.partition();
        if (pr instanceof DatasetSpec.TimeBucket tb) {
            FieldPath p = resolve(tb.field(), "partition", problems);
            partitionFields = new FieldPath[] {p};
            partitionUnit = tb.unit();
            if (p != null && !TIME.contains(p.type().kind())) {
                problems.add("partition field '" + tb.field() + "' is " + p.type()
                        + "; a time bucket needs timestamp-millis, timestamp-micros, long (epoch millis) or date");
            }
        } else if (pr instanceof DatasetSpec.ByValues bv) {
            partitionFields = new FieldPath[bv.fields().size()];
            for (int i = 0; i < partitionFields.length; i++) {
                partitionFields[i] = resolve(bv.fields().get(i), "partition", problems);
                if (partitionFields[i] != null && !partitionFields[i].type().kind().isOrderable()) {
                    problems.add("partition field '" + bv.fields().get(i) + "' is " + partitionFields[i].type()
                            + "; partition values must be primitive or logical values");
                }
            }
            partitionUnit = null;
        } else {
            partitionFields = new FieldPath[0];
            partitionUnit = null;
        }
        for (DatasetSpec.Check c : spec.checks()) {
            FieldPath p = resolve(c.field(), "checks", problems);
            if (p != null && !NUMERIC.contains(p.type().kind()) && !p.type().kind().isIntegral()) {
                problems.add("checks field '" + c.field() + "' is " + p.type() + "; aggregates need a numeric field");
            }
        }
        Policy<?> built = buildPolicy(spec, schema, tombstone, serde, problems);
        if (!problems.isEmpty()) {
            throw OnefoldException.spec("spec does not fit schema " + schema.name() + ": " + String.join("; ", problems));
        }
        @SuppressWarnings("unchecked")
        Policy<Object> p = (Policy<Object>) built;
        this.policy = p;
    }

    /**
     * Binds a spec to a schema.
     *
     * @throws OnefoldException (INVALID_SPEC) listing every problem found, each naming the field path
     */
    public static BoundDataset bind(DatasetSpec spec, RowSchema schema) {
        return new BoundDataset(spec, schema, RowSerde.canonical(schema));
    }

    /** Binds with a custom row serde for the states (for example one that resolves older schemas). */
    public static BoundDataset bind(DatasetSpec spec, RowSchema schema, RowSerde serde) {
        return new BoundDataset(spec, schema, serde);
    }

    private FieldPath resolve(String path, String role, List<String> problems) {
        try {
            return schema.resolve(path);
        } catch (OnefoldException e) {
            problems.add(role + ": " + e.getMessage());
            return null;
        }
    }

    private Policy<?> buildPolicy(DatasetSpec spec, RowSchema schema, FieldPath tombstone, RowSerde serde,
            List<String> problems) {
        DatasetSpec.MergeRule m = spec.merge();
        if (m instanceof DatasetSpec.LastWriter lw) {
            FieldPath v = versionPath(lw.version(), problems);
            return v == null ? null : new LastWriterPolicy(v, tombstone, serde);
        }
        if (m instanceof DatasetSpec.VectorClock vc) {
            FieldPath c = resolve(vc.clock(), "merge.clock", problems);
            if (c != null) {
                FieldType t = c.type();
                if (t.kind() != Kind.MAP || !(t.element().kind() == Kind.LONG || t.element().kind() == Kind.INT)
                        || t.element().isNullable()) {
                    problems.add("clock field '" + vc.clock() + "' must be a map of long counters, is " + t);
                    return null;
                }
                return new VectorClockPolicy(c, tombstone, vc.concurrent(), serde);
            }
            return null;
        }
        if (m instanceof DatasetSpec.FieldWise fw) {
            FieldPath v = versionPath(fw.version(), problems);
            FieldRule[] rules = new FieldRule[schema.size()];
            java.util.Arrays.fill(rules, FieldRule.LATEST);
            for (Map.Entry<String, FieldRule> e : fw.fields().entrySet()) {
                int i = schema.indexOf(e.getKey());
                if (i < 0) {
                    problems.add("merge.fields: " + (e.getKey().contains(".")
                            ? "rules apply to top-level fields; '" + e.getKey() + "' is a nested path"
                            : "record " + schema.name() + " has no field '" + e.getKey() + "'"));
                    continue;
                }
                if (spec.key().contains(e.getKey())) {
                    problems.add("merge.fields: '" + e.getKey() + "' is a key field; key fields take no rule");
                    continue;
                }
                FieldType t = schema.field(i).type();
                FieldRule r = e.getValue();
                if ((r == FieldRule.MAX || r == FieldRule.MIN) && !t.kind().isOrderable()) {
                    problems.add("merge.fields: rule " + r.json() + " on '" + e.getKey() + "' needs an orderable type, is " + t);
                } else if (r == FieldRule.UNION && t.kind() != Kind.LIST && t.kind() != Kind.MAP) {
                    problems.add("merge.fields: rule union on '" + e.getKey() + "' needs a list or map, is " + t);
                } else if (r == FieldRule.SUM && !NUMERIC.contains(t.kind())) {
                    problems.add("merge.fields: rule sum on '" + e.getKey() + "' needs int, long, float, double or decimal, is " + t);
                }
                rules[i] = r;
            }
            int tombstoneIndex = -1;
            if (spec.tombstone() != null) {
                if (!isTopLevel(tombstone)) {
                    problems.add("tombstone: with field-wise merge the tombstone must be a top-level field");
                } else {
                    tombstoneIndex = tombstone.topPosition();
                    if (rules[tombstoneIndex] != FieldRule.LATEST) {
                        problems.add("merge.fields: the tombstone field '" + spec.tombstone() + "' must follow rule latest");
                    }
                }
            }
            return v == null ? null : new FieldWisePolicy(schema, rules, v, tombstoneIndex);
        }
        DatasetSpec.Custom c = (DatasetSpec.Custom) m;
        return new UserPolicy(c.policy(), schema, serde);
    }

    private static boolean isTopLevel(FieldPath tombstone) {
        return tombstone != null && tombstone.isTopLevel();
    }

    private FieldPath versionPath(String path, List<String> problems) {
        FieldPath v = resolve(path, "merge.version", problems);
        if (v != null && !VERSION.contains(v.type().kind())) {
            problems.add("version field '" + path + "' must be int or long, is " + v.type());
            return null;
        }
        return v;
    }

    public DatasetSpec spec() { return spec; }
    public RowSchema schema() { return schema; }
    public Policy<Object> policy() { return policy; }

    /**
     * The key bytes of a row.
     *
     * @throws OnefoldException (INVALID_RECORD) when a key field is null and null keys are not allowed
     */
    public byte[] key(Row row) {
        ByteWriter w = SCRATCH.get().reset();
        writeKey(w, row);
        return w.toByteArray();
    }

    /** One reusable buffer per thread: key and order bytes are built there and copied out once. */
    private static final ThreadLocal<ByteWriter> SCRATCH = ThreadLocal.withInitial(() -> new ByteWriter(256));

    /**
     * Appends the key bytes of a row to {@code w}.
     *
     * @throws OnefoldException (INVALID_RECORD) when a key field is null and null keys are not allowed; part of
     *     the key may have been written by then
     */
    public void writeKey(ByteWriter w, Row row) {
        for (FieldPath p : key) {
            Object v = p.read(row);
            if (v == null && !spec.allowNullKey()) {
                throw OnefoldException.record("key field '" + p.path() + "' is null");
            }
            OrderedBytes.write(w, p.type(), v, false);
        }
    }

    /** The order bytes of a row: order fields (flipped when descending), then the key. */
    public byte[] order(Row row) {
        return order(row, key(row));
    }

    /** The order bytes of a row whose key bytes are already known. */
    public byte[] order(Row row, byte[] key) {
        ByteWriter w = SCRATCH.get().reset();
        writeOrderFields(w, row);
        w.write(key);
        return w.toByteArray();
    }

    /** Appends the order fields of a row (flipped when descending) to {@code w}; the key bytes follow them. */
    public void writeOrderFields(ByteWriter w, Row row) {
        for (int i = 0; i < order.length; i++) {
            OrderedBytes.write(w, order[i].type(), order[i].read(row), descending[i]);
        }
    }

    /**
     * How many leading order bytes are the same for every row: the presence byte of a first order field that
     * can never be null, else none. Sort prefixes start after them, so their eight bytes are all content.
     */
    public int constantOrderBytes() {
        return constantOrderBytes;
    }

    /** Whether the dataset is partitioned. */
    public boolean isPartitioned() {
        return partitionFields.length > 0;
    }

    /** Whether partitions follow a time bucket of the leading order field, so partition order is time order. */
    public boolean partitionsFollowOrder() {
        return partitionUnit != null && order.length > 0 && !descending[0]
                && order[0].path().equals(partitionFields[0].path());
    }

    /**
     * The partition values of a row: for a time bucket one value ({@code 2024-02-29T13}, {@code 2024-02-29} or
     * {@code 2024-02}, UTC); for value partitions one string per field (null for a null value). Empty when the
     * dataset is not partitioned.
     */
    public List<String> partition(Row row) {
        if (partitionFields.length == 0) {
            return List.of();
        }
        if (partitionUnit != null) {
            Object v = partitionFields[0].read(row);
            if (v == null) {
                return java.util.Collections.singletonList(null);
            }
            return List.of(timeBucket(partitionFields[0].type().kind(), ((Number) v).longValue(), partitionUnit));
        }
        List<String> out = new ArrayList<>(partitionFields.length);
        for (FieldPath p : partitionFields) {
            Object v = p.read(row);
            out.add(v == null ? null : PartitionValues.render(v));
        }
        return java.util.Collections.unmodifiableList(out);
    }

    /** The UTC bucket of a time value, with floor semantics so instants before 1970 bucket correctly. */
    public static String timeBucket(Kind kind, long value, DatasetSpec.TimeUnit unit) {
        long millis = switch (kind) {
            case TIMESTAMP_MICROS -> Math.floorDiv(value, 1000L);
            case DATE -> Math.multiplyExact(value, 86_400_000L);
            default -> value;
        };
        LocalDateTime t = LocalDateTime.ofEpochSecond(Math.floorDiv(millis, 1000L), 0, ZoneOffset.UTC);
        // Built by hand rather than with String.format, which costs microseconds per call (it parses the pattern
        // and looks up locale digits) and sat on every batch key's path; the digits are ASCII in every locale.
        StringBuilder b = new StringBuilder(13);
        padded(b, t.getYear(), 4).append('-');
        padded(b, t.getMonthValue(), 2);
        if (unit != DatasetSpec.TimeUnit.MONTH) {
            padded(b.append('-'), t.getDayOfMonth(), 2);
        }
        if (unit == DatasetSpec.TimeUnit.HOUR) {
            padded(b.append('T'), t.getHour(), 2);
        }
        return b.toString();
    }

    /** Appends {@code v} zero-padded to {@code width} characters, sign included (as {@code %0<width>d} does). */
    private static StringBuilder padded(StringBuilder b, int v, int width) {
        String digits = Integer.toString(Math.abs(v));
        if (v < 0) {
            b.append('-');
            width--;
        }
        for (int i = digits.length(); i < width; i++) {
            b.append('0');
        }
        return b.append(digits);
    }
}
