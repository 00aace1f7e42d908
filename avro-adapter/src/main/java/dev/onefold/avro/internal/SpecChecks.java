package dev.onefold.avro.internal;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.json.Json;
import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Set;
import org.apache.avro.Schema;

/**
 * Avro-level checks of a {@link DatasetSpec} against a record schema, run before core's own binding so the
 * messages name the Avro field path and the Avro type as the user wrote it (for example the union
 * {@code ["null","long"]} where core would only say "long?"), and the comparison of two specs entry by entry.
 * Stateless and thread-safe; cost is linear in the spec's size times the path depth.
 */
public final class SpecChecks {
    private SpecChecks() {}

    /** Problems found, each naming the role, the Avro field path and the reason; empty when none. */
    public static List<String> problems(DatasetSpec spec, Schema schema) {
        List<String> problems = new ArrayList<>();
        for (String k : spec.key()) {
            Schema s = find(schema, k, "key", problems);
            if (s != null && isNullableUnion(s) && !spec.allowNullKey()) {
                problems.add("key field '" + k + "' is the Avro union " + AvroErrors.describe(s)
                        + "; a key must not be nullable unless the spec sets \"allow_null_key\": true");
            }
            orderable(s, "key", k, problems);
        }
        for (DatasetSpec.OrderField o : spec.order()) {
            orderable(find(schema, o.path(), "order", problems), "order", o.path(), problems);
        }
        DatasetSpec.MergeRule m = spec.merge();
        String version = m instanceof DatasetSpec.LastWriter lw ? lw.version()
                : m instanceof DatasetSpec.FieldWise fw ? fw.version() : null;
        if (version != null) {
            Schema s = find(schema, version, "merge.version", problems);
            Schema base = s == null ? null : nonNull(s);
            if (s != null && (isNullableUnion(s) || base.getLogicalType() != null
                    || (base.getType() != Schema.Type.INT && base.getType() != Schema.Type.LONG))) {
                problems.add("version field '" + version + "' is the Avro type " + AvroErrors.describe(s)
                        + "; a version must be a non-null \"int\" or \"long\" without a logical type");
            }
        }
        if (m instanceof DatasetSpec.VectorClock vc) {
            Schema s = find(schema, vc.clock(), "merge.clock", problems);
            if (s != null && (s.getType() != Schema.Type.MAP || nonNull(s.getValueType()).getType() != Schema.Type.LONG
                    || isNullableUnion(s.getValueType()))) {
                problems.add("clock field '" + vc.clock() + "' is the Avro type " + AvroErrors.describe(s)
                        + "; a vector clock must be {\"type\": \"map\", \"values\": \"long\"}");
            }
        }
        if (spec.tombstone() != null) {
            Schema s = find(schema, spec.tombstone(), "tombstone", problems);
            if (s != null && nonNull(s).getType() != Schema.Type.BOOLEAN) {
                problems.add("tombstone field '" + spec.tombstone() + "' is the Avro type " + AvroErrors.describe(s)
                        + "; a tombstone must be \"boolean\" or [\"null\", \"boolean\"]");
            }
        }
        return problems;
    }

    private static void orderable(Schema s, String role, String path, List<String> problems) {
        if (s == null) {
            return;
        }
        Schema.Type t = nonNull(s).getType();
        if (t == Schema.Type.ARRAY || t == Schema.Type.MAP || t == Schema.Type.RECORD) {
            problems.add(role + " field '" + path + "' is the Avro " + t.getName() + " " + AvroErrors.describe(s)
                    + ", which has no order; use a primitive or logical type");
        }
    }

    /**
     * The Avro schema at a dotted path (through nullable unions of records), or null after adding a problem.
     * A path that passes through a nullable record comes back as a nullable union, since its value can be null.
     */
    static Schema find(Schema root, String path, String role, List<String> problems) {
        Schema current = root;
        boolean nullableOnTheWay = false;
        String[] steps = path.split("\\.", -1);
        for (int i = 0; i < steps.length; i++) {
            Schema record = nonNull(current);
            String prefix = String.join(".", java.util.Arrays.copyOf(steps, i));
            if (record.getType() != Schema.Type.RECORD) {
                problems.add(role + ": field path '" + path + "': '" + prefix + "' is the Avro type " + AvroErrors.describe(current)
                        + ", not a record, so it has no field '" + steps[i] + "'");
                return null;
            }
            Schema.Field f = record.getField(steps[i]);
            if (f == null) {
                List<String> names = record.getFields().stream().map(Schema.Field::name).toList();
                problems.add(role + ": field path '" + path + "': Avro record " + record.getFullName() + " has no field '"
                        + steps[i] + "' (it has " + names + ")");
                return null;
            }
            nullableOnTheWay |= isNullableUnion(current);
            current = f.schema();
        }
        return nullableOnTheWay && !isNullableUnion(current)
                ? Schema.createUnion(Schema.create(Schema.Type.NULL), nonNull(current)) : current;
    }

    static boolean isNullableUnion(Schema s) {
        return s.getType() == Schema.Type.UNION && s.getTypes().stream().anyMatch(b -> b.getType() == Schema.Type.NULL);
    }

    /** The single non-null branch of a union, or the schema itself. */
    public static Schema nonNull(Schema s) {
        if (s.getType() != Schema.Type.UNION) {
            return s;
        }
        for (Schema b : s.getTypes()) {
            if (b.getType() != Schema.Type.NULL) {
                return b;
            }
        }
        return s;
    }

    /**
     * The entries on which two specs differ, each as "entry: NAME_A says X, NAME_B says Y" (objects such as
     * merge and partition are compared one level deeper); empty when the specs are equal.
     */
    public static List<String> differences(DatasetSpec a, String nameA, DatasetSpec b, String nameB) {
        List<String> out = new ArrayList<>();
        diff((Map<?, ?>) Json.parse(a.toJson(), nameA), nameA, (Map<?, ?>) Json.parse(b.toJson(), nameB), nameB, "", out);
        return out;
    }

    private static void diff(Map<?, ?> a, String nameA, Map<?, ?> b, String nameB, String prefix, List<String> out) {
        Set<Object> keys = new LinkedHashSet<>(a.keySet());
        keys.addAll(b.keySet());
        for (Object k : keys) {
            Object va = a.get(k);
            Object vb = b.get(k);
            if (Objects.equals(va, vb)) {
                continue;
            }
            String entry = prefix + k;
            if (prefix.isEmpty() && va instanceof Map<?, ?> ma && vb instanceof Map<?, ?> mb) {
                diff(ma, nameA, mb, nameB, entry + ".", out);
            } else {
                out.add(entry + ": " + nameA + (va == null ? " has none" : " says " + Json.write(va)) + ", " + nameB
                        + (vb == null ? " has none" : " says " + Json.write(vb)));
            }
        }
    }
}
