package dev.onefold.internal.engine;

import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.internal.merge.LastWriterPolicy;
import dev.onefold.internal.merge.MergeCounts;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.ForkJoinPool;
import java.util.concurrent.ForkJoinTask;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.function.Consumer;
import java.util.stream.IntStream;

/**
 * Stage one of a batch that fits in memory: the fast counterpart of {@link Consolidator}. Records are buffered
 * in blocks of {@value #BLOCK}; as each block fills, a worker reads every record's order and key bytes into the
 * block's byte slab, hashes the key and reads the version (last-writer) or lifts the merge state (other
 * policies), while the caller goes on buffering the next block; once input ends, the caller extracts the
 * blocks no worker has started, from the newest back. The caller itself only stores references and adds up
 * the sizes rows carry ({@link Row#estimatedHeapBytes()}), so it stays ahead. Then records are grouped by key in
 * open-addressing hash tables, one per shard of the key hashes, in parallel: a key's first record goes into the
 * table, its later records onto a list sorted once per shard, so a key's records are found together without
 * ever writing to an earlier record's line. Each key with several records is folded in the same canonical order as {@link Consolidator} (ascending state bytes, exact duplicates skipped),
 * so the folded states and the counts are identical to the sorting path (two records the policy knows to
 * differ are merged without encoding them, which is the same single merge); and the visible rows are ordered
 * as {@link Publisher} orders them.
 *
 * <p>Last-writer keys need no states at all: a key whose versions are distinct is decided by the versions
 * alone (the greatest wins and every other record is superseded, exactly what the fold gives), and its visible
 * row's order bytes are the ones read with the record. Only keys whose versions tie are lifted and folded.
 *
 * <h2>Invariants</h2>
 * One folded state per key, equal byte for byte to what {@link Consolidator} produces for the same records;
 * rejections, including records that could not be read at all, are reported in input order.
 *
 * <h2>Complexity</h2>
 * O(n) expected for grouping plus O(m log m) per key with m records, and a radix sort of the visible rows.
 * Memory: the buffered rows plus about 120 bytes per record (its columns, the hash tables and the sort) and its
 * order and key bytes, which is what {@link #add} counts beyond each row's own estimate;
 * {@link #add} refuses rows once the estimate passes the budget so the caller can switch to the spilling path.
 * The primitive arrays come from a {@link Workspace} and go back to it on {@link #release}. Not thread-safe; one
 * per batch.
 */
public final class HashConsolidator {
    private static final int BLOCK_BITS = 13;
    /** Records per block; a block is the unit of background extraction. */
    static final int BLOCK = 1 << BLOCK_BITS;
    /** Below this many records the work stays on the caller's thread: forking would cost more than it saves. */
    private static final int PARALLEL_THRESHOLD = 4096;
    /** What {@link #add} counts per record beyond the row itself: its columns and slab bytes. */
    private static final long COLUMN_BYTES = 120;

    private final BoundDataset dataset;
    /** Where every record of the batch comes from; records are numbered from 0 in input order. */
    private final String source;
    private final Policy<Object> policy;
    /** Set for the last-writer policy, whose keys fold by version alone unless versions tie. */
    private final LastWriterPolicy lastWriter;
    private final long budget;
    private final boolean parallel;
    private final List<Block> blocks = new ArrayList<>();
    private Block filling;
    private int n;
    private long bytes;
    /** Slab bytes per record of the last block extracted, to size the next slab; 0 before the first. */
    private volatile int slabBytesPerRecord;
    private final MergeCounts counts = new MergeCounts();
    private final Workspace workspace;
    /** What the fold used, kept until {@link #release}: each shard's arrays. */
    private Shard[] folded;
    private long accepted;
    private long rejected;

    /**
     * @param source names the batch in rejections; the record at position p is the p-th record {@link #add}ed
     *               or {@link #reject}ed, counting from 0
     */
    public HashConsolidator(BoundDataset dataset, String source, long budgetBytes, boolean parallel,
            Workspace workspace) {
        this.workspace = workspace;
        this.dataset = dataset;
        this.source = source;
        this.policy = dataset.policy();
        Object built = policy;
        this.lastWriter = built instanceof LastWriterPolicy lw ? lw : null;
        this.budget = budgetBytes;
        this.parallel = parallel;
    }

    /**
     * Buffers one row.
     *
     * @return false, without buffering, when the row would exceed the memory budget
     */
    public boolean add(Row row, long position, Object original) {
        long size = row.estimatedHeapBytes() + COLUMN_BYTES;
        if (bytes + size > budget && n > 0) {
            return false;
        }
        slot(position).put(row, original, null);
        bytes += size;
        return true;
    }

    /** Records a record that could not be read as a row; reported in input order with the others. */
    public void reject(long position, String reason, Object original) {
        slot(position).put(null, original, reason);
    }

    /** The block with room for the record at {@code position}, sealing the previous one when it is full. */
    private Block slot(long position) {
        if (position != n) {
            throw new IllegalStateException("record at position " + position + " given as record " + n
                    + " of the batch: records must come in input order, none skipped");
        }
        if (filling == null || filling.size == BLOCK) {
            if (filling != null) {
                seal(filling);
            }
            // a batch that fills one block is large: later blocks start at full size instead of growing
            filling = new Block(position, blocks.isEmpty() ? 16 : BLOCK);
            blocks.add(filling);
        }
        n++;
        return filling;
    }

    /** Starts the extraction of a full block on another core, or runs it here when work must stay serial. */
    private void seal(Block b) {
        if (parallel) {
            b.extraction = ForkJoinPool.commonPool().submit(() -> {
                if (b.claim()) {
                    b.extract();
                }
            });
        } else if (b.claim()) {
            b.extract();
        }
    }

    /**
     * Extracts every block no worker has started, newest first, while the workers go on from the oldest, so
     * the caller's thread shares the backlog once input ends; then waits for the blocks the workers took.
     */
    private Block[] extracted() {
        Block[] all = blocks.toArray(new Block[0]);
        for (int b = all.length - 1; b >= 0; b--) {
            if (all[b].claim()) {
                all[b].extract();
            }
        }
        for (Block b : all) {
            if (b.extraction != null) {
                b.extraction.join();
            }
        }
        return all;
    }

    /** Moves everything buffered into a spilling consolidator, in input order, when the budget is exceeded. */
    public void transferTo(Consolidator target, Consumer<Rejection> rejects) {
        for (Block b : blocks) {
            if (!b.claim() && b.extraction != null) {
                // a worker took this block; its columns are not needed, but its failures are
                b.extraction.join();
            }
            for (int j = 0; j < b.size; j++) {
                if (b.rows[j] == null) {
                    target.reject(source, b.position(j), b.reason(j), b.original(j), rejects);
                } else {
                    target.add(b.rows[j], source, b.position(j), b.original(j), rejects);
                }
            }
        }
        release();
        n = 0;
        bytes = 0;
    }

    /**
     * Gives every array back to the workspace, holding on to no record, once the rows were handed out; the
     * consolidator is spent. Not called after a failure: a worker may still hold arrays then.
     */
    public void release() {
        for (Block b : blocks) {
            b.release();
        }
        blocks.clear();
        filling = null;
        if (folded != null) {
            for (Shard s : folded) {
                s.release();
            }
            folded = null;
        }
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

    /** What the in-memory path produced: the visible rows, handed out in order on demand, and the key counts. */
    public static final class Ordered {
        private final VisibleRows[] parts;
        private final KeyResolver totals;

        private Ordered(VisibleRows[] parts, KeyResolver totals) {
            this.parts = parts;
            this.totals = totals;
        }

        /** Hands every visible row to {@code sink}, in order. Call once. */
        public void forEachInOrder(Consumer<? super Row> sink) {
            VisibleRows.merge(parts, sink);
        }

        public long rows() {
            return VisibleRows.size(parts);
        }

        public long keys() {
            return totals.keys;
        }

        public long keysWithSiblings() {
            return totals.keysWithSiblings;
        }

        public long deletedKeys() {
            return totals.deletedKeys;
        }
    }

    /**
     * Groups and folds what was buffered, then resolves each key to its visible rows and sorts them by the order;
     * reports rejections in input order. The result equals what {@link Publisher} makes of the same states.
     */
    public Ordered foldAndOrder(Consumer<Rejection> rejects) {
        Block[] all = extracted();
        reportRejections(all, rejects);
        int shards = parallel && n >= PARALLEL_THRESHOLD
                ? Integer.highestOneBit(Runtime.getRuntime().availableProcessors()) : 1;
        Shard[] done = new Shard[shards];
        folded = done;
        IntStream shardRange = IntStream.range(0, shards);
        Buffered buffered = new Buffered(all);
        (shards > 1 ? shardRange.parallel() : shardRange).forEach(s -> done[s] = new Shard(buffered, s, shards).run());
        KeyResolver totals = new KeyResolver(dataset);
        VisibleRows[] visible = new VisibleRows[shards];
        for (int s = 0; s < shards; s++) {
            counts.add(done[s].counts);
            totals.add(done[s].resolver);
            visible[s] = done[s].visible;
        }
        return new Ordered(visible, totals);
    }

    private void reportRejections(Block[] all, Consumer<Rejection> rejects) {
        for (Block b : all) {
            for (int j = 0; j < b.size; j++) {
                if (b.reason(j) != null) {
                    rejected++;
                    rejects.accept(new Rejection(source, b.position(j), b.reason(j), b.original(j)));
                } else {
                    accepted++;
                }
            }
        }
    }

    /**
     * Up to {@value #BLOCK} buffered records in input order and what extraction reads from each: its order
     * bytes (order fields, then key bytes) in the block's slab, where its key bytes start, its sort prefix
     * (eight order bytes as a number), the key's hash, the reason when it is rejected, and either its version and delete flag
     * (last-writer) or its lifted state (other policies). A visible row that is one of the key's input records,
     * as it is for most keys of every policy, reuses these order bytes; only rows built by merging get order
     * bytes of their own. A record that could not be read has no row and arrives with its reason. The first
     * block's arrays grow with it, so a small batch costs little.
     */
    private final class Block {
        /** Written by extraction only, in one array sized from the blocks before it so it seldom grows. */
        private ByteWriter slab;
        /** The block's first record's position; the others follow one by one. */
        final long firstPosition;
        Row[] rows;
        /**
         * The records as given, where they are not their rows (another record type, or a record that could not
         * be read); allocated with the first such record, so onefold's own rows cost no second array.
         */
        private Object[] originals;
        /** Why each record was rejected; allocated with the block's first rejection. */
        String[] reasons;
        /**
         * Record j's bytes in the slab: its order bytes start at {@code offsets[3j]}, its key bytes at
         * {@code offsets[3j + 1]}, and both end at {@code offsets[3j + 2]}; side by side, so comparing a key
         * against an earlier record's reads one cache line of them.
         */
        int[] offsets;
        long[] hashes;
        long[] prefixes;
        long[] versions;
        boolean[] deletes;
        Object[] states;
        byte[] slabBytes;
        int size;
        /** Set by whichever thread extracts the block: a worker or, once input ends, the caller. */
        private final AtomicBoolean claimed = new AtomicBoolean();
        ForkJoinTask<?> extraction;

        Block(long firstPosition, int capacity) {
            this.firstPosition = firstPosition;
            rows = new Row[capacity];
        }

        void put(Row row, Object original, String reason) {
            if (size == rows.length) {
                int cap = Math.min(BLOCK, size * 4);
                rows = Arrays.copyOf(rows, cap);
                if (originals != null) {
                    originals = Arrays.copyOf(originals, cap);
                }
                if (reasons != null) {
                    reasons = Arrays.copyOf(reasons, cap);
                }
            }
            rows[size] = row;
            if (original != row) {
                if (originals == null) {
                    originals = new Object[rows.length];
                }
                originals[size] = original;
            }
            if (reason != null) {
                reject(size, reason);
            }
            size++;
        }

        Object original(int j) {
            return originals == null || originals[j] == null ? rows[j] : originals[j];
        }

        long position(int j) {
            return firstPosition + j;
        }

        String reason(int j) {
            return reasons == null ? null : reasons[j];
        }

        private void reject(int j, String reason) {
            if (reasons == null) {
                reasons = new String[rows.length];
            }
            reasons[j] = reason;
        }

        /** Gives the block's arrays back to the workspace, cleared of records and states. */
        void release() {
            if (slab == null) {
                return; // never extracted: the batch moved to the spilling path first
            }
            workspace.giveSlab(slab);
            workspace.ints.give(offsets);
            workspace.longs.give(hashes);
            workspace.longs.give(prefixes);
            if (states == null) {
                workspace.longs.give(versions);
                workspace.booleans.give(deletes);
            }
        }

        boolean claim() {
            return claimed.compareAndSet(false, true);
        }

        /** Reads every record's columns; a record whose key, version or state is unusable gets its reason. */
        void extract() {
            // a racy read of the hint is harmless: any value is a valid starting capacity
            int perRecord = slabBytesPerRecord;
            slab = workspace.slab(size * (perRecord > 0 ? perRecord + perRecord / 8 + 1 : 16));
            offsets = workspace.ints.take(3 * size);
            hashes = workspace.longs.take(size);
            prefixes = workspace.longs.take(size);
            if (lastWriter != null) {
                versions = workspace.longs.take(size);
                deletes = workspace.booleans.take(size);
            } else {
                states = new Object[size];
            }
            for (int j = 0; j < size; j++) {
                if (rows[j] != null) {
                    extract(j);
                }
            }
            slabBytes = slab.array();
            if (size > 0) {
                slabBytesPerRecord = (slab.length() + size - 1) / size;
            }
        }

        private void extract(int j) {
            Row row = rows[j];
            int start = slab.length();
            int key;
            try {
                dataset.writeOrderFields(slab, row);
                key = slab.length();
                dataset.writeKey(slab, row);
                if (lastWriter != null) {
                    versions[j] = lastWriter.version(row);
                    deletes[j] = lastWriter.isTombstone(row);
                } else {
                    states[j] = policy.lift(row);
                }
            } catch (OnefoldException e) {
                if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                    throw e;
                }
                reject(j, e.getMessage());
                // a rejected record's partial bytes stay in the slab unreferenced
                return;
            }
            byte[] array = slab.array();
            int stop = slab.length();
            offsets[3 * j] = start;
            offsets[3 * j + 1] = key;
            offsets[3 * j + 2] = stop;
            hashes[j] = XxHash64.hash(array, key, stop - key, 0);
            prefixes[j] = PrefixRadixSort.prefix(array, start + dataset.constantOrderBytes(), stop);
        }
    }

    /** The buffered records by index: record {@code i} is record {@code i % BLOCK} of block {@code i / BLOCK}. */
    private static final class Buffered implements VisibleRows.Records {
        private final Block[] all;

        Buffered(Block[] all) {
            this.all = all;
        }

        Block block(int i) {
            return all[i >>> BLOCK_BITS];
        }

        @Override
        public Row row(int i) {
            return block(i).rows[i & (BLOCK - 1)];
        }

        @Override
        public byte[] slab(int i) {
            return block(i).slabBytes;
        }

        @Override
        public int orderStart(int i) {
            return block(i).offsets[3 * (i & (BLOCK - 1))];
        }

        @Override
        public int orderEnd(int i) {
            return block(i).offsets[3 * (i & (BLOCK - 1)) + 2];
        }
    }

    /**
     * The keys whose hash falls in one shard: grouped in an open-addressing table, folded, resolved to visible
     * rows with their order bytes. Shards split keys, never records of one key, so they run in parallel and
     * their counts add up. Keys are resolved in the order of their first record, so rows are read roughly in
     * the order they were buffered, which is kind to the caches.
     */
    private final class Shard {
        private final Buffered buffered;
        private final int shard;
        private final int shardBits;
        final MergeCounts counts = new MergeCounts();
        final KeyResolver resolver = new KeyResolver(dataset);
        final VisibleRows visible;
        /** The shard's hash table and its keys' first records, kept for {@link #release}. */
        private long[] table;
        private int[] firsts;
        /**
         * One entry per record of a key seen before: the key's first record's index in the upper half, the
         * record's in the lower. Appended in input order, then sorted, so each key's later records follow one
         * another in input order and the keys come in the order of their first records, as {@link #firsts} does.
         */
        private long[] later;
        private int laterCount;
        private long[] versionScratch = new long[8];

        Shard(Buffered buffered, int shard, int shards) {
            this.buffered = buffered;
            this.shard = shard;
            this.shardBits = Integer.numberOfTrailingZeros(shards);
            this.visible = new VisibleRows(buffered, n / shards + 16, workspace);
        }

        void release() {
            workspace.longs.give(table);
            workspace.ints.give(firsts);
            workspace.longs.give(later);
            visible.release();
        }

        private boolean mine(long hash) {
            return shardBits == 0 || (int) (hash >>> (64 - shardBits)) == shard;
        }

        private Block block(int i) {
            return buffered.block(i);
        }

        /**
         * Whether records i and k, whose hashes share their upper half, have the same key bytes. Their full
         * hashes are not compared first: the bytes decide anyway, and reading the earlier record's hash would
         * cost one more cache miss on nearly every call.
         */
        private boolean sameKey(int i, int k) {
            Block a = block(i);
            Block b = block(k);
            int x = 3 * (i & (BLOCK - 1));
            int y = 3 * (k & (BLOCK - 1));
            return Arrays.equals(a.slabBytes, a.offsets[x + 1], a.offsets[x + 2],
                    b.slabBytes, b.offsets[y + 1], b.offsets[y + 2]);
        }

        Shard run() {
            int mine = n >> shardBits;
            int cap = Integer.highestOneBit(Math.max(16, mine * 2 - 1)) << 1;
            int mask = cap - 1;
            // a slot holds the upper half of the key's hash and its first record's index + 1, so most probes are
            // settled without touching the records, and a fresh table is empty without filling
            table = workspace.zeroedLongs(cap);
            firsts = workspace.ints.take(Math.max(16, mine + (mine >> 3)));
            later = workspace.longs.take(Math.max(16, mine >> 2));
            int keys = 0;
            Block[] all = buffered.all;
            for (int bi = 0; bi < all.length; bi++) {
                Block b = all[bi];
                for (int j = 0; j < b.size; j++) {
                    long hash = b.hashes[j];
                    if (!mine(hash) || b.reason(j) != null) {
                        continue;
                    }
                    int i = (bi << BLOCK_BITS) | j;
                    long upper = hash & 0xFFFFFFFF00000000L;
                    int slot = (int) hash & mask;
                    while (true) {
                        long entry = table[slot];
                        if (entry == 0) {
                            table[slot] = upper | (i + 1);
                            if (keys == firsts.length) {
                                firsts = Arrays.copyOf(firsts, keys + (keys >> 1));
                            }
                            firsts[keys++] = i;
                            break;
                        }
                        if ((entry & 0xFFFFFFFF00000000L) == upper && sameKey((int) entry - 1, i)) {
                            // appended, not linked to the key's previous record: no write to a cold line
                            if (laterCount == later.length) {
                                later = Arrays.copyOf(later, laterCount * 2);
                            }
                            later[laterCount++] = ((entry - 1) << 32) | i;
                            break;
                        }
                        slot = (slot + 1) & mask;
                    }
                }
            }
            // sorted by first record, then record: each key's later records together, keys in the order of their
            // first records, which is the order keys are resolved in, so the walk reads both lists front to back
            PrefixRadixSort.Sorted sorted = workspace.sort(later, laterCount);
            workspace.ints.give(sorted.index());
            later = sorted.prefixes();
            int at = 0;
            for (int k = 0; k < keys; k++) {
                int first = firsts[k];
                int from = at;
                while (at < laterCount && (int) (later[at] >>> 32) == first) {
                    at++;
                }
                resolveKey(first, from, at);
            }
            visible.sort();
            return this;
        }

        /** Record m of the key whose first record is {@code first} and later ones {@code later[from, to)}. */
        private int member(int first, int from, int m) {
            return m == 0 ? first : (int) later[from + m - 1];
        }

        /** Resolves the key whose first record is {@code first} and later records {@code later[from, to)}. */
        private void resolveKey(int first, int from, int to) {
            if (lastWriter != null) {
                int winner = from == to ? first : lastWriterByVersion(first, from, to);
                if (winner >= 0) {
                    Block w = block(winner);
                    int j = winner & (BLOCK - 1);
                    resolver.count(w.deletes[j]);
                    if (!w.deletes[j]) {
                        addInputRow(winner);
                    }
                    return;
                }
            }
            for (Row r : resolver.visible(foldGroup(first, from, to))) {
                int member = memberHolding(first, from, to, r);
                if (member >= 0) {
                    addInputRow(member);
                } else {
                    Block f = block(first);
                    int at = 3 * (first & (BLOCK - 1));
                    visible.addMerged(dataset, r, f.slabBytes, f.offsets[at + 1], f.offsets[at + 2]);
                }
            }
        }

        /** Record i's row as a visible row, with the order bytes read with it. */
        private void addInputRow(int i) {
            visible.addRecord(i, block(i).prefixes[i & (BLOCK - 1)]);
        }

        /** The record of the key whose row is {@code row} itself, or -1. */
        private int memberHolding(int first, int from, int to, Row row) {
            for (int m = 0; m <= to - from; m++) {
                int i = member(first, from, m);
                if (block(i).rows[i & (BLOCK - 1)] == row) {
                    return i;
                }
            }
            return -1;
        }

        /**
         * The winner of a last-writer key whose versions are all distinct: the greatest version, every other
         * record superseded, exactly what folding the states would give; -1 when two versions tie, because
         * then only the states' content bytes can tell duplicates from conflicts.
         */
        private int lastWriterByVersion(int first, int from, int to) {
            if (to - from == 1) {
                // two records, the common case of a key delivered twice: no scratch, no sort
                int second = (int) later[from];
                long a = version(first);
                long b = version(second);
                if (a == b) {
                    return -1;
                }
                counts.superseded++;
                return a > b ? first : second;
            }
            int count = 1 + to - from;
            if (versionScratch.length < count) {
                versionScratch = new long[Integer.highestOneBit(count) * 2];
            }
            int winner = first;
            for (int m = 0; m < count; m++) {
                int i = member(first, from, m);
                long v = version(i);
                versionScratch[m] = v;
                if (v > version(winner)) {
                    winner = i;
                }
            }
            Arrays.sort(versionScratch, 0, count);
            for (int k = 1; k < count; k++) {
                if (versionScratch[k] == versionScratch[k - 1]) {
                    return -1;
                }
            }
            counts.superseded += count - 1;
            return winner;
        }

        /**
         * Folds one key's states in ascending state-byte order, exactly as {@link Consolidator} does. Two states
         * the policy knows to be distinct are merged directly: in canonical order that is the same single merge
         * ({@link Policy#surelyDistinct}), and encoding both states would cost more than the merge.
         */
        private Object foldGroup(int first, int from, int to) {
            if (from == to) {
                return state(first);
            }
            List<Object> members = new ArrayList<>(1 + to - from);
            for (int m = 0; m <= to - from; m++) {
                members.add(state(member(first, from, m)));
            }
            if (members.size() == 2 && policy.surelyDistinct(members.get(0), members.get(1))) {
                return policy.merge(members.get(0), members.get(1), counts);
            }
            List<byte[]> bytes = new ArrayList<>(members.size());
            for (Object state : members) {
                bytes.add(policy.toBytes(state));
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
                    counts.duplicates++;
                    continue;
                }
                last = b;
                acc = policy.merge(acc, members.get(byBytes[m]), counts);
            }
            return acc;
        }

        private long version(int i) {
            return block(i).versions[i & (BLOCK - 1)];
        }

        /** Record i's state: lifted during extraction, or now for a last-writer key whose versions tie. */
        private Object state(int i) {
            Block b = block(i);
            int j = i & (BLOCK - 1);
            return b.states != null ? b.states[j] : policy.lift(b.rows[j]);
        }
    }
}
