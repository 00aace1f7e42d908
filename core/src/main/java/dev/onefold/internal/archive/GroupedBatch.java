package dev.onefold.internal.archive;

import dev.onefold.BatchReport;
import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.engine.CloseableIterator;
import dev.onefold.internal.engine.ExternalSorter;
import dev.onefold.internal.engine.KeyedState;
import java.io.BufferedInputStream;
import java.io.BufferedOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.EOFException;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;

/**
 * A consolidated batch, one folded state per key, grouped by the partition of each state's own anchor and then
 * by key, which an apply reads in slices of bounded size. Held in memory when it fits the budget; otherwise the
 * grouping sort spills and its output is kept in one temporary file, read again slice by slice (and again when
 * a concurrent commit forces a re-plan). Grouping by partition makes each slice cover a run of partitions, so a
 * partition is rewritten by one slice only, unless its share of the batch is itself larger than a slice.
 *
 * <p>Memory: the budget while grouping; then one slice at a time. Not thread-safe; close it to delete the file.
 */
public final class GroupedBatch implements AutoCloseable {
    /** A state with the storage name of its anchor's partition. */
    private record Placed(String partition, KeyedState state) {}

    private static final Comparator<Placed> BY_PARTITION_THEN_KEY = (a, b) -> {
        int c = a.partition.compareTo(b.partition);
        return c != 0 ? c : Arrays.compareUnsigned(a.state.key(), b.state.key());
    };

    private static final ExternalSorter.Codec<KeyedState> STATES = KeyedState.codec();

    private static final ExternalSorter.Codec<Placed> CODEC = new ExternalSorter.Codec<>() {
        @Override
        public void write(ByteWriter out, Placed item) {
            out.writeString(item.partition);
            STATES.write(out, item.state);
        }

        @Override
        public Placed read(ByteReader in) {
            return new Placed(in.readString(), STATES.read(in));
        }

        @Override
        public long estimatedBytes(Placed item) {
            return 56L + 2L * item.partition.length() + STATES.estimatedBytes(item.state);
        }
    };

    private final BatchReport report;
    private final List<KeyedState> held;
    private final Path file;
    private final int spilledRuns;

    private GroupedBatch(BatchReport report, List<KeyedState> held, Path file, int spilledRuns) {
        this.report = report;
        this.held = held;
        this.file = file;
        this.spilledRuns = spilledRuns;
    }

    /** Collects folded states; {@link #finish} sorts them into a batch. Not thread-safe. */
    static final class Grouper implements AutoCloseable {
        private final ExternalSorter<Placed> sorter;
        private final Path spillDir;

        Grouper(long budgetBytes, Path spillDir, boolean parallel) {
            this.sorter = new ExternalSorter<>(BY_PARTITION_THEN_KEY, CODEC, budgetBytes, spillDir, parallel);
            this.spillDir = spillDir;
        }

        void add(String partition, KeyedState state) {
            sorter.add(new Placed(partition, state));
        }

        GroupedBatch finish(BatchReport report) {
            int runs = sorter.spilledRuns();
            try (CloseableIterator<Placed> sorted = sorter.sorted()) {
                if (runs == 0) {
                    List<KeyedState> held = new ArrayList<>();
                    sorted.forEachRemaining(p -> held.add(p.state));
                    return new GroupedBatch(report, held, null, 0);
                }
                Path file = Files.createTempFile(spillDir, "onefold-batch-", ".tmp");
                try (DataOutputStream out = new DataOutputStream(new BufferedOutputStream(Files.newOutputStream(file), 1 << 16))) {
                    ByteWriter w = new ByteWriter(256);
                    while (sorted.hasNext()) {
                        w.reset();
                        CODEC.write(w, sorted.next());
                        out.writeInt(w.length());
                        out.write(w.array(), 0, w.length());
                    }
                } catch (IOException | RuntimeException e) {
                    Files.deleteIfExists(file);
                    throw e;
                }
                return new GroupedBatch(report, null, file, runs);
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "cannot write the grouped batch in " + spillDir
                        + ": " + e.getMessage(), e);
            }
        }

        @Override
        public void close() {
            sorter.close();
        }
    }

    public BatchReport report() {
        return report;
    }

    /** Runs the grouping sort wrote to disk (0 when the batch was held in memory). */
    public int spilledRuns() {
        return spilledRuns;
    }

    /** All states at once, for callers that need the whole batch in memory (the plan API). */
    public List<KeyedState> all() {
        List<KeyedState> out = new ArrayList<>();
        forEachSlice(Long.MAX_VALUE, out::addAll);
        return out;
    }

    /** A consumer of one slice. */
    interface SliceConsumer {
        void accept(List<KeyedState> slice);
    }

    /**
     * Hands the states to {@code consumer} in slices whose estimated size stays within {@code sliceBytes} (a
     * slice holds at least one state), in partition-then-key order. Can be called again.
     */
    void forEachSlice(long sliceBytes, SliceConsumer consumer) {
        if (held != null) {
            slice(held.iterator(), sliceBytes, consumer);
            return;
        }
        try (DataInputStream in = new DataInputStream(new BufferedInputStream(Files.newInputStream(file), 1 << 16))) {
            slice(new java.util.Iterator<>() {
                KeyedState next = read(in);

                @Override
                public boolean hasNext() {
                    return next != null;
                }

                @Override
                public KeyedState next() {
                    KeyedState out = next;
                    next = read(in);
                    return out;
                }
            }, sliceBytes, consumer);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "cannot read the grouped batch " + file + ": "
                    + e.getMessage(), e);
        }
    }

    private KeyedState read(DataInputStream in) {
        try {
            int n;
            try {
                n = in.readInt();
            } catch (EOFException end) {
                return null;
            }
            byte[] b = new byte[n];
            in.readFully(b);
            return CODEC.read(new ByteReader(b, file.toString())).state;
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "cannot read the grouped batch " + file + ": "
                    + e.getMessage(), e);
        }
    }

    private static void slice(java.util.Iterator<KeyedState> states, long sliceBytes, SliceConsumer consumer) {
        List<KeyedState> slice = new ArrayList<>();
        long bytes = 0;
        while (states.hasNext()) {
            KeyedState s = states.next();
            long size = STATES.estimatedBytes(s);
            if (!slice.isEmpty() && bytes + size > sliceBytes) {
                consumer.accept(slice);
                slice = new ArrayList<>();
                bytes = 0;
            }
            slice.add(s);
            bytes += size;
        }
        if (!slice.isEmpty()) {
            consumer.accept(slice);
        }
    }

    @Override
    public void close() {
        if (file != null) {
            try {
                Files.deleteIfExists(file);
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "cannot delete the grouped batch " + file + ": "
                        + e.getMessage(), e);
            }
        }
    }
}
