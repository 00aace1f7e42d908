package dev.onefold.internal.reconcile;

import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import java.util.Arrays;

/**
 * An invertible Bloom lookup table over 64-bit element fingerprints, used to find the symmetric difference of
 * two large sets by exchanging data proportional to the difference, not to the sets (Eppstein, Goodrich, Uyeda,
 * Varghese, "What's the Difference? Efficient Set Reconciliation without Prior Context", SIGCOMM 2011;
 * Goodrich and Mitzenmacher, "Invertible Bloom Lookup Tables", 2011).
 *
 * <h2>Layout</h2>
 * {@value #HASHES} subtables of {@code width} cells each; an element goes to one cell in each subtable, so its
 * cells are always distinct. A cell holds the signed count of elements, the XOR of their fingerprints and the
 * XOR of a check hash of each fingerprint. Widths are a power of two or three times one (1, 2, 3, 4, 6, 8, 12,
 * ...), so consecutive sizes differ by a factor of 1.33 or 1.5. A cell index is the fingerprint's hash modulo the
 * width, so a sketch folds exactly into the sketch of any width dividing its own that would have been built
 * directly ({@link #foldTo}): one pass over a set builds every smaller size, and a sender can try a small size
 * first and send a larger one only when decoding fails.
 *
 * <h2>Decoding</h2>
 * Subtracting B's sketch from A's cancels common elements. A cell is pure when its count is +1 or -1 and its
 * check sum is the check hash of its fingerprint sum; peeling pure cells recovers A\B (count +1) and B\A
 * (count -1). Decoding succeeds when every cell ends empty; otherwise {@link Decoded#complete()} is false, the
 * caller's signal to try a larger sketch or fall back to a full comparison.
 *
 * <h2>Sizing</h2>
 * {@link #widthFor(long)}: the smallest allowed width w with 3w &ge; {@value #ALPHA} d (above the peeling
 * threshold for three hash functions, about 1.222 cells per element by Goodrich and Mitzenmacher, a value quoted
 * from memory in REFERENCES.md) and w^3 &ge; d^2 / (2 &times; {@value #FAILURE_TARGET}). The second bound
 * is ours: the commonest way peeling gets stuck is two elements sharing all three cells, which happens with
 * probability about C(d, 2) / w^3; keeping that under the target keeps small differences, which need
 * proportionally more cells, at about 99% success. Resulting sizes: d = 10: 72 cells; d = 100: 288;
 * d = 1000: 1536. Measured decode success (DifferenceSketchTest, fixed seeds) and the
 * published guidance are compared there.
 *
 * <p>Not thread-safe. Memory and wire size: {@value #CELL_BYTES} bytes per cell. Adding an element costs
 * O({@value #HASHES}); decoding O(cells + d).
 */
public final class DifferenceSketch {
    /** Hash functions, one per subtable. */
    public static final int HASHES = 3;
    /** Bytes one cell takes on the wire: count (4), fingerprint sum (8), check sum (8). */
    public static final int CELL_BYTES = 20;
    private static final long CHECK_SALT = 0x5851F42D4C957F2DL;
    private static final int MAX_WIDTH = 3 << 24;
    /** Cells per expected difference in the sizing rule. */
    public static final double ALPHA = 1.5;
    /** The decode failure probability the sizing rule aims to stay under. */
    public static final double FAILURE_TARGET = 0.01;

    private final int width;
    private final int[] counts;
    private final long[] idSums;
    private final long[] checkSums;

    /**
     * An empty sketch.
     *
     * @throws IllegalArgumentException when width is not a power of two between 1 and 2^26
     */
    public DifferenceSketch(int width) {
        if (!isWidth(width)) {
            throw new IllegalArgumentException("sketch width must be 2^j or 3 * 2^j, at most 3 * 2^24, got " + width);
        }
        this.width = width;
        int cells = HASHES * width;
        counts = new int[cells];
        idSums = new long[cells];
        checkSums = new long[cells];
    }

    /** Whether a width is allowed: 2^j or 3 * 2^j, at most 3 * 2^24. */
    public static boolean isWidth(int width) {
        int odd = width >>> Integer.numberOfTrailingZeros(Math.max(1, width));
        return width >= 1 && width <= MAX_WIDTH && (odd == 1 || odd == 3);
    }

    /** The width (cells per subtable) the sizing rule gives for {@code differences} expected elements. */
    public static int widthFor(long differences) {
        double d = Math.max(1, differences);
        double perTable = Math.max(ALPHA * d / HASHES, Math.cbrt(d * d / (2 * FAILURE_TARGET)));
        int w = 1;
        while (w < perTable && w < MAX_WIDTH) {
            w = nextWidth(w);
        }
        return w;
    }

    /** The next allowed width above {@code width} (factor 1.33 or 1.5, or 2 below 4). */
    public static int nextWidth(int width) {
        int pow = Integer.highestOneBit(width);
        return width == pow && width >= 2 ? width + width / 2 : pow * 2;
    }

    /** The smallest width of the form 3 * 2^j at least {@code width}, which every smaller allowed width divides. */
    public static int foldableWidth(int width) {
        int w = 3;
        while (w < width && w < MAX_WIDTH) {
            w *= 2;
        }
        return w;
    }

    public int width() {
        return width;
    }

    public int cells() {
        return HASHES * width;
    }

    /** Adds one element. */
    public void add(long fingerprint) {
        update(fingerprint, 1);
    }

    private void update(long fingerprint, int delta) {
        long check = checkHash(fingerprint);
        for (int j = 0; j < HASHES; j++) {
            int i = index(fingerprint, j, width);
            counts[i] += delta;
            idSums[i] ^= fingerprint;
            checkSums[i] ^= check;
        }
    }

    private static int index(long fingerprint, int hashNumber, int width) {
        return hashNumber * width + (int) Long.remainderUnsigned(mix(fingerprint + (hashNumber + 1) * 0x9E3779B97F4A7C15L), width);
    }

    private static long checkHash(long fingerprint) {
        return mix(fingerprint ^ CHECK_SALT);
    }

    /** The SplitMix64 finalizer (common practice), a bijective 64-bit mixer. */
    private static long mix(long z) {
        z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
        return z ^ (z >>> 31);
    }

    /**
     * The sketch of the same elements at a smaller width, exactly as if built at that width. Costs O(cells).
     *
     * @throws IllegalArgumentException when {@code smaller} does not divide this width
     */
    public DifferenceSketch foldTo(int smaller) {
        if (smaller < 1 || width % smaller != 0) {
            throw new IllegalArgumentException("cannot fold a sketch of width " + width + " to width " + smaller
                    + ", which does not divide it");
        }
        DifferenceSketch out = new DifferenceSketch(smaller);
        for (int j = 0; j < HASHES; j++) {
            for (int i = 0; i < width; i++) {
                int from = j * width + i;
                int to = j * smaller + i % smaller;
                out.counts[to] += counts[from];
                out.idSums[to] ^= idSums[from];
                out.checkSums[to] ^= checkSums[from];
            }
        }
        return out;
    }

    /** This sketch minus another of the same width: the sketch of the symmetric difference. */
    public DifferenceSketch subtract(DifferenceSketch other) {
        if (other.width != width) {
            throw new IllegalArgumentException("sketch widths differ: " + width + " and " + other.width);
        }
        DifferenceSketch out = new DifferenceSketch(width);
        for (int i = 0; i < counts.length; i++) {
            out.counts[i] = counts[i] - other.counts[i];
            out.idSums[i] = idSums[i] ^ other.idSums[i];
            out.checkSums[i] = checkSums[i] ^ other.checkSums[i];
        }
        return out;
    }

    /** The outcome of decoding: elements only in the minuend, only in the subtrahend, and whether all were found. */
    public record Decoded(boolean complete, long[] onlyHere, long[] onlyThere) {}

    /** Peels a difference sketch. Consumes this sketch (its cells end empty on success). Costs O(cells + d). */
    public Decoded decode() {
        int cells = counts.length;
        int[] stack = new int[Math.max(16, cells)];
        int top = 0;
        for (int i = 0; i < cells; i++) {
            if (isPure(i)) {
                stack[top++] = i;
            }
        }
        LongList here = new LongList();
        LongList there = new LongList();
        // every peel empties at least one cell's worth of an element; more peels than cells means a false pure cell
        int budget = cells;
        while (top > 0 && budget > 0) {
            int i = stack[--top];
            if (!isPure(i)) {
                continue;
            }
            budget--;
            long fp = idSums[i];
            int sign = counts[i];
            (sign > 0 ? here : there).add(fp);
            update(fp, -sign);
            for (int j = 0; j < HASHES; j++) {
                int c = index(fp, j, width);
                if (isPure(c)) {
                    if (top == stack.length) {
                        stack = Arrays.copyOf(stack, stack.length * 2);
                    }
                    stack[top++] = c;
                }
            }
        }
        return new Decoded(isEmpty(), here.toArray(), there.toArray());
    }

    private boolean isPure(int i) {
        return (counts[i] == 1 || counts[i] == -1) && checkSums[i] == checkHash(idSums[i]);
    }

    private boolean isEmpty() {
        for (int i = 0; i < counts.length; i++) {
            if (counts[i] != 0 || idSums[i] != 0 || checkSums[i] != 0) {
                return false;
            }
        }
        return true;
    }

    /**
     * Writes the sketch as it is sent to the other side.
     * <pre>
     *  varint width | per cell: int count, long fingerprint sum, long check sum (big-endian)
     * </pre>
     */
    public void write(ByteWriter out) {
        out.writeVarInt(width);
        for (int i = 0; i < counts.length; i++) {
            out.writeInt(counts[i]);
            out.writeLong(idSums[i]);
            out.writeLong(checkSums[i]);
        }
    }

    /**
     * Reads what {@link #write} wrote.
     *
     * @throws OnefoldException (CORRUPT) naming the source when the width is invalid or the bytes are short
     */
    public static DifferenceSketch read(ByteReader in) {
        int width = in.readVarInt();
        if (!isWidth(width)) {
            throw OnefoldException.corrupt(in.source() + ": sketch width " + width + " is not 2^j or 3 * 2^j up to 3 * 2^24");
        }
        if ((long) in.remaining() < (long) HASHES * width * CELL_BYTES) {
            throw OnefoldException.corrupt(in.source() + ": sketch of width " + width + " needs "
                    + (long) HASHES * width * CELL_BYTES + " bytes of cells, has " + in.remaining());
        }
        DifferenceSketch s = new DifferenceSketch(width);
        for (int i = 0; i < s.counts.length; i++) {
            s.counts[i] = in.readInt();
            s.idSums[i] = in.readLong();
            s.checkSums[i] = in.readLong();
        }
        return s;
    }

    /** A growable list of longs without boxing. */
    private static final class LongList {
        private long[] items = new long[16];
        private int size;

        void add(long v) {
            if (size == items.length) {
                items = Arrays.copyOf(items, size * 2);
            }
            items[size++] = v;
        }

        long[] toArray() {
            return Arrays.copyOf(items, size);
        }
    }
}
