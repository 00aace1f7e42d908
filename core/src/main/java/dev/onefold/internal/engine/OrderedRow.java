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
        this.prefix = prefix(order);
        this.row = row;
        this.content = content;
    }

    private static long prefix(byte[] order) {
        long p = 0;
        for (int i = 0; i < 8; i++) {
            p = (p << 8) | (i < order.length ? order[i] & 0xFF : 0);
        }
        return p;
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

    /**
     * Sorts rows by {@link #ORDER}: a least-significant-digit radix sort on the eight-byte prefixes (passes whose
     * byte is the same for every row are skipped), then a comparison sort inside each run of equal prefixes.
     * Linear in the number of rows for distinct prefixes, and it touches only primitive arrays while radix
     * sorting, which is what makes it several times faster than a comparison sort of the objects.
     */
    public static void sort(OrderedRow[] rows) {
        int n = rows.length;
        if (n < 64) {
            Arrays.sort(rows, ORDER);
            return;
        }
        long[] keys = new long[n];
        int[] idx = new int[n];
        for (int i = 0; i < n; i++) {
            keys[i] = rows[i].prefix;
            idx[i] = i;
        }
        long[] keys2 = new long[n];
        int[] idx2 = new int[n];
        int[] count = new int[257];
        for (int shift = 0; shift < 64; shift += 8) {
            Arrays.fill(count, 0);
            for (int i = 0; i < n; i++) {
                count[(int) ((keys[i] >>> shift) & 0xFF) + 1]++;
            }
            if (count[(int) ((keys[0] >>> shift) & 0xFF) + 1] == n) {
                continue;
            }
            for (int b = 0; b < 256; b++) {
                count[b + 1] += count[b];
            }
            for (int i = 0; i < n; i++) {
                int dst = count[(int) ((keys[i] >>> shift) & 0xFF)]++;
                keys2[dst] = keys[i];
                idx2[dst] = idx[i];
            }
            long[] tk = keys;
            keys = keys2;
            keys2 = tk;
            int[] ti = idx;
            idx = idx2;
            idx2 = ti;
        }
        OrderedRow[] sorted = new OrderedRow[n];
        for (int i = 0; i < n; i++) {
            sorted[i] = rows[idx[i]];
        }
        int runStart = 0;
        for (int i = 1; i <= n; i++) {
            if (i == n || keys[i] != keys[runStart]) {
                if (i - runStart > 1) {
                    Arrays.sort(sorted, runStart, i, ORDER);
                }
                runStart = i;
            }
        }
        System.arraycopy(sorted, 0, rows, 0, n);
    }

    long estimatedBytes() {
        return 200L + order.length * 2L + RowSizes.estimate(row);
    }
}
