package dev.onefold.avro;

import dev.onefold.avro.internal.JsonValues;
import dev.onefold.internal.json.Json;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.nio.ByteBuffer;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Base64;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The generic JSON lines writer as it was before the direct writer, kept as the test oracle: rows become plain
 * maps and lists ({@link JsonValues}' plain form), written through core's {@code Json.write}. (The generic
 * reader stays in main code, as the fallback of {@link JsonLines#parseRow}.)
 */
final class GenericJsonLines {
    private GenericJsonLines() {}

    /** The line the generic path writes for a row. */
    static String write(Row row) {
        return Json.write(fromRow(row));
    }

    private static Map<String, Object> fromRow(Row row) {
        RowSchema schema = row.schema();
        Map<String, Object> out = new LinkedHashMap<>();
        for (int i = 0; i < schema.size(); i++) {
            out.put(schema.field(i).name(), plain(schema.field(i).type(), row.get(i)));
        }
        return out;
    }

    private static Object plain(FieldType type, Object v) {
        if (v == null) {
            return null;
        }
        return switch (type.kind()) {
            case BOOLEAN, INT, LONG, STRING, DECIMAL -> v;
            case FLOAT, DOUBLE -> {
                double d = ((Number) v).doubleValue();
                yield Double.isFinite(d) && !(d == 0 && 1 / d < 0) ? v : v.toString();
            }
            case BYTES -> {
                ByteBuffer b = ((ByteBuffer) v).duplicate();
                byte[] a = new byte[b.remaining()];
                b.get(a);
                yield Base64.getEncoder().encodeToString(a);
            }
            case TIMESTAMP_MILLIS -> Instant.ofEpochMilli((Long) v).toString();
            case TIMESTAMP_MICROS -> {
                long micros = (Long) v;
                yield Instant.ofEpochSecond(Math.floorDiv(micros, 1_000_000L), Math.floorMod(micros, 1_000_000L) * 1000L).toString();
            }
            case DATE -> LocalDate.ofEpochDay((Integer) v).toString();
            case UUID -> v.toString();
            case LIST -> {
                List<Object> out = new ArrayList<>();
                for (Object o : (List<?>) v) {
                    out.add(plain(type.element(), o));
                }
                yield out;
            }
            case MAP -> {
                Map<String, Object> out = new LinkedHashMap<>();
                for (Map.Entry<?, ?> e : ((Map<?, ?>) v).entrySet()) {
                    out.put((String) e.getKey(), plain(type.element(), e.getValue()));
                }
                yield out;
            }
            case RECORD -> fromRow((Row) v);
        };
    }
}
