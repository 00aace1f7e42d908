package dev.onefold.internal.engine;

import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.record.Row;
import java.util.Arrays;
import java.util.Comparator;
import java.util.function.Consumer;

/**
 * Visible rows collected by one worker of the in-memory path, ordered the way {@link OrderedRow#ORDER} orders
 * them on the spilling path: order bytes (order fields, then the key), then canonical row bytes (which only
 * siblings of one key need). Most visible rows are input records, whose order bytes were read with them; such
 * an entry is just the record's index in {@link Records} and eight order bytes as a number (the first eight after
 * those every row shares, {@link BoundDataset#constantOrderBytes}), 12 bytes.
 * Rows built by merging get their order bytes written here, into slabs of {@value #SLAB} bytes.
 *
 * <p>Each worker {@link #sort}s its own part (a radix sort of the prefixes, comparing bytes only inside runs of
 * equal prefixes), so parts sort in parallel; {@link #merge} then interleaves them. Not thread-safe; one per
 * worker.
 */
final class VisibleRows {
    private static final int SLAB = 1 << 16;

    /** The buffered input records, by index: their rows and where their order bytes are. */
    interface Records {
        Row row(int i);

        byte[] slab(int i);

        int orderStart(int i);

        int orderEnd(int i);
    }

    private final Records records;
    /** An input record's index, or {@code -1 - m} for merged row m. */
    private int[] refs;
    private long[] prefixes;
    private int size;
    /** The rows in sorted order, once {@link #sort} ran. */
    private Row[] inOrder;
    private Row[] merged = new Row[0];
    private byte[][] mergedSlabs = new byte[0][];
    private int[] mergedStarts = new int[0];
    private int[] mergedEnds = new int[0];
    private int mergedCount;
    private final ByteWriter scratch = new ByteWriter(256);
    private byte[] slab = new byte[0];
    private int slabUsed;

    private final Workspace workspace;

    VisibleRows(Records records, int expected, Workspace workspace) {
        this.records = records;
        this.workspace = workspace;
        int cap = Math.max(16, expected);
        refs = workspace.ints.take(cap);
        prefixes = workspace.longs.take(cap);
    }

    private void add(int ref, long prefix) {
        if (size == refs.length) {
            int cap = size + (size >> 1);
            refs = Arrays.copyOf(refs, cap);
            prefixes = Arrays.copyOf(prefixes, cap);
        }
        refs[size] = ref;
        prefixes[size] = prefix;
        size++;
    }

    /** Adds input record {@code i}'s row, whose order bytes were read with it and begin with {@code prefix}. */
    void addRecord(int i, long prefix) {
        add(i, prefix);
    }

    /** Adds a merged row of the key whose bytes are {@code key[keyStart, keyEnd)}, writing its order bytes. */
    void addMerged(BoundDataset dataset, Row row, byte[] key, int keyStart, int keyEnd) {
        scratch.reset();
        dataset.writeOrderFields(scratch, row);
        scratch.write(key, keyStart, keyEnd - keyStart);
        int length = scratch.length();
        if (slabUsed + length > slab.length) {
            slab = new byte[Math.max(SLAB, length)];
            slabUsed = 0;
        }
        System.arraycopy(scratch.array(), 0, slab, slabUsed, length);
        if (mergedCount == merged.length) {
            int cap = Math.max(16, mergedCount * 2);
            merged = Arrays.copyOf(merged, cap);
            mergedSlabs = Arrays.copyOf(mergedSlabs, cap);
            mergedStarts = Arrays.copyOf(mergedStarts, cap);
            mergedEnds = Arrays.copyOf(mergedEnds, cap);
        }
        merged[mergedCount] = row;
        mergedSlabs[mergedCount] = slab;
        mergedStarts[mergedCount] = slabUsed;
        mergedEnds[mergedCount] = slabUsed + length;
        add(-1 - mergedCount, PrefixRadixSort.prefix(slab, slabUsed + dataset.constantOrderBytes(), slabUsed + length));
        mergedCount++;
        slabUsed += length;
    }

    private Row row(int ref) {
        return ref >= 0 ? records.row(ref) : merged[-1 - ref];
    }

    /** Sorts this part by order bytes, then canonical row bytes. */
    void sort() {
        PrefixRadixSort.Sorted byPrefix = workspace.sort(prefixes, size);
        long[] keys = byPrefix.prefixes();
        int[] idx = byPrefix.index();
        int[] sortedRefs = workspace.ints.take(size);
        for (int i = 0; i < size; i++) {
            sortedRefs[i] = refs[idx[i]];
        }
        workspace.ints.give(idx);
        workspace.ints.give(refs);
        Comparator<Integer> fullOrder = (x, y) -> compare(this, x, this, y);
        int runStart = 0;
        for (int i = 1; i <= size; i++) {
            if (i == size || keys[i] != keys[runStart]) {
                if (i - runStart > 1) {
                    sortRun(sortedRefs, runStart, i, fullOrder);
                }
                runStart = i;
            }
        }
        refs = sortedRefs;
        prefixes = keys;
        // fetching the rows here, one worker per part, takes their scattered reads off the serial merge
        inOrder = new Row[size];
        for (int i = 0; i < size; i++) {
            inOrder[i] = row(sortedRefs[i]);
        }
    }

    /** Gives this part's arrays back to the workspace, holding on to no row. Call once, after {@link #merge}. */
    void release() {
        workspace.ints.give(refs);
        workspace.longs.give(prefixes);
    }

    /** How many rows the parts hold together. */
    static long size(VisibleRows[] parts) {
        long total = 0;
        for (VisibleRows p : parts) {
            total += p.size;
        }
        return total;
    }

    /**
     * Interleaves parts, each already {@link #sort sorted}, handing their rows to {@code sink} in the same order
     * one part would have; straight to the sink, because the caller consumes them once, in order.
     */
    static void merge(VisibleRows[] parts, Consumer<? super Row> sink) {
        int[] at = new int[parts.length];
        while (true) {
            int best = -1;
            for (int p = 0; p < parts.length; p++) {
                if (at[p] < parts[p].size && (best < 0 || before(parts[p], at[p], parts[best], at[best]))) {
                    best = p;
                }
            }
            if (best < 0) {
                return;
            }
            sink.accept(parts[best].inOrder[at[best]++]);
        }
    }

    private static boolean before(VisibleRows a, int i, VisibleRows b, int j) {
        int c = Long.compareUnsigned(a.prefixes[i], b.prefixes[j]);
        return (c != 0 ? c : compare(a, a.refs[i], b, b.refs[j])) < 0;
    }

    /** Sorts {@code refs[from, to)}, a run of equal prefixes, by the full order bytes, then row bytes. */
    private static void sortRun(int[] refs, int from, int to, Comparator<Integer> fullOrder) {
        if (to - from == 2) {
            // most runs are two rows whose prefixes happen to agree
            if (fullOrder.compare(refs[from], refs[from + 1]) > 0) {
                int t = refs[from];
                refs[from] = refs[from + 1];
                refs[from + 1] = t;
            }
            return;
        }
        Integer[] run = new Integer[to - from];
        for (int i = from; i < to; i++) {
            run[i - from] = refs[i];
        }
        Arrays.sort(run, fullOrder);
        for (int i = from; i < to; i++) {
            refs[i] = run[i - from];
        }
    }

    /** Order bytes, then canonical row bytes, of entry {@code x} of part a and entry {@code y} of part b. */
    private static int compare(VisibleRows a, int x, VisibleRows b, int y) {
        int c = Arrays.compareUnsigned(a.slab(x), a.start(x), a.end(x), b.slab(y), b.start(y), b.end(y));
        // equal order bytes mean one key's siblings: their canonical bytes decide, as on the spilling path
        return c != 0 ? c : Arrays.compareUnsigned(RowCodec.encode(a.row(x)), RowCodec.encode(b.row(y)));
    }

    private byte[] slab(int ref) {
        return ref >= 0 ? records.slab(ref) : mergedSlabs[-1 - ref];
    }

    private int start(int ref) {
        return ref >= 0 ? records.orderStart(ref) : mergedStarts[-1 - ref];
    }

    private int end(int ref) {
        return ref >= 0 ? records.orderEnd(ref) : mergedEnds[-1 - ref];
    }
}
