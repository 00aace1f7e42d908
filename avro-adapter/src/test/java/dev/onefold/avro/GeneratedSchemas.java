package dev.onefold.avro;

import java.math.BigDecimal;
import java.math.BigInteger;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.UUID;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/**
 * Random Avro record schemas within what the adapter supports (primitives, nullable unions, nested records,
 * arrays, maps, enums, fixed and the logical types timestamp-millis/-micros, date, uuid, decimal), and random
 * records for them with adversarial values (extremes of every range, NaN, -0.0, empty and non-ASCII strings).
 * Everything follows from one seed, so a failing seed reproduces.
 */
final class GeneratedSchemas {
    private final Random random;
    private int names;

    GeneratedSchemas(long seed) {
        this.random = new Random(seed);
    }

    /** A record schema whose first fields are {@code id: long} and {@code seq: long}, then 1-8 generated ones. */
    Schema keyedRecord() {
        List<Schema.Field> fields = new ArrayList<>();
        fields.add(new Schema.Field("id", Schema.create(Schema.Type.LONG)));
        fields.add(new Schema.Field("seq", Schema.create(Schema.Type.LONG)));
        int n = 1 + random.nextInt(8);
        for (int i = 0; i < n; i++) {
            fields.add(new Schema.Field("f" + i, type(2)));
        }
        return Schema.createRecord("Gen" + (names++), null, "gen", false, fields);
    }

    private Schema type(int depth) {
        int choice = random.nextInt(depth > 0 ? 20 : 16);
        Schema t = switch (choice) {
            case 0 -> Schema.create(Schema.Type.BOOLEAN);
            case 1 -> Schema.create(Schema.Type.INT);
            case 2 -> Schema.create(Schema.Type.LONG);
            case 3 -> Schema.create(Schema.Type.FLOAT);
            case 4 -> Schema.create(Schema.Type.DOUBLE);
            case 5 -> Schema.create(Schema.Type.STRING);
            case 6 -> Schema.create(Schema.Type.BYTES);
            case 7 -> logical("timestamp-millis", Schema.Type.LONG);
            case 8 -> logical("timestamp-micros", Schema.Type.LONG);
            case 9 -> logical("date", Schema.Type.INT);
            case 10 -> logical("uuid", Schema.Type.STRING);
            case 11 -> decimalBytes();
            case 12 -> decimalFixed();
            case 13 -> Schema.createEnum("E" + (names++), null, "gen", List.of("A", "B", "C_" + random.nextInt(9)));
            case 14 -> Schema.createFixed("F" + (names++), null, "gen", 1 + random.nextInt(6));
            case 15 -> Schema.create(Schema.Type.STRING);
            case 16 -> Schema.createArray(type(depth - 1));
            case 17 -> Schema.createMap(type(depth - 1));
            default -> {
                List<Schema.Field> fields = new ArrayList<>();
                int n = 1 + random.nextInt(3);
                for (int i = 0; i < n; i++) {
                    fields.add(new Schema.Field("g" + i, type(depth - 1)));
                }
                yield Schema.createRecord("R" + (names++), null, "gen", false, fields);
            }
        };
        if (random.nextInt(4) == 0) {
            return random.nextBoolean() ? Schema.createUnion(Schema.create(Schema.Type.NULL), t)
                    : Schema.createUnion(t, Schema.create(Schema.Type.NULL));
        }
        return t;
    }

    private static Schema logical(String name, Schema.Type base) {
        Schema s = Schema.create(base);
        s.addProp("logicalType", name);
        return new Schema.Parser().parse(s.toString());
    }

    private Schema decimalBytes() {
        int precision = 1 + random.nextInt(30);
        return new Schema.Parser().parse("{\"type\":\"bytes\",\"logicalType\":\"decimal\",\"precision\":" + precision
                + ",\"scale\":" + random.nextInt(precision + 1) + "}");
    }

    private Schema decimalFixed() {
        int precision = 1 + random.nextInt(30); // 16 bytes hold 38 digits
        return new Schema.Parser().parse("{\"type\":\"fixed\",\"name\":\"D" + (names++) + "\",\"namespace\":\"gen\",\"size\":16,"
                + "\"logicalType\":\"decimal\",\"precision\":" + precision + ",\"scale\":" + random.nextInt(precision + 1) + "}");
    }

    /** A record of {@code schema} with the given id and seq and random values elsewhere. */
    GenericRecord record(Schema schema, long id, long seq) {
        GenericRecord r = (GenericRecord) value(schema);
        r.put("id", id);
        r.put("seq", seq);
        return r;
    }

    Object value(Schema s) {
        switch (s.getType()) {
            case UNION: {
                Schema branch = s.getTypes().get(random.nextInt(s.getTypes().size()));
                return branch.getType() == Schema.Type.NULL ? null : value(branch);
            }
            case RECORD: {
                GenericRecord r = new GenericData.Record(s);
                for (Schema.Field f : s.getFields()) {
                    r.put(f.pos(), value(f.schema()));
                }
                return r;
            }
            case ARRAY: {
                int n = random.nextInt(4);
                GenericData.Array<Object> a = new GenericData.Array<>(n, s);
                for (int i = 0; i < n; i++) {
                    a.add(value(s.getElementType()));
                }
                return a;
            }
            case MAP: {
                int n = random.nextInt(4);
                Map<String, Object> m = new LinkedHashMap<>();
                for (int i = 0; i < n; i++) {
                    m.put(string(), value(s.getValueType()));
                }
                return m;
            }
            case ENUM:
                return new GenericData.EnumSymbol(s, s.getEnumSymbols().get(random.nextInt(s.getEnumSymbols().size())));
            case FIXED: {
                if (s.getLogicalType() != null) {
                    return new org.apache.avro.Conversions.DecimalConversion().toFixed(decimal(s), s, s.getLogicalType());
                }
                byte[] b = new byte[s.getFixedSize()];
                random.nextBytes(b);
                return new GenericData.Fixed(s, b);
            }
            case BYTES: {
                if (s.getLogicalType() != null) {
                    return new org.apache.avro.Conversions.DecimalConversion().toBytes(decimal(s), s, s.getLogicalType());
                }
                byte[] b = new byte[random.nextInt(5)];
                random.nextBytes(b);
                return ByteBuffer.wrap(b);
            }
            case STRING:
                return s.getLogicalType() != null ? new UUID(random.nextLong(), random.nextLong()).toString() : string();
            case BOOLEAN:
                return random.nextBoolean();
            case INT:
                return pick(new Integer[] {0, -1, Integer.MIN_VALUE, Integer.MAX_VALUE, random.nextInt(), random.nextInt(100)});
            case LONG:
                return pick(new Long[] {0L, -1L, Long.MIN_VALUE, Long.MAX_VALUE, random.nextLong(), (long) random.nextInt(100)});
            case FLOAT:
                return pick(new Float[] {0f, -0f, Float.NaN, Float.NEGATIVE_INFINITY, Float.MIN_VALUE, Float.MAX_VALUE,
                    random.nextFloat() * 1e6f - 5e5f});
            case DOUBLE:
                return pick(new Double[] {0d, -0d, Double.NaN, Double.POSITIVE_INFINITY, Double.MIN_VALUE, -Double.MAX_VALUE,
                    random.nextGaussian() * 1e12});
            default:
                throw new AssertionError(s);
        }
    }

    private BigDecimal decimal(Schema s) {
        org.apache.avro.LogicalTypes.Decimal d = (org.apache.avro.LogicalTypes.Decimal) s.getLogicalType();
        BigInteger limit = BigInteger.TEN.pow(d.getPrecision());
        BigInteger unscaled = new BigInteger(limit.bitLength() + 8, random).mod(limit);
        return new BigDecimal(random.nextBoolean() ? unscaled : unscaled.negate(), d.getScale());
    }

    private String string() {
        return switch (random.nextInt(5)) {
            case 0 -> "";
            case 1 -> "k" + random.nextInt(5);
            case 2 -> "\u00e9\u4e2d\ud83d\ude00\"\\\n\t\u0000";
            default -> {
                StringBuilder sb = new StringBuilder();
                int n = random.nextInt(8);
                for (int i = 0; i < n; i++) {
                    sb.appendCodePoint(random.nextBoolean() ? 'a' + random.nextInt(26) : 0x20 + random.nextInt(0xd000));
                }
                yield sb.toString();
            }
        };
    }

    private <T> T pick(T[] options) {
        return options[random.nextInt(options.length)];
    }
}
