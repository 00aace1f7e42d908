package dev.onefold.internal.engine;

import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.function.Consumer;
import java.util.stream.IntStream;

/**
 * Stage one of a batch that fits in memory: the fast counterpart of {@link Consolidator}. Rows are buffered;
 * then keys and states are extracted in parallel, records are grouped by key in an open-addressing hash table,
 * and each key with several records is folded in the same canonical order as {@link Consolidator} (ascending
 * state bytes, exact duplicates skipped), so the folded states and the counts are identical to the sorting
 * path. Keys delivered once, the common case, are never encoded beyond their key and order bytes; the visible
 * rows are then ordered exactly as {@link Publisher} orders them.
 *
 * <h2>Invariants</h2>
 * One folded state per key, equal byte for byte to what {@link Consolidator} produces for the same records;
 * rejections are reported in input order. States come out in no particular order (the publisher sorts).
 *
 * <h2>Complexity</h2>
 * O(n) expected for grouping plus O(m log m) per key with m records; extraction and folding use all cores when
 * parallel. Memory: the buffered rows plus about 40 bytes per record; {@link #add} refuses rows once the
 * estimate passes the budget so the caller can switch to the spilling path. Not thread-safe; one per batch.
 */
public final class HashConsolidator {
    private static final int PARALLEL_THRESHOLD = 4096;

    /** A record the engine could not even read, held so rejections come out in input order. */
    private record Early(String source, long position, String reason, Object original) {}

    private final BoundDataset dataset;
    private final Policy<Object> policy;
    private final long budget;
    private final boolean parallel;
    private Row[] rows = new Row[1024];
    private long[] positions = new long[1024];
    private Object[] originals = new Object[1024];
    private String[] sources = new String[1024];
    private final List<Early> early = new ArrayList<>();
    private int n;
    private long bytes;
    private final MergeCounts counts = new MergeCounts();
    private long accepted;
    private long rejected;

    public HashConsolidator(BoundDataset dataset, long budgetBytes, boolean parallel) {
        this.dataset = dataset;
        this.policy = dataset.policy();
        this.budget = budgetBytes;
        this.parallel = parallel;
    }

    /**
     * Buffers one row.
     *
     * @return false, without buffering, when the row would exceed the memory budget
     */
    public boolean add(Row row, String source, long position, Object original) {
        long size = RowSizes.estimate(row) + 120;
        if (bytes + size > budget && n > 0) {
            return false;
        }
        if (n == rows.length) {
            int cap = n * 2;
            rows = Arrays.copyOf(rows, cap);
            positions = Arrays.copyOf(positions, cap);
            originals = Arrays.copyOf(originals, cap);
            sources = Arrays.copyOf(sources, cap);
        }
        rows[n] = row;
        positions[n] = position;
        originals[n] = original;
        sources[n] = source;
        n++;
        bytes += size;
        return true;
    }

    /** Records a record that could not be read as a row; reported in input order with the others. */
    public void reject(String source, long position, String reason, Object original) {
        early.add(new Early(source, position, reason, original));
    }

    /** Moves everything buffered into a spilling consolidator, in input order, when the budget is exceeded. */
    public void transferTo(Consolidator target, Consumer<Rejection> rejects) {
        int e = 0;
        for (int i = 0; i < n; i++) {
            while (e < early.size() && early.get(e).position() < positions[i]) {
                Early x = early.get(e++);
                target.reject(x.source(), x.position(), x.reason(), x.original(), rejects);
            }
            target.add(rows[i], sources[i], positions[i], originals[i], rejects);
            rows[i] = null;
            originals[i] = null;
        }
        for (; e < early.size(); e++) {
            Early x = early.get(e);
            target.reject(x.source(), x.position(), x.reason(), x.original(), rejects);
        }
        early.clear();
        n = 0;
        bytes = 0;
    }

    public long accepted() {
        return accepted;
    }

    public long rejected() {
        return rejected;
    }

    public MergeCounts counts() {
        return counts;
    }

    /** What the in-memory path produced: visible rows in order, and the key counts. */
    public record Ordered(OrderedRow[] rows, long keys, long keysWithSiblings, long deletedKeys) {}

    /**
     * Extracts, groups and folds, then resolves each key to its visible rows and sorts them by the order;
     * reports rejections in input order. The result equals what {@link Publisher} makes of the same states.
     */
    public Ordered foldAndOrder(Consumer<Rejection> rejects) {
        byte[][] keys = new byte[n][];
        Object[] states = new Object[n];
        String[] reasons = new String[n];
        boolean useCores = parallel && n >= PARALLEL_THRESHOLD;
        IntStream range = IntStream.range(0, n);
        (useCores ? range.parallel() : range).forEach(i -> {
            try {
                keys[i] = dataset.key(rows[i]);
                states[i] = policy.lift(rows[i]);
            } catch (OnefoldException e) {
                if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                    throw e;
                }
                reasons[i] = e.getMessage();
            }
        });
        reportRejections(reasons, rejects);

        int[] next = new int[n];
        int[] firsts = group(keys, reasons, next);
        int groups = firsts.length;
        int chunks = useCores ? Runtime.getRuntime().availableProcessors() * 4 : 1;
        MergeCounts[] perChunkCounts = new MergeCounts[chunks];
        KeyResolver[] perChunkKeys = new KeyResolver[chunks];
        List<List<OrderedRow>> perChunkRows = new ArrayList<>(java.util.Collections.nCopies(chunks, null));
        IntStream chunkRange = IntStream.range(0, chunks);
        (chunks > 1 ? chunkRange.parallel() : chunkRange).forEach(c -> {
            MergeCounts local = new MergeCounts();
            KeyResolver resolver = new KeyResolver(dataset);
            int from = (int) ((long) groups * c / chunks);
            int to = (int) ((long) groups * (c + 1) / chunks);
            List<OrderedRow> out = new ArrayList<>(to - from);
            for (int k = from; k < to; k++) {
                int first = firsts[k];
                resolver.resolve(keys[first], foldGroup(first, next, states, local), out::add);
            }
            perChunkCounts[c] = local;
            perChunkKeys[c] = resolver;
            perChunkRows.set(c, out);
        });
        KeyResolver totals = new KeyResolver(dataset);
        int total = 0;
        for (int c = 0; c < chunks; c++) {
            counts.add(perChunkCounts[c]);
            totals.add(perChunkKeys[c]);
            total += perChunkRows.get(c).size();
        }
        OrderedRow[] all = new OrderedRow[total];
        int at = 0;
        for (List<OrderedRow> part : perChunkRows) {
            for (OrderedRow r : part) {
                all[at++] = r;
            }
        }
        OrderedRow.sort(all);
        return new Ordered(all, totals.keys, totals.keysWithSiblings, totals.deletedKeys);
    }

    private void reportRejections(String[] reasons, Consumer<Rejection> rejects) {
        int e = 0;
        for (int i = 0; i < n; i++) {
            while (e < early.size() && early.get(e).position() < positions[i]) {
                Early x = early.get(e++);
                rejected++;
                rejects.accept(new Rejection(x.source(), x.position(), x.reason(), x.original()));
            }
            if (reasons[i] != null) {
                rejected++;
                rejects.accept(new Rejection(sources[i], positions[i], reasons[i], originals[i]));
            } else {
                accepted++;
            }
        }
        for (; e < early.size(); e++) {
            Early x = early.get(e);
            rejected++;
            rejects.accept(new Rejection(x.source(), x.position(), x.reason(), x.original()));
        }
    }

    /**
     * Groups records by key with open addressing on the key hash; records of one key are chained through
     * {@code next} (-1 ends a chain). Returns the first record of each key.
     */
    private int[] group(byte[][] keys, String[] reasons, int[] next) {
        int cap = Integer.highestOneBit(Math.max(16, n * 2 - 1)) << 1;
        int mask = cap - 1;
        int[] table = new int[cap];
        int[] tail = new int[cap];
        Arrays.fill(table, -1);
        int groups = 0;
        for (int i = 0; i < n; i++) {
            if (reasons[i] != null) {
                continue;
            }
            next[i] = -1;
            int slot = (int) XxHash64.hash(keys[i], 0, keys[i].length, 0) & mask;
            while (true) {
                int h = table[slot];
                if (h < 0) {
                    table[slot] = i;
                    tail[slot] = i;
                    groups++;
                    break;
                }
                if (Arrays.equals(keys[h], keys[i])) {
                    next[tail[slot]] = i;
                    tail[slot] = i;
                    break;
                }
                slot = (slot + 1) & mask;
            }
        }
        int[] firsts = new int[groups];
        int g = 0;
        for (int h : table) {
            if (h >= 0) {
                firsts[g++] = h;
            }
        }
        return firsts;
    }

    /** Folds one key's states in ascending state-byte order, exactly as {@link Consolidator} does. */
    private Object foldGroup(int first, int[] next, Object[] states, MergeCounts local) {
        if (next[first] < 0) {
            return states[first];
        }
        List<byte[]> bytes = new ArrayList<>();
        List<Object> members = new ArrayList<>();
        for (int i = first; i >= 0; i = next[i]) {
            bytes.add(policy.toBytes(states[i]));
            members.add(states[i]);
        }
        Integer[] byBytes = new Integer[members.size()];
        for (int m = 0; m < byBytes.length; m++) {
            byBytes[m] = m;
        }
        Arrays.sort(byBytes, (x, y) -> Arrays.compareUnsigned(bytes.get(x), bytes.get(y)));
        Object acc = members.get(byBytes[0]);
        byte[] last = bytes.get(byBytes[0]);
        for (int m = 1; m < byBytes.length; m++) {
            byte[] b = bytes.get(byBytes[m]);
            if (Arrays.equals(b, last)) {
                local.duplicates++;
                continue;
            }
            last = b;
            acc = policy.merge(acc, members.get(byBytes[m]), local);
        }
        return acc;
    }
}
