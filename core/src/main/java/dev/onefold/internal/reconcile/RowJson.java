package dev.onefold.internal.reconcile;

import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Turns row values into what {@code internal.json.Json} writes: nested rows become objects in field order, bytes
 * lowercase hex, UUIDs their text; numbers, strings, booleans, lists and maps stay as they are. Stateless and
 * thread-safe; linear in the row's size.
 */
public final class RowJson {
    private RowJson() {}

    public static Map<String, Object> of(Row row) {
        RowSchema schema = row.schema();
        Map<String, Object> out = new LinkedHashMap<>();
        for (int i = 0; i < schema.size(); i++) {
            out.put(schema.field(i).name(), value(row.get(i)));
        }
        return out;
    }

    public static Object value(Object v) {
        if (v instanceof Row r) {
            return of(r);
        }
        if (v instanceof ByteBuffer b) {
            byte[] a = new byte[b.remaining()];
            b.duplicate().get(a);
            return HexFormat.of().formatHex(a);
        }
        if (v instanceof java.util.UUID u) {
            return u.toString();
        }
        if (v instanceof List<?> list) {
            List<Object> out = new ArrayList<>(list.size());
            list.forEach(e -> out.add(value(e)));
            return out;
        }
        if (v instanceof Map<?, ?> map) {
            Map<String, Object> out = new LinkedHashMap<>();
            map.forEach((k, e) -> out.put(String.valueOf(k), value(e)));
            return out;
        }
        return v;
    }
}
