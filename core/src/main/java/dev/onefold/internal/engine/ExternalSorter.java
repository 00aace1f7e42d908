package dev.onefold.internal.engine;

import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import java.io.BufferedInputStream;
import java.io.BufferedOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.EOFException;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.NoSuchElementException;
import java.util.PriorityQueue;

/**
 * Sorts items of any type under a memory budget: items collect in memory until their estimated size passes the
 * budget, then are sorted (in parallel where cores allow) and written as a run to a temporary file; reading
 * merges the runs. With a total comparator the output is identical however the input was split into runs.
 *
 * <h2>Invariants</h2>
 * Output is sorted by the comparator; every added item comes out exactly once; temporary files are deleted by
 * {@link #close()}, on success and failure alike.
 *
 * <h2>Complexity</h2>
 * O(n log n) comparisons; every item is written and read once per spill (one merge pass: runs are merged all
 * at once, each holding one buffered item).
 *
 * <p>Not thread-safe: one producer, then one consumer.
 */
public final class ExternalSorter<T> implements AutoCloseable {

    /** How items become bytes in runs, and how much memory one is estimated to hold. */
    public interface Codec<T> {
        void write(ByteWriter out, T item);

        T read(ByteReader in);

        long estimatedBytes(T item);
    }

    private final Comparator<? super T> order;
    private final Codec<T> codec;
    private final long budget;
    private final Path tempDir;
    private final boolean parallel;
    private final List<Path> runs = new ArrayList<>();
    private int runsWritten;
    private Object[] buffer = new Object[1024];
    private int count;
    private long bytes;
    private boolean reading;

    public ExternalSorter(Comparator<? super T> order, Codec<T> codec, long budgetBytes, Path tempDir, boolean parallel) {
        this.order = order;
        this.codec = codec;
        this.budget = budgetBytes;
        this.tempDir = tempDir;
        this.parallel = parallel;
    }

    public void add(T item) {
        if (reading) {
            throw new IllegalStateException("add after sorted()");
        }
        if (count == buffer.length) {
            buffer = Arrays.copyOf(buffer, count * 2);
        }
        buffer[count++] = item;
        bytes += codec.estimatedBytes(item);
        if (bytes > budget) {
            spill();
        }
    }

    /** Number of runs written to disk so far (still counted after they are deleted). */
    public int spilledRuns() {
        return runsWritten;
    }

    @SuppressWarnings("unchecked")
    private void sortBuffer() {
        T[] items = (T[]) buffer;
        if (parallel && count > 8192) {
            Arrays.parallelSort(items, 0, count, order);
        } else {
            Arrays.sort(items, 0, count, order);
        }
    }

    @SuppressWarnings("unchecked")
    private void spill() {
        sortBuffer();
        try {
            Files.createDirectories(tempDir);
            Path run = Files.createTempFile(tempDir, "onefold-run-", ".tmp");
            runs.add(run);
            runsWritten++;
            try (DataOutputStream out = new DataOutputStream(new BufferedOutputStream(Files.newOutputStream(run), 1 << 16))) {
                ByteWriter w = new ByteWriter(256);
                for (int i = 0; i < count; i++) {
                    w.reset();
                    codec.write(w, (T) buffer[i]);
                    out.writeInt(w.length());
                    out.write(w.array(), 0, w.length());
                    buffer[i] = null;
                }
            }
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "cannot write spill run in " + tempDir + ": " + e.getMessage(), e);
        }
        count = 0;
        bytes = 0;
        if (buffer.length > 1 << 16) {
            buffer = new Object[1024];
        }
    }

    /** The items in order. Call once, after the last {@link #add}. */
    @SuppressWarnings("unchecked")
    public CloseableIterator<T> sorted() {
        reading = true;
        if (runs.isEmpty()) {
            sortBuffer();
            Object[] items = buffer;
            int n = count;
            return new CloseableIterator<>() {
                int i;

                @Override
                public boolean hasNext() {
                    return i < n;
                }

                @Override
                public T next() {
                    if (i >= n) {
                        throw new NoSuchElementException();
                    }
                    T t = (T) items[i];
                    items[i++] = null;
                    return t;
                }

                @Override
                public void close() {
                    ExternalSorter.this.close();
                }
            };
        }
        if (count > 0) {
            spill();
        }
        return new RunMerger();
    }

    @Override
    public void close() {
        buffer = new Object[0];
        count = 0;
        OnefoldException failure = null;
        for (Path run : runs) {
            try {
                Files.deleteIfExists(run);
            } catch (IOException e) {
                if (failure == null) {
                    failure = new OnefoldException(OnefoldException.Kind.IO, "cannot delete spill run " + run + ": "
                            + e.getMessage(), e);
                }
            }
        }
        runs.clear();
        if (failure != null) {
            throw failure;
        }
    }

    private final class RunReader {
        final DataInputStream in;
        final Path path;
        T head;

        RunReader(Path path) throws IOException {
            this.path = path;
            InputStream raw = Files.newInputStream(path);
            this.in = new DataInputStream(new BufferedInputStream(raw, 1 << 16));
            advance();
        }

        void advance() throws IOException {
            int n;
            try {
                n = in.readInt();
            } catch (EOFException e) {
                head = null;
                in.close();
                return;
            }
            byte[] b = new byte[n];
            in.readFully(b);
            head = codec.read(new ByteReader(b, path.toString()));
        }
    }

    private final class RunMerger implements CloseableIterator<T> {
        private final PriorityQueue<RunReader> heap;
        private final List<RunReader> readers = new ArrayList<>();

        RunMerger() {
            heap = new PriorityQueue<>(Math.max(1, runs.size()), (a, b) -> order.compare(a.head, b.head));
            try {
                for (Path run : runs) {
                    RunReader r = new RunReader(run);
                    readers.add(r);
                    if (r.head != null) {
                        heap.add(r);
                    }
                }
            } catch (IOException e) {
                close();
                throw new OnefoldException(OnefoldException.Kind.IO, "cannot read spill run: " + e.getMessage(), e);
            }
        }

        @Override
        public boolean hasNext() {
            return !heap.isEmpty();
        }

        @Override
        public T next() {
            RunReader r = heap.poll();
            if (r == null) {
                throw new NoSuchElementException();
            }
            T out = r.head;
            try {
                r.advance();
            } catch (IOException e) {
                close();
                throw new OnefoldException(OnefoldException.Kind.IO, "cannot read spill run " + r.path + ": " + e.getMessage(), e);
            }
            if (r.head != null) {
                heap.add(r);
            }
            return out;
        }

        @Override
        public void close() {
            for (RunReader r : readers) {
                try {
                    r.in.close();
                } catch (IOException e) {
                    throw new OnefoldException(OnefoldException.Kind.IO, "cannot close spill run " + r.path, e);
                }
            }
            heap.clear();
            ExternalSorter.this.close();
        }
    }
}
