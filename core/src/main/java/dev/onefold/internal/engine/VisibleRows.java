package dev.onefold.internal.engine;

import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.record.Row;
import java.util.Arrays;
import java.util.Comparator;

/**
 * Visible rows collected by one worker of the in-memory path, each with its order bytes (order fields, then the
 * key) as a range of a shared byte slab rather than an array of its own, and the first eight of those bytes as a
 * number. A row's order bytes either already exist (a last-writer winner's, written when its record was read)
 * or are written here into slabs of {@value #SLAB} bytes. {@link #sorted} orders the rows of all workers
 * together exactly as {@link OrderedRow#ORDER} does on the spilling path: order bytes, then canonical row
 * bytes (which only siblings of one key need).
 *
 * <p>Memory: the rows' references plus 24 bytes per row, and the order bytes of merged rows. Not
 * thread-safe; one per worker, sorted together once every worker is done.
 */
final class VisibleRows {
    private static final int SLAB = 1 << 16;

    private Row[] rows;
    private byte[][] slabs;
    private int[] starts;
    private int[] ends;
    private long[] prefixes;
    private int size;
    private final ByteWriter scratch = new ByteWriter(256);
    private byte[] slab = new byte[0];
    private int slabUsed;

    VisibleRows(int expected) {
        int cap = Math.max(16, expected);
        rows = new Row[cap];
        slabs = new byte[cap][];
        starts = new int[cap];
        ends = new int[cap];
        prefixes = new long[cap];
    }

    /** Adds a row whose order bytes are {@code slab[start, end)}, their first eight bytes being {@code prefix}. */
    void add(Row row, byte[] slab, int start, int end, long prefix) {
        if (size == rows.length) {
            int cap = size + (size >> 1);
            rows = Arrays.copyOf(rows, cap);
            slabs = Arrays.copyOf(slabs, cap);
            starts = Arrays.copyOf(starts, cap);
            ends = Arrays.copyOf(ends, cap);
            prefixes = Arrays.copyOf(prefixes, cap);
        }
        rows[size] = row;
        slabs[size] = slab;
        starts[size] = start;
        ends[size] = end;
        prefixes[size] = prefix;
        size++;
    }

    /** Adds a merged row of the key whose bytes are {@code key[keyStart, keyEnd)}, writing its order bytes. */
    void add(BoundDataset dataset, Row row, byte[] key, int keyStart, int keyEnd) {
        scratch.reset();
        dataset.writeOrderFields(scratch, row);
        scratch.write(key, keyStart, keyEnd - keyStart);
        int length = scratch.length();
        if (slabUsed + length > slab.length) {
            slab = new byte[Math.max(SLAB, length)];
            slabUsed = 0;
        }
        System.arraycopy(scratch.array(), 0, slab, slabUsed, length);
        add(row, slab, slabUsed, slabUsed + length, PrefixRadixSort.prefix(slab, slabUsed, slabUsed + length));
        slabUsed += length;
    }

    /** The rows of every part in one sequence, sorted by order bytes, then canonical row bytes. */
    static Row[] sorted(VisibleRows[] parts) {
        int[] base = new int[parts.length + 1];
        for (int p = 0; p < parts.length; p++) {
            base[p + 1] = base[p] + parts[p].size;
        }
        int n = base[parts.length];
        long[] prefixes = new long[n];
        for (int p = 0; p < parts.length; p++) {
            System.arraycopy(parts[p].prefixes, 0, prefixes, base[p], parts[p].size);
        }
        PrefixRadixSort.Sorted byPrefix = PrefixRadixSort.sort(prefixes, n);
        long[] keys = byPrefix.prefixes();
        int[] idx = byPrefix.index();
        Comparator<Integer> fullOrder = fullOrder(parts, base);
        int runStart = 0;
        for (int i = 1; i <= n; i++) {
            if (i == n || keys[i] != keys[runStart]) {
                if (i - runStart > 1) {
                    sortRun(idx, runStart, i, fullOrder);
                }
                runStart = i;
            }
        }
        Row[] out = new Row[n];
        for (int i = 0; i < n; i++) {
            int g = idx[i];
            int p = part(base, g);
            out[i] = parts[p].rows[g - base[p]];
        }
        return out;
    }

    /** Sorts {@code idx[from, to)}, a run of equal prefixes, by the full order bytes, then row bytes. */
    private static void sortRun(int[] idx, int from, int to, Comparator<Integer> fullOrder) {
        Integer[] run = new Integer[to - from];
        for (int i = from; i < to; i++) {
            run[i - from] = idx[i];
        }
        Arrays.sort(run, fullOrder);
        for (int i = from; i < to; i++) {
            idx[i] = run[i - from];
        }
    }

    private static Comparator<Integer> fullOrder(VisibleRows[] parts, int[] base) {
        return (x, y) -> {
            int px = part(base, x);
            int py = part(base, y);
            VisibleRows a = parts[px];
            VisibleRows b = parts[py];
            int i = x - base[px];
            int j = y - base[py];
            int c = Arrays.compareUnsigned(a.slabs[i], a.starts[i], a.ends[i], b.slabs[j], b.starts[j], b.ends[j]);
            // equal order bytes mean one key's siblings: their canonical bytes decide, as on the spilling path
            return c != 0 ? c : Arrays.compareUnsigned(RowCodec.encode(a.rows[i]), RowCodec.encode(b.rows[j]));
        };
    }

    /** The part holding global index {@code g}; parts are few (one per worker), so a scan is enough. */
    private static int part(int[] base, int g) {
        int p = 0;
        while (g >= base[p + 1]) {
            p++;
        }
        return p;
    }
}
