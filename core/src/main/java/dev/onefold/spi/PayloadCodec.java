package dev.onefold.spi;

import dev.onefold.record.Row;

/**
 * How the archive turns the records inside merge states into bytes and back, and how it reads records written
 * under an earlier schema. Every chunk records the {@link #writerId()} it was written with; reading passes
 * that id back so the codec can resolve the writer's schema to the current (reader) schema.
 *
 * <p>Let c be a codec and r a row of the current schema. Then {@code c.decode(c.writerId(), c.encode(r))}
 * equals r.
 *
 * <p>Core's default writes onefold's canonical row bytes; the Avro adapter writes Avro binary with the
 * schema fingerprint and resolves schemas by Avro's rules. Implementations are immutable and thread-safe;
 * cost is linear in the record size.
 */
public interface PayloadCodec {

    /** Identifies the schema {@link #encode} writes with (for example a schema fingerprint in hex). */
    String writerId();

    /** Encodes a row of the current schema. */
    byte[] encode(Row row);

    /**
     * Decodes bytes written under {@code writerId} into a row of the current schema.
     *
     * @throws dev.onefold.OnefoldException CORRUPT when the bytes are malformed, INVALID_SCHEMA when the
     *     writer schema is unknown or cannot be resolved to the current one; the message names the id
     */
    Row decode(String writerId, byte[] bytes);

    /** Core's default: canonical row bytes of one schema, writer id derived from the schema (no resolution). */
    static PayloadCodec canonical(dev.onefold.record.RowSchema schema) {
        return new dev.onefold.internal.encoding.CanonicalPayloadCodec(schema);
    }
}
