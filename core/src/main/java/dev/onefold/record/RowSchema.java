package dev.onefold.record;

import dev.onefold.OnefoldException;
import java.util.ArrayList;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;

/**
 * The shape of a {@link Row}: a name and an ordered list of named, typed fields. Field names are unique.
 * Nested records are fields of kind RECORD, so a schema is a tree; {@link #resolve(String)} turns a dotted
 * path such as {@code shipment.origin.port} into positions once, so reading it per record costs no lookups.
 *
 * <p>Immutable and thread-safe. Equality is structural.
 */
public final class RowSchema {

    /** One named, typed field. */
    public record Field(String name, FieldType type) {
        public Field {
            Objects.requireNonNull(name, "name");
            Objects.requireNonNull(type, "type");
            if (name.isEmpty() || name.contains(".")) {
                throw new IllegalArgumentException("field name must be non-empty and contain no '.': '" + name + "'");
            }
        }
    }

    private final String name;
    private final List<Field> fields;
    private final Map<String, Integer> positions;

    private RowSchema(String name, List<Field> fields) {
        this.name = Objects.requireNonNull(name, "name");
        this.fields = List.copyOf(fields);
        Map<String, Integer> pos = new HashMap<>();
        for (int i = 0; i < this.fields.size(); i++) {
            if (pos.put(this.fields.get(i).name(), i) != null) {
                throw new IllegalArgumentException("schema " + name + " declares field '" + this.fields.get(i).name()
                        + "' twice");
            }
        }
        this.positions = Collections.unmodifiableMap(pos);
    }

    public static RowSchema of(String name, List<Field> fields) {
        return new RowSchema(name, fields);
    }

    public static Builder builder(String name) {
        return new Builder(name);
    }

    public String name() { return name; }
    public List<Field> fields() { return fields; }
    public int size() { return fields.size(); }

    /** Position of a top-level field, or -1. */
    public int indexOf(String fieldName) {
        Integer p = positions.get(fieldName);
        return p == null ? -1 : p;
    }

    public Field field(int position) { return fields.get(position); }

    /**
     * Resolves a dotted path through nested records.
     *
     * @throws OnefoldException (INVALID_SPEC) naming the path and the first step that does not exist
     */
    public FieldPath resolve(String path) {
        Objects.requireNonNull(path, "path");
        String[] steps = path.split("\\.", -1);
        int[] idx = new int[steps.length];
        RowSchema current = this;
        FieldType type = null;
        boolean nullableOnTheWay = false;
        for (int i = 0; i < steps.length; i++) {
            if (current == null) {
                throw OnefoldException.spec("field path '" + path + "': '" + String.join(".", java.util.Arrays.copyOf(steps, i))
                        + "' is " + type + ", not a record, so it has no field '" + steps[i] + "'");
            }
            int p = current.indexOf(steps[i]);
            if (p < 0) {
                throw OnefoldException.spec("field path '" + path + "': record " + current.name() + " has no field '"
                        + steps[i] + "' (it has " + current.fieldNames() + ")");
            }
            idx[i] = p;
            type = current.field(p).type();
            if (i < steps.length - 1) {
                nullableOnTheWay |= type.isNullable();
            }
            current = type.kind() == FieldType.Kind.RECORD ? type.recordSchema() : null;
        }
        return new FieldPath(path, idx, nullableOnTheWay ? type.nullable() : type);
    }

    /** Whether the path exists. */
    public boolean has(String path) {
        try {
            resolve(path);
            return true;
        } catch (OnefoldException e) {
            return false;
        }
    }

    public List<String> fieldNames() {
        List<String> out = new ArrayList<>(fields.size());
        for (Field f : fields) {
            out.add(f.name());
        }
        return out;
    }

    @Override
    public boolean equals(Object o) {
        return o == this || o instanceof RowSchema s && s.name.equals(name) && s.fields.equals(fields);
    }

    @Override
    public int hashCode() {
        return name.hashCode() * 31 + fields.hashCode();
    }

    @Override
    public String toString() {
        return "record " + name + fields;
    }

    /** Collects fields in order. Not thread-safe. */
    public static final class Builder {
        private final String name;
        private final List<Field> fields = new ArrayList<>();

        private Builder(String name) {
            this.name = name;
        }

        public Builder field(String fieldName, FieldType type) {
            fields.add(new Field(fieldName, type));
            return this;
        }

        public RowSchema build() {
            return new RowSchema(name, fields);
        }
    }
}
