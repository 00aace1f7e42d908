package dev.onefold.internal.engine;

import dev.onefold.record.Row;
import java.nio.ByteBuffer;
import java.util.List;
import java.util.Map;

/**
 * A cheap estimate of the heap a row occupies (object headers, references, boxed values, string bytes), used to
 * keep batches within their memory budget. Within a factor of about two of the truth; never reads more than
 * the row itself. Stateless and thread-safe.
 */
final class RowSizes {
    private RowSizes() {}

    static long estimate(Row row) {
        long size = 32;
        for (int i = 0; i < row.schema().size(); i++) {
            size += 8 + value(row.get(i));
        }
        return size;
    }

    private static long value(Object v) {
        if (v == null) {
            return 0;
        }
        if (v instanceof String s) {
            return 48 + s.length();
        }
        if (v instanceof Row r) {
            return estimate(r);
        }
        if (v instanceof List<?> l) {
            long s = 40;
            for (Object o : l) {
                s += 8 + value(o);
            }
            return s;
        }
        if (v instanceof Map<?, ?> m) {
            long s = 64;
            for (Map.Entry<?, ?> e : m.entrySet()) {
                s += 40 + value(e.getKey()) + value(e.getValue());
            }
            return s;
        }
        if (v instanceof ByteBuffer b) {
            return 64 + b.remaining();
        }
        return 24;
    }
}
