package dev.onefold.examples.cli;

import java.math.BigDecimal;
import java.util.List;
import java.util.Map;

/**
 * Writes the small JSON documents the tool produces (reports, rejects lines): maps, lists, strings, numbers,
 * booleans, null, and {@link Raw} text that is already JSON (a record written by the Avro adapter). Keys keep the
 * map's iteration order, so an insertion-ordered map gives a fixed layout.
 *
 * <p>Stateless and thread-safe; linear in the size of the value.
 */
final class JsonText {
    private JsonText() {}

    /** Text that is already one JSON value and is copied as it is. */
    record Raw(String json) {}

    static String write(Object value) {
        StringBuilder sb = new StringBuilder(128);
        write(value, sb);
        return sb.toString();
    }

    private static void write(Object value, StringBuilder sb) {
        if (value == null) {
            sb.append("null");
        } else if (value instanceof Raw raw) {
            sb.append(raw.json());
        } else if (value instanceof String s) {
            quote(s, sb);
        } else if (value instanceof Boolean || value instanceof Long || value instanceof Integer) {
            sb.append(value);
        } else if (value instanceof BigDecimal d) {
            sb.append(d.toPlainString());
        } else if (value instanceof Double d && Double.isFinite(d)) {
            sb.append(d);
        } else if (value instanceof Map<?, ?> map) {
            sb.append('{');
            boolean first = true;
            for (Map.Entry<?, ?> e : map.entrySet()) {
                sb.append(first ? "" : ",");
                first = false;
                quote(String.valueOf(e.getKey()), sb);
                sb.append(':');
                write(e.getValue(), sb);
            }
            sb.append('}');
        } else if (value instanceof List<?> list) {
            sb.append('[');
            for (int i = 0; i < list.size(); i++) {
                sb.append(i == 0 ? "" : ",");
                write(list.get(i), sb);
            }
            sb.append(']');
        } else {
            throw new IllegalArgumentException("no JSON form for " + value.getClass().getName() + ": " + value);
        }
    }

    private static void quote(String s, StringBuilder sb) {
        sb.append('"');
        for (int i = 0; i < s.length(); i++) {
            char c = s.charAt(i);
            switch (c) {
                case '"' -> sb.append("\\\"");
                case '\\' -> sb.append("\\\\");
                case '\n' -> sb.append("\\n");
                case '\r' -> sb.append("\\r");
                case '\t' -> sb.append("\\t");
                default -> {
                    if (c < 0x20) {
                        sb.append(String.format("\\u%04x", (int) c));
                    } else {
                        sb.append(c);
                    }
                }
            }
        }
        sb.append('"');
    }
}
