package dev.onefold.avro.internal;

import dev.onefold.OnefoldException;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Collection;
import java.util.Deque;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.UUID;
import org.apache.avro.Conversions;
import org.apache.avro.LogicalType;
import org.apache.avro.LogicalTypes;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericEnumSymbol;
import org.apache.avro.generic.GenericFixed;
import org.apache.avro.generic.GenericRecord;

/**
 * The translation between one Avro record schema and onefold's {@link RowSchema}, built once per schema as a
 * tree of value mappers that hold their field positions and error paths, so converting a record costs one
 * pass over its values and no name lookups.
 *
 * <h2>Type mapping</h2>
 * <pre>
 *  Avro                                 onefold kind         Avro value accepted (generic, or converted)
 *  boolean                              BOOLEAN              Boolean
 *  int                                  INT                  Integer
 *  int date                             DATE                 Integer days | LocalDate
 *  long                                 LONG                 Long, Integer
 *  long timestamp-millis / -micros      TIMESTAMP_*          Long | Instant
 *  float, double                        FLOAT, DOUBLE        Float, Double
 *  string                               STRING               CharSequence (Utf8 or String)
 *  string uuid, fixed(16) uuid          UUID                 CharSequence | GenericFixed | UUID
 *  bytes, fixed                         BYTES                ByteBuffer | GenericFixed
 *  bytes/fixed decimal(p, s)            DECIMAL(p, s)        ByteBuffer | GenericFixed | BigDecimal
 *  enum                                 STRING (symbol)      GenericEnumSymbol
 *  array, map, record                   LIST, MAP, RECORD    Collection, Map, GenericRecord
 *  union [null, T] or [T, null]         nullable T
 *  union [T]                            T
 * </pre>
 * Other logical types (time-millis, local timestamps, duration) map to their underlying type. Unions of
 * several non-null branches, fields of type null and recursive records have no neutral form and are refused
 * with INVALID_SCHEMA naming the field path. Records built back ({@link #fromRow}) carry Avro's plain generic
 * representation (Long timestamps, ByteBuffer or GenericFixed decimals, String uuids, EnumSymbol enums),
 * which every Avro writer accepts.
 *
 * <p>Immutable and thread-safe.
 */
public final class SchemaMapping {
    private static final Conversions.DecimalConversion DECIMALS = new Conversions.DecimalConversion();

    private final Schema schema;
    private final RecordMapper root;

    private SchemaMapping(Schema schema, RecordMapper root) {
        this.schema = schema;
        this.root = root;
    }

    /**
     * Builds the mapping for a record schema.
     *
     * @throws OnefoldException (INVALID_SCHEMA) naming the field path of the first shape with no neutral form
     */
    public static SchemaMapping of(Schema schema) {
        if (schema.getType() != Schema.Type.RECORD) {
            throw AvroErrors.schema("schema " + AvroErrors.describe(schema) + " is not a record; a dataset needs a record schema");
        }
        return new SchemaMapping(schema, (RecordMapper) build(schema, "", new ArrayDeque<>()));
    }

    public Schema avroSchema() { return schema; }
    public RowSchema rowSchema() { return root.rowSchema; }

    /**
     * Reads a generic record into a row.
     *
     * @throws OnefoldException (INVALID_RECORD) naming the field path and the reason
     */
    public Row toRow(GenericRecord record) {
        if (record == null) {
            throw OnefoldException.record("record is null");
        }
        return (Row) root.toRow(record);
    }

    /**
     * Builds a generic record of the Avro schema from a row of {@link #rowSchema()}.
     *
     * @throws OnefoldException (INVALID_RECORD) when a value does not fit its Avro type (for example a fixed
     *     of the wrong size), naming the field path
     */
    public GenericRecord fromRow(Row row) {
        if (!row.schema().equals(root.rowSchema)) {
            throw OnefoldException.record("row of schema " + row.schema().name() + " does not have the shape of Avro record "
                    + schema.getFullName());
        }
        return (GenericRecord) root.toAvro(row);
    }

    private static Mapper build(Schema s, String path, Deque<String> recordsOnTheWay) {
        switch (s.getType()) {
            case UNION:
                return union(s, path, recordsOnTheWay);
            case NULL:
                throw AvroErrors.schema(AvroErrors.at(path) + "has type null, which carries no value");
            case RECORD:
                return record(s, path, recordsOnTheWay);
            case ARRAY: {
                Mapper element = build(s.getElementType(), path + "[]", recordsOnTheWay);
                return new ListMapper(s, path, element);
            }
            case MAP: {
                Mapper value = build(s.getValueType(), path + "{}", recordsOnTheWay);
                return new MapMapper(s, path, value);
            }
            case ENUM:
                return new EnumMapper(s, path);
            default:
                return primitive(s, path);
        }
    }

    private static Mapper union(Schema s, String path, Deque<String> recordsOnTheWay) {
        List<Schema> branches = s.getTypes();
        List<Schema> nonNull = new ArrayList<>(2);
        for (Schema b : branches) {
            if (b.getType() != Schema.Type.NULL) {
                nonNull.add(b);
            }
        }
        if (nonNull.size() != 1) {
            throw AvroErrors.schema(AvroErrors.at(path) + "is the union " + AvroErrors.describe(s) + " with " + nonNull.size()
                    + " non-null branches; onefold supports only [\"null\", T], [T, \"null\"] and [T] unions");
        }
        Mapper inner = build(nonNull.get(0), path, recordsOnTheWay);
        return branches.size() == 1 ? inner : inner.nullable();
    }

    private static Mapper record(Schema s, String path, Deque<String> recordsOnTheWay) {
        if (recordsOnTheWay.contains(s.getFullName())) {
            throw AvroErrors.schema(AvroErrors.at(path) + "refers back to record " + s.getFullName()
                    + "; recursive schemas have no neutral form");
        }
        recordsOnTheWay.push(s.getFullName());
        List<Schema.Field> fields = s.getFields();
        Mapper[] children = new Mapper[fields.size()];
        RowSchema.Builder b = RowSchema.builder(s.getFullName());
        for (int i = 0; i < children.length; i++) {
            Schema.Field f = fields.get(i);
            children[i] = build(f.schema(), path.isEmpty() ? f.name() : path + "." + f.name(), recordsOnTheWay);
            b.field(f.name(), children[i].type);
        }
        recordsOnTheWay.pop();
        return new RecordMapper(s, path, b.build(), children);
    }

    private static Mapper primitive(Schema s, String path) {
        LogicalType lt = s.getLogicalType();
        String logical = lt == null ? null : lt.getName();
        switch (s.getType()) {
            case BOOLEAN:
                return new Mapper(FieldType.bool(), path, s) {
                    @Override Object read(Object v) { return v instanceof Boolean ? v : mismatch(v); }
                    @Override Object write(Object v) { return v; }
                };
            case INT:
                return "date".equals(logical) ? new DateMapper(s, path) : new Mapper(FieldType.int32(), path, s) {
                    @Override Object read(Object v) { return v instanceof Integer ? v : mismatch(v); }
                    @Override Object write(Object v) { return v; }
                };
            case LONG:
                if ("timestamp-millis".equals(logical) || "timestamp-micros".equals(logical)) {
                    return new TimestampMapper(s, path, logical.endsWith("micros"));
                }
                return new Mapper(FieldType.int64(), path, s) {
                    @Override Object read(Object v) {
                        return v instanceof Long || v instanceof Integer ? ((Number) v).longValue() : mismatch(v);
                    }
                    @Override Object write(Object v) { return v; }
                };
            case FLOAT:
                return new Mapper(FieldType.float32(), path, s) {
                    @Override Object read(Object v) { return v instanceof Float ? v : mismatch(v); }
                    @Override Object write(Object v) { return v; }
                };
            case DOUBLE:
                return new Mapper(FieldType.float64(), path, s) {
                    @Override Object read(Object v) {
                        return v instanceof Double || v instanceof Float ? ((Number) v).doubleValue() : mismatch(v);
                    }
                    @Override Object write(Object v) { return v; }
                };
            case STRING:
                if ("uuid".equals(logical)) {
                    return new UuidMapper(s, path);
                }
                return new Mapper(FieldType.string(), path, s) {
                    @Override Object read(Object v) { return v instanceof CharSequence c ? c.toString() : mismatch(v); }
                    @Override Object write(Object v) { return v; }
                };
            case BYTES:
            case FIXED:
                if (lt instanceof LogicalTypes.Decimal d) {
                    return new DecimalMapper(s, path, d);
                }
                if ("uuid".equals(logical) && s.getType() == Schema.Type.FIXED && s.getFixedSize() == 16) {
                    return new UuidMapper(s, path);
                }
                return new BytesMapper(s, path);
            default:
                throw new AssertionError(s.getType());
        }
    }

    /** Converts one value between its Avro generic form and its row form; knows its path for messages. */
    abstract static class Mapper {
        final FieldType type;
        final String path;
        final Schema avro;

        Mapper(FieldType type, String path, Schema avro) {
            this.type = type;
            this.path = path;
            this.avro = avro;
        }

        /** Avro value (non-null) to row value. */
        abstract Object read(Object avroValue);

        /** Row value (non-null) to Avro value. */
        abstract Object write(Object rowValue);

        final Object toRow(Object avroValue) {
            if (avroValue == null) {
                if (type.isNullable()) {
                    return null;
                }
                throw OnefoldException.record(AvroErrors.at(path) + "is null but its Avro type " + AvroErrors.describe(avro)
                        + " is not nullable");
            }
            return read(avroValue);
        }

        final Object toAvro(Object rowValue) {
            return rowValue == null ? null : write(rowValue);
        }

        Object mismatch(Object v) {
            throw OnefoldException.record(AvroErrors.at(path) + "expects Avro " + AvroErrors.describe(avro) + " but got "
                    + v.getClass().getSimpleName() + " " + AvroErrors.abbreviate(v));
        }

        /** The bytes of a fixed value, checked against the fixed size. */
        byte[] fixedBytes(byte[] bytes) {
            if (bytes.length != avro.getFixedSize()) {
                throw OnefoldException.record(AvroErrors.at(path) + "value has " + bytes.length + " bytes but fixed "
                        + avro.getFullName() + " has size " + avro.getFixedSize());
            }
            return bytes;
        }

        Mapper nullable() {
            Mapper inner = this;
            return new Mapper(type.nullable(), path, avro) {
                @Override Object read(Object v) { return inner.read(v); }
                @Override Object write(Object v) { return inner.write(v); }
            };
        }
    }

    private static final class RecordMapper extends Mapper {
        final RowSchema rowSchema;
        final Mapper[] children;

        RecordMapper(Schema avro, String path, RowSchema rowSchema, Mapper[] children) {
            super(FieldType.record(rowSchema), path, avro);
            this.rowSchema = rowSchema;
            this.children = children;
        }

        @Override
        Object read(Object v) {
            if (!(v instanceof GenericRecord r)) {
                return mismatch(v);
            }
            Schema actual = r.getSchema();
            if (actual != avro && !actual.equals(avro)) {
                throw OnefoldException.record((path.isEmpty() ? "" : AvroErrors.at(path)) + "record has Avro schema "
                        + actual.getFullName() + " (fingerprint " + Fingerprints.hex(actual) + ") but the dataset expects "
                        + avro.getFullName() + " (fingerprint " + Fingerprints.hex(avro)
                        + "); records of another schema version must be decoded through the payload codec to be resolved");
            }
            Object[] values = new Object[children.length];
            for (int i = 0; i < children.length; i++) {
                values[i] = children[i].toRow(r.get(i));
            }
            return Row.of(rowSchema, values);
        }

        @Override
        Object write(Object v) {
            Row row = (Row) v;
            GenericData.Record out = new GenericData.Record(avro);
            for (int i = 0; i < children.length; i++) {
                out.put(i, children[i].toAvro(row.get(i)));
            }
            return out;
        }
    }

    private static final class ListMapper extends Mapper {
        private final Mapper element;

        ListMapper(Schema avro, String path, Mapper element) {
            super(FieldType.list(element.type), path, avro);
            this.element = element;
        }

        @Override
        Object read(Object v) {
            if (!(v instanceof Collection<?> c)) {
                return mismatch(v);
            }
            List<Object> out = new ArrayList<>(c.size());
            for (Object o : c) {
                out.add(element.toRow(o));
            }
            return out;
        }

        @Override
        Object write(Object v) {
            List<?> list = (List<?>) v;
            GenericData.Array<Object> out = new GenericData.Array<>(list.size(), avro);
            for (Object o : list) {
                out.add(element.toAvro(o));
            }
            return out;
        }
    }

    private static final class MapMapper extends Mapper {
        private final Mapper value;

        MapMapper(Schema avro, String path, Mapper value) {
            super(FieldType.map(value.type), path, avro);
            this.value = value;
        }

        @Override
        Object read(Object v) {
            if (!(v instanceof Map<?, ?> m)) {
                return mismatch(v);
            }
            Map<String, Object> out = new LinkedHashMap<>(m.size() * 2);
            for (Map.Entry<?, ?> e : m.entrySet()) {
                if (!(e.getKey() instanceof CharSequence k)) {
                    throw OnefoldException.record(AvroErrors.at(path) + "map key " + AvroErrors.abbreviate(e.getKey())
                            + " is not a string");
                }
                out.put(k.toString(), value.toRow(e.getValue()));
            }
            return out;
        }

        @Override
        Object write(Object v) {
            Map<?, ?> m = (Map<?, ?>) v;
            Map<String, Object> out = new LinkedHashMap<>(m.size() * 2);
            for (Map.Entry<?, ?> e : m.entrySet()) {
                out.put((String) e.getKey(), value.toAvro(e.getValue()));
            }
            return out;
        }
    }

    private static final class EnumMapper extends Mapper {
        private final Set<String> symbols;

        EnumMapper(Schema avro, String path) {
            super(FieldType.string(), path, avro);
            this.symbols = new HashSet<>(avro.getEnumSymbols());
        }

        @Override
        Object read(Object v) {
            if (!(v instanceof GenericEnumSymbol<?>)) {
                return mismatch(v);
            }
            return symbol(v.toString());
        }

        @Override
        Object write(Object v) {
            return new GenericData.EnumSymbol(avro, symbol((String) v));
        }

        private String symbol(String s) {
            if (!symbols.contains(s)) {
                throw OnefoldException.record(AvroErrors.at(path) + "'" + AvroErrors.abbreviate(s) + "' is not a symbol of enum "
                        + avro.getFullName() + " " + avro.getEnumSymbols());
            }
            return s;
        }
    }

    private static final class DateMapper extends Mapper {
        DateMapper(Schema avro, String path) {
            super(FieldType.date(), path, avro);
        }

        @Override
        Object read(Object v) {
            if (v instanceof Integer) {
                return v;
            }
            if (v instanceof LocalDate d) {
                long days = d.toEpochDay();
                if (days != (int) days) {
                    throw OnefoldException.record(AvroErrors.at(path) + "date " + d + " is out of the range of Avro date");
                }
                return (int) days;
            }
            return mismatch(v);
        }

        @Override
        Object write(Object v) {
            return v;
        }
    }

    private static final class TimestampMapper extends Mapper {
        private final boolean micros;

        TimestampMapper(Schema avro, String path, boolean micros) {
            super(micros ? FieldType.timestampMicros() : FieldType.timestampMillis(), path, avro);
            this.micros = micros;
        }

        @Override
        Object read(Object v) {
            if (v instanceof Long || v instanceof Integer) {
                return ((Number) v).longValue();
            }
            if (v instanceof Instant t) {
                try {
                    return EpochUnits.of(t, micros ? 1_000_000L : 1000L);
                } catch (ArithmeticException e) {
                    throw OnefoldException.record(AvroErrors.at(path) + "instant " + t + " is out of the range of "
                            + avro.getLogicalType().getName());
                }
            }
            return mismatch(v);
        }

        @Override
        Object write(Object v) {
            return v;
        }
    }

    private static final class UuidMapper extends Mapper {
        UuidMapper(Schema avro, String path) {
            super(FieldType.uuid(), path, avro);
        }

        @Override
        Object read(Object v) {
            if (v instanceof UUID) {
                return v;
            }
            if (v instanceof CharSequence c && avro.getType() == Schema.Type.STRING) {
                return parse(c.toString());
            }
            if (v instanceof GenericFixed f && avro.getType() == Schema.Type.FIXED) {
                ByteBuffer b = ByteBuffer.wrap(f.bytes());
                return new UUID(b.getLong(), b.getLong());
            }
            return mismatch(v);
        }

        private UUID parse(String s) {
            try {
                UUID u = UUID.fromString(s);
                if (u.toString().equalsIgnoreCase(s)) {
                    return u;
                }
            } catch (IllegalArgumentException e) {
                // falls through to the message below, which names the field
            }
            throw OnefoldException.record(AvroErrors.at(path) + "'" + AvroErrors.abbreviate(s)
                    + "' is not a UUID in its 36-character text form");
        }

        @Override
        Object write(Object v) {
            UUID u = (UUID) v;
            if (avro.getType() == Schema.Type.STRING) {
                return u.toString();
            }
            ByteBuffer b = ByteBuffer.allocate(16).putLong(u.getMostSignificantBits()).putLong(u.getLeastSignificantBits());
            return new GenericData.Fixed(avro, b.array());
        }
    }

    private static final class DecimalMapper extends Mapper {
        private final LogicalTypes.Decimal decimal;

        DecimalMapper(Schema avro, String path, LogicalTypes.Decimal decimal) {
            super(FieldType.decimal(decimal.getPrecision(), decimal.getScale()), path, avro);
            this.decimal = decimal;
        }

        @Override
        Object read(Object v) {
            if (v instanceof BigDecimal d) {
                return d;
            }
            if (v instanceof ByteBuffer b && avro.getType() == Schema.Type.BYTES) {
                return DECIMALS.fromBytes(b.duplicate(), avro, decimal);
            }
            if (v instanceof GenericFixed f && avro.getType() == Schema.Type.FIXED) {
                fixedBytes(f.bytes());
                return DECIMALS.fromFixed(f, avro, decimal);
            }
            return mismatch(v);
        }

        @Override
        Object write(Object v) {
            BigDecimal d = (BigDecimal) v;
            if (avro.getType() == Schema.Type.BYTES) {
                return DECIMALS.toBytes(d, avro, decimal);
            }
            try {
                return DECIMALS.toFixed(d, avro, decimal);
            } catch (org.apache.avro.AvroTypeException e) {
                throw OnefoldException.record(AvroErrors.at(path) + e.getMessage());
            }
        }
    }

    private static final class BytesMapper extends Mapper {
        BytesMapper(Schema avro, String path) {
            super(FieldType.bytes(), path, avro);
        }

        @Override
        Object read(Object v) {
            if (v instanceof ByteBuffer b && avro.getType() == Schema.Type.BYTES) {
                return b;
            }
            if (v instanceof GenericFixed f && avro.getType() == Schema.Type.FIXED) {
                return fixedBytes(f.bytes());
            }
            return mismatch(v);
        }

        @Override
        Object write(Object v) {
            ByteBuffer b = ((ByteBuffer) v).duplicate();
            byte[] copy = new byte[b.remaining()];
            b.get(copy);
            if (avro.getType() == Schema.Type.BYTES) {
                return ByteBuffer.wrap(copy);
            }
            return new GenericData.Fixed(avro, fixedBytes(copy));
        }
    }
}
