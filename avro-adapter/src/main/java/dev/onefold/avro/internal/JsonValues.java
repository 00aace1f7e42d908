package dev.onefold.avro.internal;

import dev.onefold.OnefoldException;
import java.math.BigDecimal;
import java.math.RoundingMode;
import java.nio.ByteBuffer;
import java.time.DateTimeException;
import java.time.Instant;
import java.time.LocalDate;
import java.util.Base64;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.UUID;
import org.apache.avro.Conversions;
import org.apache.avro.LogicalType;
import org.apache.avro.LogicalTypes;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;

/**
 * Plain JSON values to Avro generic values, guided by the Avro schema, so enums, fixed sizes, defaults and
 * Avro's tagged unions are understood: the generic path of JSON lines, which gives every line's result or its
 * precise error ({@link JsonRowReader} reads the common lines faster to the same rows, and {@link JsonRowWriter}
 * writes rows back in this form).
 *
 * <h2>Plain JSON form</h2>
 * <pre>
 *  null             absent value of a nullable field (a missing field takes its default, else null if nullable)
 *  int, long        JSON integer
 *  float, double    JSON number; "NaN", "Infinity", "-Infinity" and "-0.0" as strings (JSON has no such numbers)
 *  timestamp-*      ISO-8601 instant text "2024-02-29T13:00:00Z" (a JSON integer of the unit is accepted)
 *  date             ISO-8601 date text "2024-02-29" (a JSON integer of days is accepted)
 *  decimal          JSON number (or number text), exactly at the declared scale
 *  uuid, string     JSON string; enum: its symbol
 *  bytes, fixed     base64 text (RFC 4648)
 *  array, map, record   JSON array, object, object
 *  union            the value itself, or Avro's tagged form {"long": 5}, {"ns.Rec": {...}}
 * </pre>
 * Stateless and thread-safe; linear in the value's size.
 */
public final class JsonValues {
    private static final Conversions.DecimalConversion DECIMALS = new Conversions.DecimalConversion();
    /** Digits beyond a decimal type's precision or scale that no real value has; such values are refused before rescaling. */
    static final int ABSURD_DIGITS = 100;

    private JsonValues() {}

    /**
     * Converts a parsed JSON value to the Avro generic value of {@code schema}.
     *
     * @throws OnefoldException (INVALID_RECORD) naming the field path and the reason
     */
    public static Object toAvro(Schema schema, Object json, String path) {
        switch (schema.getType()) {
            case UNION:
                return union(schema, json, path);
            case NULL:
                if (json != null) {
                    throw wrong(path, "null", json);
                }
                return null;
            case RECORD:
                return record(schema, json, path);
            default:
                if (json == null) {
                    throw OnefoldException.record(AvroErrors.at(path) + "is null but its Avro type " + AvroErrors.describe(schema)
                            + " is not nullable");
                }
                return present(schema, json, path);
        }
    }

    private static Object union(Schema schema, Object json, String path) {
        if (json == null) {
            for (Schema b : schema.getTypes()) {
                if (b.getType() == Schema.Type.NULL) {
                    return null;
                }
            }
        }
        Schema branch = SpecChecks.nonNull(schema);
        if (json instanceof Map<?, ?> m && m.size() == 1 && m.containsKey(tag(branch))) {
            return toAvro(branch, m.get(tag(branch)), path);
        }
        return toAvro(branch, json, path);
    }

    /** The name Avro's JSON encoding uses for a union branch. */
    private static String tag(Schema branch) {
        return switch (branch.getType()) {
            case RECORD, ENUM, FIXED -> branch.getFullName();
            default -> branch.getType().getName();
        };
    }

    private static Object record(Schema schema, Object json, String path) {
        if (!(json instanceof Map<?, ?> m)) {
            throw wrong(path, "a JSON object for record " + schema.getFullName(), json);
        }
        for (Object k : m.keySet()) {
            if (schema.getField((String) k) == null) {
                throw OnefoldException.record(AvroErrors.at(path) + "record " + schema.getFullName() + " has no field '" + k
                        + "' (it has " + schema.getFields().stream().map(Schema.Field::name).toList() + ")");
            }
        }
        GenericData.Record out = new GenericData.Record(schema);
        for (Schema.Field f : schema.getFields()) {
            String p = path.isEmpty() ? f.name() : path + "." + f.name();
            if (m.containsKey(f.name())) {
                out.put(f.pos(), toAvro(f.schema(), m.get(f.name()), p));
            } else if (f.hasDefaultValue()) {
                out.put(f.pos(), GenericData.get().deepCopy(f.schema(), GenericData.get().getDefaultValue(f)));
            } else if (SpecChecks.isNullableUnion(f.schema())) {
                out.put(f.pos(), null);
            } else {
                throw OnefoldException.record(AvroErrors.at(p) + "is missing and has no default");
            }
        }
        return out;
    }

    private static Object present(Schema s, Object json, String path) {
        LogicalType lt = s.getLogicalType();
        String logical = lt == null ? "" : lt.getName();
        switch (s.getType()) {
            case BOOLEAN:
                if (json instanceof Boolean) {
                    return json;
                }
                throw wrong(path, "true or false", json);
            case INT:
                if ("date".equals(logical) && json instanceof String text) {
                    try {
                        return Math.toIntExact(LocalDate.parse(text).toEpochDay());
                    } catch (DateTimeException | ArithmeticException e) {
                        throw wrong(path, "an ISO-8601 date like 2024-02-29", json);
                    }
                }
                if (json instanceof Long l && l == l.intValue()) {
                    return l.intValue();
                }
                throw wrong(path, "an integer within the range of int", json);
            case LONG:
                if (logical.startsWith("timestamp-") && json instanceof String text) {
                    return timestamp(text, logical.endsWith("micros"), path);
                }
                if (json instanceof Long) {
                    return json;
                }
                throw wrong(path, "an integer within the range of long", json);
            case FLOAT:
                return (float) floating(json, path);
            case DOUBLE:
                return floating(json, path);
            case STRING:
                if (!(json instanceof String text)) {
                    throw wrong(path, "a string", json);
                }
                if ("uuid".equals(logical)) {
                    return uuid(text, path).toString();
                }
                return text;
            case ENUM:
                if (json instanceof String text && s.hasEnumSymbol(text)) {
                    return new GenericData.EnumSymbol(s, text);
                }
                throw wrong(path, "one of the symbols " + s.getEnumSymbols(), json);
            case BYTES:
                if (lt instanceof LogicalTypes.Decimal d) {
                    return DECIMALS.toBytes(decimal(json, d, path), s, d);
                }
                return ByteBuffer.wrap(base64(json, path));
            case FIXED:
                if (lt instanceof LogicalTypes.Decimal d) {
                    try {
                        return DECIMALS.toFixed(decimal(json, d, path), s, d);
                    } catch (org.apache.avro.AvroTypeException e) {
                        throw OnefoldException.record(AvroErrors.at(path) + e.getMessage());
                    }
                }
                if ("uuid".equals(logical) && s.getFixedSize() == 16 && json instanceof String text) {
                    UUID u = uuid(text, path);
                    return new GenericData.Fixed(s, ByteBuffer.allocate(16).putLong(u.getMostSignificantBits())
                            .putLong(u.getLeastSignificantBits()).array());
                }
                byte[] b = base64(json, path);
                if (b.length != s.getFixedSize()) {
                    throw OnefoldException.record(AvroErrors.at(path) + "has " + b.length + " bytes but fixed " + s.getFullName()
                            + " has size " + s.getFixedSize());
                }
                return new GenericData.Fixed(s, b);
            case ARRAY: {
                if (!(json instanceof List<?> list)) {
                    throw wrong(path, "a JSON array", json);
                }
                GenericData.Array<Object> out = new GenericData.Array<>(list.size(), s);
                for (int i = 0; i < list.size(); i++) {
                    out.add(toAvro(s.getElementType(), list.get(i), path + "[" + i + "]"));
                }
                return out;
            }
            case MAP: {
                if (!(json instanceof Map<?, ?> m)) {
                    throw wrong(path, "a JSON object", json);
                }
                Map<String, Object> out = new LinkedHashMap<>();
                for (Map.Entry<?, ?> e : m.entrySet()) {
                    out.put((String) e.getKey(), toAvro(s.getValueType(), e.getValue(), path + "[" + e.getKey() + "]"));
                }
                return out;
            }
            default:
                throw new AssertionError(s.getType());
        }
    }

    private static long timestamp(String text, boolean micros, String path) {
        Instant t;
        try {
            t = Instant.parse(text);
        } catch (DateTimeException e) {
            throw wrong(path, "an ISO-8601 instant like 2024-02-29T13:00:00Z", text);
        }
        int unitNanos = micros ? 1000 : 1_000_000;
        if (t.getNano() % unitNanos != 0) {
            throw OnefoldException.record(AvroErrors.at(path) + "'" + text + "' is finer than "
                    + (micros ? "microseconds" : "milliseconds"));
        }
        try {
            return EpochUnits.of(t, 1_000_000_000L / unitNanos);
        } catch (ArithmeticException e) {
            throw OnefoldException.record(AvroErrors.at(path) + "'" + text + "' is out of range");
        }
    }

    private static double floating(Object json, String path) {
        if (json instanceof Long l) {
            return l;
        }
        if (json instanceof BigDecimal d) {
            return Double.parseDouble(d.toString());
        }
        if (json instanceof String text) {
            switch (text) {
                case "NaN": return Double.NaN;
                case "Infinity": return Double.POSITIVE_INFINITY;
                case "-Infinity": return Double.NEGATIVE_INFINITY;
                case "-0.0": return -0.0;
                default: break;
            }
        }
        throw wrong(path, "a number (or \"NaN\", \"Infinity\", \"-Infinity\", \"-0.0\")", json);
    }

    private static BigDecimal decimal(Object json, LogicalTypes.Decimal d, String path) {
        BigDecimal v;
        if (json instanceof Long l) {
            v = BigDecimal.valueOf(l);
        } else if (json instanceof BigDecimal b) {
            v = b;
        } else if (json instanceof String text) {
            try {
                v = new BigDecimal(text);
            } catch (NumberFormatException e) {
                throw wrong(path, "a decimal number", json);
            }
        } else {
            throw wrong(path, "a decimal number", json);
        }
        // rescaling a value far beyond the type (1e999999999) would take minutes: refuse it first, as rescaling would
        if (v.signum() != 0 && v.precision() - v.scale() > d.getPrecision() + ABSURD_DIGITS) {
            throw OnefoldException.record(AvroErrors.at(path) + AvroErrors.abbreviate(v) + " exceeds precision " + d.getPrecision());
        }
        if (v.scale() - d.getScale() > ABSURD_DIGITS && v.stripTrailingZeros().scale() > d.getScale()) {
            throw OnefoldException.record(AvroErrors.at(path) + AvroErrors.abbreviate(v) + " does not fit scale " + d.getScale());
        }
        try {
            v = v.setScale(d.getScale(), RoundingMode.UNNECESSARY);
        } catch (ArithmeticException e) {
            throw OnefoldException.record(AvroErrors.at(path) + v + " does not fit scale " + d.getScale());
        }
        if (v.precision() > d.getPrecision()) {
            throw OnefoldException.record(AvroErrors.at(path) + v + " exceeds precision " + d.getPrecision());
        }
        return v;
    }

    private static UUID uuid(String text, String path) {
        try {
            UUID u = UUID.fromString(text);
            if (u.toString().equalsIgnoreCase(text)) {
                return u;
            }
        } catch (IllegalArgumentException e) {
            // falls through to the message naming the field
        }
        throw wrong(path, "a UUID in its 36-character text form", text);
    }

    private static byte[] base64(Object json, String path) {
        if (json instanceof String text) {
            try {
                return Base64.getDecoder().decode(text);
            } catch (IllegalArgumentException e) {
                throw wrong(path, "base64 text", json);
            }
        }
        throw wrong(path, "base64 text", json);
    }

    private static OnefoldException wrong(String path, String expected, Object json) {
        String got = json == null ? "null" : json instanceof String s ? "\"" + AvroErrors.abbreviate(s) + "\""
                : json instanceof Map ? "an object" : json instanceof List ? "an array" : AvroErrors.abbreviate(json);
        return OnefoldException.record(AvroErrors.at(path) + "expects " + expected + ", got " + got);
    }
}
