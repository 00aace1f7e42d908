package dev.onefold.internal.engine;

import dev.onefold.internal.bytes.ByteWriter;
import java.lang.ref.SoftReference;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.atomic.AtomicReference;
import java.util.function.IntFunction;
import java.util.function.ToIntFunction;

/**
 * Scratch arrays of the in-memory path, kept between the batches of one engine: block columns, byte slabs, hash
 * tables, duplicate lists and sort buffers. An engine fed batch after batch, as a consumer is, then allocates,
 * zeroes and collects far less, and its calls stop paying for page faults on fresh heap and for young
 * collections that copy a live batch.
 *
 * <h2>Invariants</h2>
 * Only primitive arrays and byte slabs are kept, so a workspace never keeps records alive between batches; and
 * because a kept array soon lives in the old generation, where every reference stored would cost the collector's
 * write barrier a card, arrays of references are better allocated fresh (measured: a call took about 40% longer
 * with pooled row arrays). Arrays come in power-of-two lengths, grouped by length; {@code take(n)} returns one
 * of at least {@code n}, with stale contents unless it says zeroed. A workspace retains at most its limit in
 * bytes; arrays beyond it are left to the collector.
 *
 * <p>Thread-safe: the workers of one batch take and return arrays concurrently. One batch uses a workspace at a
 * time; {@link Keeper} hands it from batch to batch and holds it only softly, so the collector may reclaim it
 * when memory runs short. Taking and returning cost O(1).
 */
public final class Workspace {
    final Pool<int[]> ints = new Pool<>(int[]::new, a -> a.length, 4);
    final Pool<long[]> longs = new Pool<>(long[]::new, a -> a.length, 8);
    final Pool<boolean[]> booleans = new Pool<>(boolean[]::new, a -> a.length, 1);
    private final ArrayDeque<ByteWriter> slabs = new ArrayDeque<>();
    private final long limit;
    private long retained;

    Workspace(long limitBytes) {
        this.limit = limitBytes;
    }

    /** A zeroed array of at least {@code n} longs. */
    long[] zeroedLongs(int n) {
        long[] a = longs.take(n);
        Arrays.fill(a, 0, n, 0L);
        return a;
    }

    /**
     * Sorts the first {@code n} of {@code keys} ({@link PrefixRadixSort#sort}) with buffers from this workspace.
     * The two arrays of the result are the caller's, to give back when done; every other array involved,
     * {@code keys} included when the result is not in it, is back here already.
     */
    PrefixRadixSort.Sorted sort(long[] keys, int n) {
        int[] index = ints.take(n);
        int[] index2 = ints.take(n);
        long[] keys2 = longs.take(n);
        PrefixRadixSort.Sorted sorted = PrefixRadixSort.sort(keys, n, index, keys2, index2);
        ints.give(sorted.index() == index ? index2 : index);
        longs.give(sorted.prefixes() == keys ? keys2 : keys);
        return sorted;
    }

    /** An empty slab, with the capacity it grew to before when it was used already. */
    synchronized ByteWriter slab(int capacity) {
        ByteWriter w = slabs.poll();
        if (w == null) {
            return new ByteWriter(capacity);
        }
        retained -= w.capacity();
        return w.reset();
    }

    synchronized void giveSlab(ByteWriter w) {
        if (retained + w.capacity() <= limit) {
            retained += w.capacity();
            slabs.push(w);
        }
    }

    /** Arrays of one type, grouped by their power-of-two length. */
    final class Pool<A> {
        private final IntFunction<A> make;
        private final ToIntFunction<A> length;
        private final int bytesPerElement;
        /** Entry b holds the arrays of length 2^b. */
        private final List<ArrayDeque<A>> byLength = new ArrayList<>(32);

        Pool(IntFunction<A> make, ToIntFunction<A> length, int bytesPerElement) {
            this.make = make;
            this.length = length;
            this.bytesPerElement = bytesPerElement;
            for (int bits = 0; bits < 32; bits++) {
                byLength.add(new ArrayDeque<>());
            }
        }

        /** An array of at least {@code n} elements, whose contents are whatever its last user left. */
        A take(int n) {
            int bits = 32 - Integer.numberOfLeadingZeros(Math.max(1, n) - 1);
            synchronized (Workspace.this) {
                A a = byLength.get(bits).poll();
                if (a != null) {
                    retained -= (long) bytesPerElement << bits;
                    return a;
                }
            }
            return make.apply(1 << bits);
        }

        /** Keeps {@code a} for later batches; a reference array must be cleared by the caller first. */
        void give(A a) {
            int n = length.applyAsInt(a);
            if (Integer.bitCount(n) != 1) {
                return; // grown by copying to some other length: not worth keeping
            }
            int bits = Integer.numberOfTrailingZeros(n);
            long bytes = (long) bytesPerElement << bits;
            synchronized (Workspace.this) {
                if (retained + bytes > limit) {
                    return;
                }
                retained += bytes;
                byLength.get(bits).push(a);
            }
        }
    }

    /**
     * Hands one workspace from batch to batch of an engine: a batch takes it, or a fresh one when another batch
     * holds it, and returns it when done; the last one returned is kept, softly. Thread-safe.
     */
    public static final class Keeper {
        private final AtomicReference<SoftReference<Workspace>> idle = new AtomicReference<>();
        private final long limit;

        /** @param limitBytes the most a kept workspace may retain */
        public Keeper(long limitBytes) {
            this.limit = limitBytes;
        }

        public Workspace take() {
            SoftReference<Workspace> kept = idle.getAndSet(null);
            Workspace w = kept == null ? null : kept.get();
            return w != null ? w : new Workspace(limit);
        }

        public void give(Workspace w) {
            idle.set(new SoftReference<>(w));
        }
    }
}
