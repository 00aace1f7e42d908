package dev.onefold.internal.merge;

import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.encoding.RowSerde;
import dev.onefold.record.FieldPath;
import dev.onefold.record.Row;
import java.util.Arrays;
import java.util.List;

/**
 * Last writer by logical version: the state is one record, the maximum under the total order
 * (version, canonical content bytes unsigned). An equal version with equal content is a duplicate; with
 * different content a conflict, won by the greater content bytes. Max on a total order is a join.
 * A winning tombstone hides the key and stays in the state, so an older late version cannot revive it.
 */
public final class LastWriterPolicy implements Policy<LastWriterPolicy.State> {

    /** One record with its version; its canonical bytes are computed only when a tie needs them. */
    public static final class State {
        private final long version;
        private final Row row;
        private final boolean deleted;
        private byte[] content;

        State(long version, Row row, boolean deleted, byte[] content) {
            this.version = version;
            this.row = row;
            this.deleted = deleted;
            this.content = content;
        }

        public long version() {
            return version;
        }

        public Row row() {
            return row;
        }

        byte[] content() {
            if (content == null) {
                content = RowCodec.encode(row);
            }
            return content;
        }
    }

    private final FieldPath version;
    private final FieldPath tombstone;
    private final RowSerde serde;

    public LastWriterPolicy(FieldPath version, FieldPath tombstone, RowSerde serde) {
        this.version = version;
        this.tombstone = tombstone;
        this.serde = serde;
    }

    @Override
    public State lift(Row record) {
        return new State(version(record), record, isTombstone(record), null);
    }

    /**
     * The version of a record: what {@link #lift} keeps, read without building a state, so a batch kernel can
     * fold records by version alone and lift only keys whose versions tie.
     *
     * @throws OnefoldException (INVALID_RECORD) when the version is null
     */
    public long version(Row record) {
        Object v = version.read(record);
        if (v == null) {
            throw OnefoldException.record("version field '" + version.path() + "' is null");
        }
        return ((Number) v).longValue();
    }

    /** Whether the record is a delete (its tombstone field is true). */
    public boolean isTombstone(Row record) {
        return Tombstones.isSet(tombstone, record);
    }

    @Override
    public State merge(State a, State b, MergeCounts counts) {
        int c = Long.compare(a.version, b.version);
        if (c == 0) {
            c = Arrays.compareUnsigned(a.content(), b.content());
            if (c == 0) {
                counts.duplicates++;
                return a;
            }
            counts.conflicts++;
        } else {
            counts.superseded++;
        }
        return c > 0 ? a : b;
    }

    /** Different versions mean different state bytes; merge counts one superseded version either way. */
    @Override
    public boolean surelyDistinct(State a, State b) {
        return a.version != b.version;
    }

    @Override
    public List<Row> visible(State state) {
        return state.deleted ? List.of() : List.of(state.row);
    }

    @Override
    public Row anchor(State state) {
        return state.row;
    }

    @Override
    public boolean isDeleted(State state) {
        return state.deleted;
    }

    @Override
    public void write(ByteWriter out, State state) {
        out.writeZigZag(state.version);
        serde.write(out, state.row);
    }

    @Override
    public State read(ByteReader in) {
        long v = in.readZigZag();
        Row row = serde.read(in);
        return new State(v, row, Tombstones.isSet(tombstone, row), null);
    }
}
