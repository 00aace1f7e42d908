package dev.onefold.internal.merge;

import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.encoding.RowSerde;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.MergePolicy;
import java.util.Arrays;
import java.util.EnumSet;
import java.util.List;

/** Adapts a user's {@link MergePolicy}: the state is the merged record itself. */
public final class UserPolicy implements Policy<UserPolicy.State> {

    /** A merged record and its canonical bytes. */
    public record State(Row row, byte[] content) {}

    private final MergePolicy user;
    private final RowSchema schema;
    private final RowSerde serde;

    public UserPolicy(MergePolicy user, RowSchema schema, RowSerde serde) {
        this.user = user;
        this.schema = schema;
        this.serde = serde;
    }

    @Override
    public State lift(Row record) {
        return new State(record, RowCodec.encode(record));
    }

    @Override
    public State merge(State a, State b, MergeCounts counts) {
        if (Arrays.equals(a.content, b.content)) {
            counts.duplicates++;
            return a;
        }
        Row merged = user.merge(a.row, b.row);
        if (merged == null || !merged.schema().equals(schema)) {
            throw OnefoldException.usage("merge policy '" + user.name() + "' returned "
                    + (merged == null ? "null" : "a record of schema " + merged.schema().name())
                    + " instead of a record of " + schema.name());
        }
        counts.superseded++;
        return new State(merged, RowCodec.encode(merged));
    }

    @Override
    public List<Row> visible(State state) {
        return user.isDeleted(state.row) ? List.of() : List.of(state.row);
    }

    @Override
    public Row anchor(State state) {
        return state.row;
    }

    @Override
    public boolean isJoin() {
        return user.laws().containsAll(EnumSet.allOf(MergePolicy.Law.class));
    }

    @Override
    public void write(ByteWriter out, State state) {
        serde.write(out, state.row);
    }

    @Override
    public State read(ByteReader in) {
        return lift(serde.read(in));
    }
}
