package dev.onefold.internal.encoding;

import dev.onefold.OnefoldException;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.PayloadCodec;
import java.nio.charset.StandardCharsets;

/**
 * Core's default {@link PayloadCodec}: onefold's canonical row bytes ({@link RowCodec}) under one schema. Its
 * writer id is {@code row-} and 16 hex digits of XXH64 (seed 0) over the schema's canonical description
 * ({@link #describe}), so any change of names, types, nullability or nesting gives a new id. It reads only its
 * own id: core rows have no schema resolution (the Avro adapter's codec does). Immutable and thread-safe.
 */
public final class CanonicalPayloadCodec implements PayloadCodec {
    private final RowSchema schema;
    private final String writerId;

    public CanonicalPayloadCodec(RowSchema schema) {
        this.schema = schema;
        this.writerId = String.format("row-%016x", XxHash64.hash(describe(schema).getBytes(StandardCharsets.UTF_8)));
    }

    /**
     * A canonical text of a schema: {@code name{field:type,...}} with types as {@code long}, {@code string?}
     * (nullable), {@code list<...>}, {@code map<...>}, {@code decimal(p,s)} and nested records spelled out.
     */
    public static String describe(RowSchema schema) {
        StringBuilder sb = new StringBuilder();
        describe(schema, sb);
        return sb.toString();
    }

    private static void describe(RowSchema schema, StringBuilder sb) {
        sb.append(schema.name()).append('{');
        for (int i = 0; i < schema.size(); i++) {
            if (i > 0) {
                sb.append(',');
            }
            sb.append(schema.field(i).name()).append(':');
            describe(schema.field(i).type(), sb);
        }
        sb.append('}');
    }

    private static void describe(FieldType t, StringBuilder sb) {
        switch (t.kind()) {
            case LIST, MAP -> {
                sb.append(t.kind().jsonName()).append('<');
                describe(t.element(), sb);
                sb.append('>');
            }
            case RECORD -> describe(t.recordSchema(), sb);
            case DECIMAL -> sb.append("decimal(").append(t.precision()).append(',').append(t.scale()).append(')');
            default -> sb.append(t.kind().jsonName());
        }
        if (t.isNullable()) {
            sb.append('?');
        }
    }

    @Override
    public String writerId() {
        return writerId;
    }

    @Override
    public byte[] encode(Row row) {
        return RowCodec.encode(row);
    }

    @Override
    public Row decode(String id, byte[] bytes) {
        if (!writerId.equals(id)) {
            throw new OnefoldException(OnefoldException.Kind.INVALID_SCHEMA, "records written under writer id " + id
                    + " cannot be read by the canonical codec of schema " + schema.name() + " (writer id " + writerId
                    + "); core rows have no schema resolution, use a codec that knows the writer schema");
        }
        return RowCodec.decode(schema, bytes, "record of writer " + id);
    }
}
