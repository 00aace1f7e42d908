package dev.onefold.internal.engine;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Comparator;
import java.util.Iterator;
import java.util.List;
import java.util.NoSuchElementException;

/**
 * Stage two of a batch: takes folded key states, resolves each to its visible records and sorts them by the
 * order (order fields, then key, then canonical row bytes for siblings of one key), spilling under the memory
 * budget. Counts keys, keys with siblings and deleted keys. Not thread-safe; one instance per batch.
 */
public final class Publisher implements AutoCloseable {

    /** A visible row with its order bytes. */
    public static final class OrderedRow {
        final byte[] order;
        /** The first eight order bytes as an unsigned number, so most comparisons never touch the array. */
        final long prefix;
        final Row row;
        private byte[] content;

        OrderedRow(byte[] order, Row row, byte[] content) {
            this.order = order;
            this.prefix = prefix(order);
            this.row = row;
            this.content = content;
        }

        private static long prefix(byte[] order) {
            long p = 0;
            for (int i = 0; i < 8; i++) {
                p = (p << 8) | (i < order.length ? order[i] & 0xFF : 0);
            }
            return p;
        }

        byte[] content() {
            if (content == null) {
                content = RowCodec.encode(row);
            }
            return content;
        }

        public Row row() {
            return row;
        }
    }

    private static final Comparator<OrderedRow> ORDER = (a, b) -> {
        int c = Long.compareUnsigned(a.prefix, b.prefix);
        if (c != 0) {
            return c;
        }
        c = Arrays.compareUnsigned(a.order, b.order);
        return c != 0 ? c : Arrays.compareUnsigned(a.content(), b.content());
    };

    private final BoundDataset dataset;
    private final Policy<Object> policy;
    private final ExternalSorter<OrderedRow> sorter;
    private long keys;
    private long keysWithSiblings;
    private long deletedKeys;
    private long out;

    public Publisher(BoundDataset dataset, long budgetBytes, Path tempDir, boolean parallel) {
        this.dataset = dataset;
        this.policy = dataset.policy();
        this.sorter = new ExternalSorter<>(ORDER, codec(dataset.schema()), budgetBytes, tempDir, parallel);
    }

    private static ExternalSorter.Codec<OrderedRow> codec(RowSchema schema) {
        return new ExternalSorter.Codec<>() {
            @Override
            public void write(ByteWriter o, OrderedRow item) {
                o.writeBlob(item.order);
                o.writeBlob(item.content());
            }

            @Override
            public OrderedRow read(ByteReader in) {
                byte[] order = in.readBlob();
                byte[] content = in.readBlob();
                return new OrderedRow(order, RowCodec.decode(schema, content, "spill run"), content);
            }

            @Override
            public long estimatedBytes(OrderedRow item) {
                return 200L + item.order.length * 2L + RowSizes.estimate(item.row);
            }
        };
    }

    public void add(KeyedState ks) {
        Object state = ks.state(policy);
        keys++;
        if (policy.hasSiblings(state)) {
            keysWithSiblings++;
        }
        List<Row> rows = policy.visible(state);
        if (rows.isEmpty()) {
            deletedKeys++;
        }
        for (Row r : rows) {
            sorter.add(new OrderedRow(dataset.order(r), r, null));
            out++;
        }
    }

    public long keys() { return keys; }
    public long keysWithSiblings() { return keysWithSiblings; }
    public long deletedKeys() { return deletedKeys; }
    public long out() { return out; }
    public int spilledRuns() { return sorter.spilledRuns(); }

    /** The visible rows in order. Call once. */
    public CloseableIterator<Row> sorted() {
        CloseableIterator<OrderedRow> it = sorter.sorted();
        return new CloseableIterator<>() {
            @Override
            public boolean hasNext() {
                return it.hasNext();
            }

            @Override
            public Row next() {
                if (!it.hasNext()) {
                    throw new NoSuchElementException();
                }
                return it.next().row;
            }

            @Override
            public void close() {
                it.close();
            }
        };
    }

    /** Drains an iterator of folded states into this publisher. */
    public void addAll(Iterator<KeyedState> states) {
        while (states.hasNext()) {
            add(states.next());
        }
    }

    @Override
    public void close() {
        sorter.close();
    }
}
