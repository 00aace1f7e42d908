package dev.onefold.internal.engine;

import java.util.Arrays;

/**
 * Sorts unsigned 64-bit order prefixes with an index riding along: a least-significant-digit radix sort, one
 * pass per byte, skipping passes whose byte is the same for every prefix; a single counting pass serves all
 * bytes. The in-memory path sorts its visible rows by prefix here and compares the full order bytes only inside
 * runs of equal prefixes; {@link #prefix} also gives the spilling path's {@link OrderedRow} its prefix.
 *
 * <p>Linear in the number of prefixes (at most nine passes) and it touches only primitive arrays, which is
 * what makes it several times faster than a comparison sort of objects. Stable. Stateless and thread-safe;
 * uses the input array and three more of its size.
 */
final class PrefixRadixSort {
    private PrefixRadixSort() {}

    /**
     * The first {@code n} entries of {@code prefixes} in ascending unsigned order (the array may be longer), and
     * for each the position it had in the input.
     */
    record Sorted(long[] prefixes, int[] index) {}

    /** The first eight bytes of {@code bytes[from, to)} as a big-endian number, padded with zero bytes. */
    static long prefix(byte[] bytes, int from, int to) {
        long p = 0;
        for (int i = 0; i < 8; i++) {
            int at = from + i;
            p = (p << 8) | (at < to ? bytes[at] & 0xFF : 0);
        }
        return p;
    }

    /**
     * Sorts the first {@code n} prefixes using the given buffers, each of at least {@code n} entries, whose
     * contents do not matter. The input array serves as one of the two buffers the passes alternate between, so
     * its contents are undefined afterwards; the result is held in two of the four arrays.
     */
    static Sorted sort(long[] keys, int n, int[] idx, long[] keys2, int[] idx2) {
        for (int i = 0; i < n; i++) {
            idx[i] = i;
        }
        if (n < 2) {
            return new Sorted(keys, idx);
        }
        // one pass counts all eight digits; a digit every prefix shares needs no pass of its own
        int[][] counts = new int[8][257];
        for (int i = 0; i < n; i++) {
            long k = keys[i];
            for (int d = 0; d < 8; d++) {
                counts[d][(int) ((k >>> (d << 3)) & 0xFF) + 1]++;
            }
        }
        for (int d = 0; d < 8; d++) {
            int shift = d << 3;
            int[] count = counts[d];
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
        return new Sorted(keys, idx);
    }
}
