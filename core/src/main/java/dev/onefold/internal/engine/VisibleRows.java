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
 * or are written here into slabs of {@value #SLAB} bytes. {@link #sort} and {@link #merge} order the rows of
 * all workers exactly as {@link OrderedRow#ORDER} does on the spilling path: order bytes, then canonical row
 * bytes (which only siblings of one key need).
 *
 * <p>Memory: the rows' references plus 24 bytes per row, and the order bytes of merged rows. Not
 * thread-safe; one per worker, sorted by that worker, merged once every worker is done.
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

    /**
     * Sorts this part's rows by order bytes, then canonical row bytes: a radix sort of the prefixes, then a
     * comparison of the slab bytes inside each run of equal prefixes. Each worker sorts its own part, so the
     * parts sort in parallel and {@link #merge} only interleaves them.
     */
    void sort() {
        PrefixRadixSort.Sorted byPrefix = PrefixRadixSort.sort(prefixes, size);
        long[] keys = byPrefix.prefixes();
        int[] idx = byPrefix.index();
        Comparator<Integer> fullOrder = (x, y) -> compare(this, x, this, y);
        int runStart = 0;
        for (int i = 1; i <= size; i++) {
            if (i == size || keys[i] != keys[runStart]) {
                if (i - runStart > 1) {
                    sortRun(idx, runStart, i, fullOrder);
                }
                runStart = i;
            }
        }
        Row[] sortedRows = new Row[size];
        byte[][] sortedSlabs = new byte[size][];
        int[] sortedStarts = new int[size];
        int[] sortedEnds = new int[size];
        for (int i = 0; i < size; i++) {
            int from = idx[i];
            sortedRows[i] = rows[from];
            sortedSlabs[i] = slabs[from];
            sortedStarts[i] = starts[from];
            sortedEnds[i] = ends[from];
        }
        rows = sortedRows;
        slabs = sortedSlabs;
        starts = sortedStarts;
        ends = sortedEnds;
        prefixes = keys;
    }

    /** Interleaves parts, each already {@link #sort sorted}, into one sequence in the same order. */
    static Row[] merge(VisibleRows[] parts) {
        int total = 0;
        for (VisibleRows p : parts) {
            total += p.size;
        }
        Row[] out = new Row[total];
        int[] at = new int[parts.length];
        for (int o = 0; o < total; o++) {
            int best = -1;
            for (int p = 0; p < parts.length; p++) {
                if (at[p] < parts[p].size && (best < 0 || before(parts[p], at[p], parts[best], at[best]))) {
                    best = p;
                }
            }
            out[o] = parts[best].rows[at[best]++];
        }
        return out;
    }

    private static boolean before(VisibleRows a, int i, VisibleRows b, int j) {
        int c = Long.compareUnsigned(a.prefixes[i], b.prefixes[j]);
        return (c != 0 ? c : compare(a, i, b, j)) < 0;
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

    /** Order bytes, then canonical row bytes, of row i of part a and row j of part b. */
    private static int compare(VisibleRows a, int i, VisibleRows b, int j) {
        int c = Arrays.compareUnsigned(a.slabs[i], a.starts[i], a.ends[i], b.slabs[j], b.starts[j], b.ends[j]);
        // equal order bytes mean one key's siblings: their canonical bytes decide, as on the spilling path
        return c != 0 ? c : Arrays.compareUnsigned(RowCodec.encode(a.rows[i]), RowCodec.encode(b.rows[j]));
    }
}
