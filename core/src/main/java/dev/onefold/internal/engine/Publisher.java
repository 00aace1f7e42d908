package dev.onefold.internal.engine;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.merge.Policy;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.nio.file.Path;
import java.util.Iterator;
import java.util.NoSuchElementException;

/**
 * Stage two of a batch: takes folded key states, resolves each to its visible records and sorts them by the
 * order (order fields, then key, then canonical row bytes for siblings of one key), spilling under the memory
 * budget. Counts keys, keys with siblings and deleted keys. Not thread-safe; one instance per batch.
 */
public final class Publisher implements AutoCloseable {

    private final BoundDataset dataset;
    private final Policy<Object> policy;
    private final ExternalSorter<OrderedRow> sorter;
    private final KeyResolver resolver;
    private long out;

    public Publisher(BoundDataset dataset, long budgetBytes, Path tempDir, boolean parallel) {
        this.dataset = dataset;
        this.policy = dataset.policy();
        this.resolver = new KeyResolver(dataset);
        this.sorter = new ExternalSorter<>(OrderedRow.ORDER, codec(dataset.schema()), budgetBytes, tempDir, parallel);
    }

    private static ExternalSorter.Codec<OrderedRow> codec(RowSchema schema) {
        return new ExternalSorter.Codec<>() {
            @Override
            public void write(ByteWriter o, OrderedRow item) {
                o.writeBlob(item.order());
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
                return item.estimatedBytes();
            }
        };
    }

    public void add(KeyedState ks) {
        resolver.resolve(ks.key(), ks.state(policy), row -> {
            sorter.add(row);
            out++;
        });
    }

    public long keys() { return resolver.keys; }
    public long keysWithSiblings() { return resolver.keysWithSiblings; }
    public long deletedKeys() { return resolver.deletedKeys; }
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
                return it.next().row();
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
