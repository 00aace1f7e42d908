package dev.onefold.internal.reconcile;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.ExternalSorter;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.reconcile.Digest;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.reconcile.PartitionId;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.Iterator;
import java.util.List;

/**
 * Finds the keys that differ in one partition of two sources: missing on the left, missing on the right, or
 * present on both with different content.
 *
 * <h2>Sketch first</h2>
 * Each side's (key, key hash) entries become 64-bit fingerprints in a {@link DifferenceSketch} built once at the
 * largest size the settings allow; the left sketch is folded to the smallest size the sizing rule gives for the
 * least possible difference (the difference of the key counts), written as it would be sent, read by the right
 * side, subtracted and decoded; on failure the next size is tried. Decoded fingerprints are mapped back to
 * entries by one more pass over each side, and the result is checked against the digests: removing the found
 * entries must leave equal key counts and content hashes. Any failure (no size decodes, a fingerprint without an
 * entry, a check that does not add up) falls back to the full comparison, and the result says so.
 *
 * <h2>Full comparison</h2>
 * Both sides' entries are sorted by key under the memory budget (spilling to disk) and merged.
 *
 * <h2>Complexity</h2>
 * Sketch: O(n) local work per side, O(d) exchanged (sketch cells of 20 bytes, about 1.5 to 7 per difference, plus
 * the differing entries). Full: O(n log n) local work and one side's entries exchanged. Lists of keys hold at
 * most {@code limit} keys per kind; counts are exact. Not thread-safe; one instance per comparison.
 */
public final class DifferenceFinder {

    /** How the differences were found. */
    public enum Method { SKETCH, FULL }

    /** One (key, key hash) entry. */
    public record Entry(byte[] key, long keyHash) {}

    /** What was found, with what it cost. Key lists are in ascending key order, at most {@code limit} long. */
    public record Found(Method method, boolean sketchFailed, int sketchAttempts, int sketchCells, long exchangedBytes,
            long missingLeftCount, long missingRightCount, long contentDiffersCount,
            List<byte[]> missingLeft, List<byte[]> missingRight, List<byte[]> contentDiffers) {}

    private static final Comparator<Entry> BY_KEY = (a, b) -> Arrays.compareUnsigned(a.key, b.key);

    private final int limit;
    private final long sketchMaxDifferences;
    private final long budget;
    private final Path spillDir;

    /**
     * @param limit                how many keys of each kind to list
     * @param sketchMaxDifferences the largest difference a sketch is built for; larger ones use the full comparison
     */
    public DifferenceFinder(int limit, long sketchMaxDifferences, long budgetBytes, Path spillDir) {
        this.limit = limit;
        this.sketchMaxDifferences = sketchMaxDifferences;
        this.budget = budgetBytes;
        this.spillDir = spillDir;
    }

    /** Finds the differing keys of one partition; a missing digest counts as empty. */
    public Found find(DigestSource left, DigestSource right, PartitionId partition, Digest leftDigest, Digest rightDigest) {
        long lk = leftDigest == null ? 0 : leftDigest.keys();
        long rk = rightDigest == null ? 0 : rightDigest.keys();
        long leastDifference = Math.max(1, Math.abs(lk - rk));
        long mostDifference = Math.min(lk + rk, sketchMaxDifferences);
        if (lk == 0 || rk == 0 || leastDifference > mostDifference) {
            return full(left, right, partition, false, 0, 0, 0);
        }
        int maxWidth = DifferenceSketch.foldableWidth(DifferenceSketch.widthFor(mostDifference));
        DifferenceSketch leftSketch = sketch(left, partition, maxWidth);
        DifferenceSketch rightSketch = sketch(right, partition, maxWidth);
        long exchanged = 0;
        int attempts = 0;
        int cells = 0;
        for (int w = DifferenceSketch.widthFor(leastDifference); w <= maxWidth; w = DifferenceSketch.nextWidth(w)) {
            if (maxWidth % w != 0) {
                continue;
            }
            attempts++;
            ByteWriter wire = new ByteWriter(w * DifferenceSketch.HASHES * DifferenceSketch.CELL_BYTES + 8);
            leftSketch.foldTo(w).write(wire);
            exchanged += wire.length();
            cells = w * DifferenceSketch.HASHES;
            DifferenceSketch received = DifferenceSketch.read(new ByteReader(wire.array(), 0, wire.length(), "sketch from " + left.name()));
            DifferenceSketch.Decoded decoded = received.subtract(rightSketch.foldTo(w)).decode();
            if (!decoded.complete()) {
                continue;
            }
            List<Entry> leftOnly = resolve(left, partition, decoded.onlyHere());
            List<Entry> rightOnly = resolve(right, partition, decoded.onlyThere());
            if (leftOnly == null || rightOnly == null || !explains(leftDigest, rightDigest, leftOnly, rightOnly)) {
                break;
            }
            for (Entry e : leftOnly) {
                exchanged += e.key.length + 8L;
            }
            for (Entry e : rightOnly) {
                exchanged += e.key.length + 8L;
            }
            leftOnly.sort(BY_KEY);
            rightOnly.sort(BY_KEY);
            Classifier c = classify(leftOnly.iterator(), rightOnly.iterator());
            return c.found(Method.SKETCH, false, attempts, cells, exchanged);
        }
        return full(left, right, partition, true, attempts, cells, exchanged);
    }

    /** The element a (key, key hash) entry stands for in a sketch. */
    static long fingerprint(byte[] key, long keyHash) {
        return XxHash64.hash(key, 0, key.length, keyHash);
    }

    private static DifferenceSketch sketch(DigestSource source, PartitionId partition, int width) {
        DifferenceSketch s = new DifferenceSketch(width);
        source.entries(partition, (key, hash) -> s.add(fingerprint(key, hash)));
        return s;
    }

    /** The entries whose fingerprints were decoded, or null when one has no entry (the decode was wrong). */
    private static List<Entry> resolve(DigestSource source, PartitionId partition, long[] fingerprints) {
        long[] sorted = fingerprints.clone();
        Arrays.sort(sorted);
        List<Entry> out = new ArrayList<>(sorted.length);
        if (sorted.length > 0) {
            source.entries(partition, (key, hash) -> {
                if (Arrays.binarySearch(sorted, fingerprint(key, hash)) >= 0) {
                    out.add(new Entry(key, hash));
                }
            });
        }
        return out.size() == sorted.length ? out : null;
    }

    /** Whether removing the found entries leaves both digests with equal key counts and content hashes. */
    private static boolean explains(Digest left, Digest right, List<Entry> leftOnly, List<Entry> rightOnly) {
        long leftHash = left.contentHash();
        for (Entry e : leftOnly) {
            leftHash -= e.keyHash;
        }
        long rightHash = right.contentHash();
        for (Entry e : rightOnly) {
            rightHash -= e.keyHash;
        }
        return left.keys() - leftOnly.size() == right.keys() - rightOnly.size() && leftHash == rightHash;
    }

    private Found full(DigestSource left, DigestSource right, PartitionId partition, boolean sketchFailed, int attempts,
            int cells, long exchangedBefore) {
        long[] exchanged = {exchangedBefore};
        try (ExternalSorter<Entry> l = sorter(); ExternalSorter<Entry> r = sorter()) {
            left.entries(partition, (key, hash) -> {
                l.add(new Entry(key, hash));
                exchanged[0] += key.length + 8L;
            });
            right.entries(partition, (key, hash) -> r.add(new Entry(key, hash)));
            try (CloseableIterator<Entry> ls = l.sorted(); CloseableIterator<Entry> rs = r.sorted()) {
                return classify(ls, rs).found(Method.FULL, sketchFailed, attempts, cells, exchanged[0]);
            }
        }
    }

    private ExternalSorter<Entry> sorter() {
        return new ExternalSorter<>(BY_KEY, new ExternalSorter.Codec<>() {
            @Override
            public void write(ByteWriter out, Entry item) {
                out.writeBlob(item.key);
                out.writeLong(item.keyHash);
            }

            @Override
            public Entry read(ByteReader in) {
                return new Entry(in.readBlob(), in.readLong());
            }

            @Override
            public long estimatedBytes(Entry item) {
                return 64L + item.key.length;
            }
        }, budget / 2, spillDir, true);
    }

    /** Merges two key-sorted entry streams (one entry per key each) into the three kinds of difference. */
    private Classifier classify(Iterator<Entry> left, Iterator<Entry> right) {
        Classifier c = new Classifier(limit);
        Entry l = left.hasNext() ? left.next() : null;
        Entry r = right.hasNext() ? right.next() : null;
        while (l != null || r != null) {
            int cmp = l == null ? 1 : r == null ? -1 : Arrays.compareUnsigned(l.key, r.key);
            if (cmp < 0) {
                c.missingRight(l.key);
                l = left.hasNext() ? left.next() : null;
            } else if (cmp > 0) {
                c.missingLeft(r.key);
                r = right.hasNext() ? right.next() : null;
            } else {
                if (l.keyHash != r.keyHash) {
                    c.contentDiffers(l.key);
                }
                l = left.hasNext() ? left.next() : null;
                r = right.hasNext() ? right.next() : null;
            }
        }
        return c;
    }

    /** Counts the differences of each kind and keeps the first {@code limit} keys of each. */
    private static final class Classifier {
        private final int limit;
        private final List<byte[]> missingLeft = new ArrayList<>();
        private final List<byte[]> missingRight = new ArrayList<>();
        private final List<byte[]> contentDiffers = new ArrayList<>();
        private long missingLeftCount;
        private long missingRightCount;
        private long contentDiffersCount;

        Classifier(int limit) {
            this.limit = limit;
        }

        void missingLeft(byte[] key) {
            missingLeftCount++;
            keep(missingLeft, key);
        }

        void missingRight(byte[] key) {
            missingRightCount++;
            keep(missingRight, key);
        }

        void contentDiffers(byte[] key) {
            contentDiffersCount++;
            keep(contentDiffers, key);
        }

        private void keep(List<byte[]> list, byte[] key) {
            if (list.size() < limit) {
                list.add(key);
            }
        }

        Found found(Method method, boolean sketchFailed, int attempts, int cells, long exchanged) {
            return new Found(method, sketchFailed, attempts, cells, exchanged, missingLeftCount, missingRightCount,
                    contentDiffersCount, List.copyOf(missingLeft), List.copyOf(missingRight), List.copyOf(contentDiffers));
        }
    }
}
