package dev.onefold.record;

import dev.onefold.OnefoldException;
import java.math.BigDecimal;
import java.math.RoundingMode;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.TreeMap;
import java.util.UUID;

/**
 * onefold's own generic record: a {@link RowSchema} and one value per field, checked against the field's
 * type when built (see {@link FieldType} for the Java value of each kind). It is the neutral form every record
 * type is read into by a {@link dev.onefold.spi.RecordAccess}, and the form merge state, chunks and digests
 * are defined on.
 *
 * <p>Immutable and thread-safe. Equality is by schema and values. Building costs one pass over the values,
 * plus one over its variable-size values (strings, bytes, map keys) for {@link #estimatedHeapBytes()}.
 */
public final class Row {
    private final RowSchema schema;
    private final Object[] values;
    /** With compressed references (the default below 32 GiB of heap) it fits in the object's padding. */
    private final int heapBytes;

    private Row(RowSchema schema, Object[] values) {
        this.schema = schema;
        this.values = values;
        this.heapBytes = (int) Math.min(Integer.MAX_VALUE, RowSizes.estimate(schema, values));
    }

    public static Builder builder(RowSchema schema) {
        return new Builder(schema);
    }

    /**
     * A row from values in field order, each checked and normalised.
     *
     * @throws OnefoldException (INVALID_RECORD) naming the field and the reason
     */
    public static Row of(RowSchema schema, Object... values) {
        if (values.length != schema.size()) {
            throw OnefoldException.record("record " + schema.name() + " has " + schema.size() + " fields, got "
                    + values.length + " values");
        }
        Object[] copy = new Object[values.length];
        for (int i = 0; i < values.length; i++) {
            RowSchema.Field f = schema.field(i);
            copy[i] = normalize(f.type(), values[i], f.name());
        }
        return new Row(schema, copy);
    }

    public RowSchema schema() { return schema; }

    /**
     * An estimate of the heap this row holds (headers, references, boxed values, string bytes), within about a
     * factor of two; computed when the row was built, so reading it is free. Memory budgets count it.
     */
    public long estimatedHeapBytes() {
        return heapBytes;
    }

    public Object get(int position) {
        return values[position];
    }

    /** Value of a top-level field by name. */
    public Object get(String field) {
        int p = schema.indexOf(field);
        if (p < 0) {
            throw OnefoldException.usage("record " + schema.name() + " has no field '" + field + "'");
        }
        return values[p];
    }

    /** A copy with one top-level field replaced. */
    public Row with(String field, Object value) {
        int p = schema.indexOf(field);
        if (p < 0) {
            throw OnefoldException.usage("record " + schema.name() + " has no field '" + field + "'");
        }
        Object[] copy = values.clone();
        copy[p] = normalize(schema.field(p).type(), value, field);
        return new Row(schema, copy);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof Row r && r.schema.equals(schema) && Arrays.equals(r.values, values);
    }

    @Override
    public int hashCode() {
        return Arrays.hashCode(values);
    }

    @Override
    public String toString() {
        StringBuilder sb = new StringBuilder("{");
        for (int i = 0; i < values.length; i++) {
            if (i > 0) {
                sb.append(", ");
            }
            sb.append(schema.field(i).name()).append('=');
            Object v = values[i];
            sb.append(v instanceof ByteBuffer b ? "bytes[" + b.remaining() + "]" : String.valueOf(v));
        }
        return sb.append('}').toString();
    }

    /**
     * Checks a Java value against a type and returns its normal form (for example int widened to long for LONG,
     * maps sorted by key, byte arrays wrapped read-only).
     *
     * @throws OnefoldException (INVALID_RECORD) naming {@code where} and the reason
     */
    public static Object normalize(FieldType type, Object value, String where) {
        if (value == null) {
            if (!type.isNullable()) {
                throw OnefoldException.record("field '" + where + "' is null but its type " + type + " is not nullable");
            }
            return null;
        }
        switch (type.kind()) {
            case BOOLEAN:
                if (value instanceof Boolean) {
                    return value;
                }
                break;
            case INT:
            case DATE:
                if (value instanceof Integer || value instanceof Short || value instanceof Byte) {
                    return ((Number) value).intValue();
                }
                if (value instanceof Long l && l == l.intValue()) {
                    return l.intValue();
                }
                break;
            case LONG:
            case TIMESTAMP_MILLIS:
            case TIMESTAMP_MICROS:
                if (value instanceof Long || value instanceof Integer || value instanceof Short || value instanceof Byte) {
                    return ((Number) value).longValue();
                }
                break;
            case FLOAT:
                if (value instanceof Float) {
                    return value;
                }
                break;
            case DOUBLE:
                if (value instanceof Double) {
                    return value;
                }
                if (value instanceof Float f) {
                    return f.doubleValue();
                }
                break;
            case STRING:
                if (value instanceof CharSequence s) {
                    return s.toString();
                }
                break;
            case BYTES:
                if (value instanceof byte[] b) {
                    return ByteBuffer.wrap(b.clone()).asReadOnlyBuffer();
                }
                if (value instanceof ByteBuffer b) {
                    ByteBuffer copy = ByteBuffer.allocate(b.remaining());
                    copy.put(b.duplicate()).flip();
                    return copy.asReadOnlyBuffer();
                }
                break;
            case UUID:
                if (value instanceof UUID) {
                    return value;
                }
                break;
            case DECIMAL:
                if (value instanceof BigDecimal d) {
                    BigDecimal scaled;
                    try {
                        scaled = d.setScale(type.scale(), RoundingMode.UNNECESSARY);
                    } catch (ArithmeticException e) {
                        throw OnefoldException.record("field '" + where + "': " + d + " does not fit scale " + type.scale());
                    }
                    if (scaled.precision() > type.precision()) {
                        throw OnefoldException.record("field '" + where + "': " + d + " exceeds precision " + type.precision());
                    }
                    return scaled;
                }
                break;
            case LIST:
                if (value instanceof List<?> list) {
                    List<Object> out = new ArrayList<>(list.size());
                    for (int i = 0; i < list.size(); i++) {
                        out.add(normalize(type.element(), list.get(i), where + "[" + i + "]"));
                    }
                    return Collections.unmodifiableList(out);
                }
                break;
            case MAP:
                if (value instanceof Map<?, ?> map) {
                    TreeMap<String, Object> out = new TreeMap<>();
                    for (Map.Entry<?, ?> e : map.entrySet()) {
                        if (!(e.getKey() instanceof CharSequence k)) {
                            throw OnefoldException.record("field '" + where + "': map key " + e.getKey() + " is not a string");
                        }
                        out.put(k.toString(), normalize(type.element(), e.getValue(), where + "[" + k + "]"));
                    }
                    return Collections.unmodifiableSortedMap(out);
                }
                break;
            case RECORD:
                if (value instanceof Row r) {
                    if (!r.schema().equals(type.recordSchema())) {
                        throw OnefoldException.record("field '" + where + "': record " + r.schema().name()
                                + " does not have the declared schema " + type.recordSchema().name());
                    }
                    return r;
                }
                break;
            default:
                throw new AssertionError(type.kind());
        }
        throw OnefoldException.record("field '" + where + "' expects " + type + " but got "
                + value.getClass().getSimpleName() + " " + abbreviate(value));
    }

    private static String abbreviate(Object value) {
        String s = String.valueOf(value);
        return s.length() > 60 ? s.substring(0, 57) + "..." : s;
    }

    /** Sets fields by name; unset nullable fields are null. Not thread-safe. */
    public static final class Builder {
        private final RowSchema schema;
        private final Object[] values;
        private final boolean[] set;

        private Builder(RowSchema schema) {
            this.schema = Objects.requireNonNull(schema, "schema");
            this.values = new Object[schema.size()];
            this.set = new boolean[schema.size()];
        }

        public Builder set(String field, Object value) {
            int p = schema.indexOf(field);
            if (p < 0) {
                throw OnefoldException.record("record " + schema.name() + " has no field '" + field + "'");
            }
            return set(p, value);
        }

        public Builder set(int position, Object value) {
            values[position] = normalize(schema.field(position).type(), value, schema.field(position).name());
            set[position] = true;
            return this;
        }

        /** @throws OnefoldException (INVALID_RECORD) when a non-nullable field was never set */
        public Row build() {
            for (int i = 0; i < values.length; i++) {
                if (!set[i] && !schema.field(i).type().isNullable()) {
                    throw OnefoldException.record("record " + schema.name() + ": required field '"
                            + schema.field(i).name() + "' is missing");
                }
            }
            return new Row(schema, values.clone());
        }
    }
}
