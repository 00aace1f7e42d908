package dev.onefold.internal.engine;

import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.record.Row;
import java.util.Arrays;
import java.util.Comparator;

/**
 * A visible row with its order bytes (order fields, then key). {@link #ORDER} sorts by order bytes, then by
 * canonical row bytes, which only siblings of one key ever need; the first eight order bytes are kept as a
 * number so most comparisons never touch the arrays. Not thread-safe (the row bytes are computed lazily).
 */
public final class OrderedRow {
    /** Order bytes, then canonical row bytes: a total order on visible rows. */
    public static final Comparator<OrderedRow> ORDER = (a, b) -> {
        int c = Long.compareUnsigned(a.prefix, b.prefix);
        if (c != 0) {
            return c;
        }
        c = Arrays.compareUnsigned(a.order, b.order);
        return c != 0 ? c : Arrays.compareUnsigned(a.content(), b.content());
    };

    private final byte[] order;
    private final long prefix;
    private final Row row;
    private byte[] content;

    public OrderedRow(byte[] order, Row row, byte[] content) {
        this.order = order;
        this.prefix = PrefixRadixSort.prefix(order, 0, order.length);
        this.row = row;
        this.content = content;
    }

    public byte[] order() {
        return order;
    }

    public Row row() {
        return row;
    }

    byte[] content() {
        if (content == null) {
            content = RowCodec.encode(row);
        }
        return content;
    }

    long estimatedBytes() {
        return 200L + order.length * 2L + row.estimatedHeapBytes();
    }
}
