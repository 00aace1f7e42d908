package dev.onefold.internal.encoding;

import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.math.BigInteger;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.UUID;

/**
 * The canonical binary form of a {@link Row} under its schema: one deterministic byte string per value, so
 * equal rows have equal bytes and the bytes can stand for the content (duplicate detection, tie-breaks,
 * digests). Not order-preserving; see {@link OrderedBytes} for that.
 *
 * <pre>
 *  nullable field   00 null | 01 then the value
 *  BOOLEAN          00 | 01
 *  INT, LONG, DATE, TIMESTAMP_*   zig-zag varint
 *  FLOAT, DOUBLE    IEEE bits big-endian (NaN canonical)
 *  STRING, BYTES    varint length, bytes (UTF-8 for strings)
 *  UUID             16 bytes
 *  DECIMAL          varint length, unscaled two's-complement big-endian (scale is the schema's)
 *  LIST             varint count, elements
 *  MAP              varint count, (key as STRING, value) in ascending key order
 *  RECORD           its fields in schema order
 * </pre>
 * Stateless and thread-safe; linear in the row's size.
 */
public final class RowCodec {
    private RowCodec() {}

    public static byte[] encode(Row row) {
        ByteWriter w = new ByteWriter(64);
        write(w, row);
        return w.toByteArray();
    }

    public static void write(ByteWriter out, Row row) {
        RowSchema schema = row.schema();
        for (int i = 0; i < schema.size(); i++) {
            writeValue(out, schema.field(i).type(), row.get(i));
        }
    }

    /** Canonical bytes of one value of a type. */
    public static byte[] encodeValue(FieldType type, Object value) {
        ByteWriter w = new ByteWriter(16);
        writeValue(w, type, value);
        return w.toByteArray();
    }

    public static void writeValue(ByteWriter out, FieldType type, Object value) {
        if (type.isNullable()) {
            if (value == null) {
                out.write(0);
                return;
            }
            out.write(1);
        }
        switch (type.kind()) {
            case BOOLEAN -> out.write((Boolean) value ? 1 : 0);
            case INT, DATE -> out.writeZigZag((Integer) value);
            case LONG, TIMESTAMP_MILLIS, TIMESTAMP_MICROS -> out.writeZigZag((Long) value);
            case FLOAT -> out.writeInt(Float.floatToIntBits((Float) value));
            case DOUBLE -> out.writeLong(Double.doubleToLongBits((Double) value));
            case STRING -> out.writeString((String) value);
            case BYTES -> {
                ByteBuffer b = ((ByteBuffer) value).duplicate();
                byte[] a = new byte[b.remaining()];
                b.get(a);
                out.writeBlob(a);
            }
            case UUID -> {
                UUID u = (UUID) value;
                out.writeLong(u.getMostSignificantBits());
                out.writeLong(u.getLeastSignificantBits());
            }
            case DECIMAL -> out.writeBlob(((BigDecimal) value).unscaledValue().toByteArray());
            case LIST -> {
                List<?> list = (List<?>) value;
                out.writeVarInt(list.size());
                for (Object o : list) {
                    writeValue(out, type.element(), o);
                }
            }
            case MAP -> {
                Map<?, ?> map = (Map<?, ?>) value;
                Map<?, ?> sorted = map instanceof java.util.SortedMap<?, ?> ? map : new TreeMap<>(map);
                out.writeVarInt(sorted.size());
                for (Map.Entry<?, ?> e : sorted.entrySet()) {
                    out.writeString((String) e.getKey());
                    writeValue(out, type.element(), e.getValue());
                }
            }
            case RECORD -> write(out, (Row) value);
            default -> throw new AssertionError(type.kind());
        }
    }

    public static Row decode(RowSchema schema, byte[] bytes, String source) {
        ByteReader in = new ByteReader(bytes, source);
        Row row = read(in, schema);
        if (in.hasMore()) {
            throw OnefoldException.corrupt(source + ": " + in.remaining() + " unexpected bytes after record " + schema.name());
        }
        return row;
    }

    public static Row read(ByteReader in, RowSchema schema) {
        Object[] values = new Object[schema.size()];
        for (int i = 0; i < values.length; i++) {
            values[i] = readValue(in, schema.field(i).type());
        }
        try {
            return Row.of(schema, values);
        } catch (OnefoldException e) {
            throw OnefoldException.corrupt(in.source() + ": stored record does not fit schema " + schema.name() + ": "
                    + e.getMessage());
        }
    }

    public static Object readValue(ByteReader in, FieldType type) {
        if (type.isNullable()) {
            int marker = in.read();
            if (marker == 0) {
                return null;
            }
            if (marker != 1) {
                throw OnefoldException.corrupt(in.source() + ": bad null marker " + marker + " at byte " + (in.position() - 1));
            }
        }
        switch (type.kind()) {
            case BOOLEAN: {
                int b = in.read();
                if (b > 1) {
                    throw OnefoldException.corrupt(in.source() + ": bad boolean " + b);
                }
                return b == 1;
            }
            case INT:
            case DATE:
                return (int) in.readZigZag();
            case LONG:
            case TIMESTAMP_MILLIS:
            case TIMESTAMP_MICROS:
                return in.readZigZag();
            case FLOAT:
                return Float.intBitsToFloat(in.readInt());
            case DOUBLE:
                return Double.longBitsToDouble(in.readLong());
            case STRING:
                return in.readString();
            case BYTES:
                return ByteBuffer.wrap(in.readBlob()).asReadOnlyBuffer();
            case UUID:
                return new UUID(in.readLong(), in.readLong());
            case DECIMAL:
                return new BigDecimal(new BigInteger(in.readBlob()), type.scale());
            case LIST: {
                int n = in.readVarInt();
                checkCount(in, n);
                List<Object> out = new ArrayList<>(Math.min(n, 1024));
                for (int i = 0; i < n; i++) {
                    out.add(readValue(in, type.element()));
                }
                return Collections.unmodifiableList(out);
            }
            case MAP: {
                int n = in.readVarInt();
                checkCount(in, n);
                TreeMap<String, Object> out = new TreeMap<>();
                for (int i = 0; i < n; i++) {
                    String k = in.readString();
                    out.put(k, readValue(in, type.element()));
                }
                return Collections.unmodifiableSortedMap(out);
            }
            case RECORD:
                return read(in, type.recordSchema());
            default:
                throw new AssertionError(type.kind());
        }
    }

    private static void checkCount(ByteReader in, int n) {
        if (n > in.remaining()) {
            throw OnefoldException.corrupt(in.source() + ": collection of " + n + " items cannot fit in the "
                    + in.remaining() + " bytes left");
        }
    }

    /** The canonical bytes of a string, used where a name must become bytes. */
    public static byte[] utf8(String s) {
        return s.getBytes(StandardCharsets.UTF_8);
    }
}
