package dev.onefold.record;

import java.nio.ByteBuffer;
import java.util.List;
import java.util.Map;

/**
 * A cheap estimate of the heap a row occupies (object headers, references, boxed values, string bytes), which
 * {@link Row} computes once when it is built, while its values are still in the cache; memory budgets count
 * it. Within a factor of about two of the truth; never reads more than the row itself, and a nested row's
 * estimate is its own, already computed.
 *
 * <p>The walk follows the schema's types rather than testing each value's class: a fixed-width value (number,
 * boolean, timestamp, date, uuid) costs a constant and is never dereferenced, and a collection of fixed-width
 * values is sized from its length, so the walk touches only what has a variable size (strings, bytes,
 * decimals, nested records, map keys). Stateless and thread-safe.
 */
final class RowSizes {
    /** A boxed fixed-width value: header plus payload, rounded as the JVM lays it out (common practice). */
    private static final long BOXED = 24;
    private static final long REFERENCE = 8;

    private RowSizes() {}

    /** The estimate for a row of {@code schema} holding {@code values}, already normalised. */
    static long estimate(RowSchema schema, Object[] values) {
        List<RowSchema.Field> fields = schema.fields();
        long size = 32;
        for (int i = 0; i < fields.size(); i++) {
            size += REFERENCE + value(fields.get(i).type(), values[i]);
        }
        return size;
    }

    private static long value(FieldType type, Object v) {
        if (v == null) {
            return 0;
        }
        return switch (type.kind()) {
            case STRING -> 48 + ((String) v).length();
            case BYTES -> 64 + ((ByteBuffer) v).remaining();
            case DECIMAL -> 64 + ((java.math.BigDecimal) v).unscaledValue().bitLength() / 8;
            case RECORD -> ((Row) v).estimatedHeapBytes();
            case LIST -> list(type.element(), (List<?>) v);
            case MAP -> map(type.element(), (Map<?, ?>) v);
            default -> BOXED;
        };
    }

    private static boolean isFixedWidth(FieldType type) {
        return switch (type.kind()) {
            case STRING, BYTES, DECIMAL, RECORD, LIST, MAP -> false;
            default -> true;
        };
    }

    private static long list(FieldType element, List<?> l) {
        long s = 40 + REFERENCE * l.size();
        if (isFixedWidth(element)) {
            return s + BOXED * l.size();
        }
        for (Object o : l) {
            s += value(element, o);
        }
        return s;
    }

    private static long map(FieldType values, Map<?, ?> m) {
        long s = 64 + 40L * m.size();
        if (isFixedWidth(values)) {
            s += BOXED * m.size();
            for (Object k : m.keySet()) {
                s += 48 + ((String) k).length();
            }
            return s;
        }
        for (Map.Entry<?, ?> e : m.entrySet()) {
            s += 48 + ((String) e.getKey()).length() + value(values, e.getValue());
        }
        return s;
    }
}
