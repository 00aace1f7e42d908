package dev.onefold.internal.encoding;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;

/**
 * How rows inside merge states become bytes and back. The default is {@link RowCodec} under one schema; an
 * archive reading chunks written under an older schema supplies one that decodes with the writer's schema and
 * resolves to the reader's. Implementations are immutable and thread-safe.
 */
public interface RowSerde {
    void write(ByteWriter out, Row row);

    Row read(ByteReader in);

    /** Canonical rows of one schema, length-prefixed so a reader can skip them. */
    static RowSerde canonical(RowSchema schema) {
        return new RowSerde() {
            @Override
            public void write(ByteWriter out, Row row) {
                ByteWriter body = new ByteWriter(64);
                RowCodec.write(body, row);
                out.writeVarInt(body.length());
                out.write(body.array(), 0, body.length());
            }

            @Override
            public Row read(ByteReader in) {
                int n = in.readVarInt();
                byte[] body = in.read(n);
                return RowCodec.decode(schema, body, in.source());
            }
        };
    }

    /** Rows through a payload codec, reading with the given writer id, length-prefixed. */
    static RowSerde of(dev.onefold.spi.PayloadCodec codec, String readWriterId) {
        return new RowSerde() {
            @Override
            public void write(ByteWriter out, Row row) {
                out.writeBlob(codec.encode(row));
            }

            @Override
            public Row read(ByteReader in) {
                return codec.decode(readWriterId, in.readBlob());
            }
        };
    }
}
