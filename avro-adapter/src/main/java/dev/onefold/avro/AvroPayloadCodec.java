package dev.onefold.avro;

import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.AvroErrors;
import dev.onefold.avro.internal.Compatibility;
import dev.onefold.avro.internal.Fingerprints;
import dev.onefold.avro.internal.PayloadCheck;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.PayloadCodec;
import dev.onefold.spi.RecordAccess;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.util.Objects;
import java.util.concurrent.ConcurrentHashMap;
import org.apache.avro.AvroRuntimeException;
import org.apache.avro.Schema;
import org.apache.avro.SchemaCompatibility;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericDatumWriter;
import org.apache.avro.generic.GenericRecord;
import org.apache.avro.io.BinaryEncoder;
import org.apache.avro.io.DecoderFactory;
import org.apache.avro.io.EncoderFactory;

/**
 * The Avro payload codec: records become Avro single-object encoded bytes, and bytes written under any schema
 * the {@link SchemaStore} knows are read back resolved to the current (reader) schema by Avro's schema
 * resolution rules (added fields take their defaults, removed fields are skipped, int widens to long, ...).
 *
 * <pre>
 *  byte 0-1   C3 01                  single-object marker, format version 1
 *  byte 2-9   fingerprint            CRC-64-AVRO of the writer schema's Parsing Canonical Form, little-endian
 *  byte 10-   body                   the record in Avro binary encoding
 * </pre>
 * The {@link #writerId()} is the writer fingerprint as 16 lower-case hex digits (most significant first, the
 * number's usual reading); {@link #decode} checks that the id it is given agrees with the payload's header.
 *
 * <p>Decoding is defensive: before Avro's decoder sees a body, every length, count, enum index and union branch
 * is checked against the bytes present and the {@link DecodeLimits}, so hostile input is a CORRUPT error, never
 * an OutOfMemoryError. An unknown fingerprint, or a writer schema that cannot be resolved to the reader schema,
 * is an INVALID_SCHEMA error naming the fingerprint (and, for the latter, Avro's reasons).
 *
 * <p>Immutable and thread-safe. Encoding costs one record conversion and one Avro binary write; decoding one
 * check pass, one Avro binary read and one record conversion. The resolution of each writer schema is worked
 * out once and cached.
 */
public final class AvroPayloadCodec implements PayloadCodec {
    private static final byte MARKER_0 = (byte) 0xC3;
    private static final byte MARKER_1 = 0x01;
    /** Marker plus fingerprint. */
    public static final int HEADER_BYTES = 10;

    private final AvroRecordAccess access;
    private final Schema schema;
    private final long fingerprint;
    private final byte[] header;
    private final SchemaStore store;
    private final DecodeLimits limits;
    private final GenericDatumWriter<GenericRecord> writer;
    private final ConcurrentHashMap<Long, Resolution> resolutions = new ConcurrentHashMap<>();

    private AvroPayloadCodec(AvroRecordAccess access, SchemaStore store, DecodeLimits limits) {
        this.access = access;
        this.schema = access.avroSchema();
        this.fingerprint = Fingerprints.of(schema);
        this.header = header(fingerprint);
        this.store = Objects.requireNonNull(store, "store");
        this.limits = Objects.requireNonNull(limits, "limits");
        this.writer = new GenericDatumWriter<>(schema);
    }

    /**
     * A codec writing and reading with {@code readerSchema}, finding earlier writer schemas in {@code store}
     * (the reader schema itself is always known).
     *
     * @throws OnefoldException (INVALID_SCHEMA) when the schema has no neutral form
     */
    public static AvroPayloadCodec of(Schema readerSchema, SchemaStore store, DecodeLimits limits) {
        return new AvroPayloadCodec(AvroRecordAccess.of(readerSchema), store, limits);
    }

    /** A codec that knows only its own schema, with {@link DecodeLimits#DEFAULT}. */
    public static AvroPayloadCodec of(Schema schema) {
        return of(schema, SchemaStore.inMemory(), DecodeLimits.DEFAULT);
    }

    /** The CRC-64-AVRO fingerprint of a schema's Parsing Canonical Form. */
    public static long fingerprint(Schema schema) {
        return Fingerprints.of(schema);
    }

    /** The writer id for a schema: its fingerprint as 16 lower-case hex digits. */
    public static String writerIdOf(Schema schema) {
        return Fingerprints.hex(schema);
    }

    /** The reader (and writer) schema. */
    public Schema schema() {
        return schema;
    }

    public AvroRecordAccess access() {
        return access;
    }

    @Override
    public String writerId() {
        return Fingerprints.hex(fingerprint);
    }

    @Override
    public byte[] encode(Row row) {
        return write(access.fromRow(row));
    }

    /**
     * Encodes a generic record of the codec's schema after checking it (INVALID_RECORD naming the field path
     * when it does not conform).
     */
    public byte[] encodeRecord(GenericRecord record) {
        return encode(access.toRow(record));
    }

    private byte[] write(GenericRecord record) {
        ByteArrayOutputStream out = new ByteArrayOutputStream(64);
        out.writeBytes(header);
        BinaryEncoder enc = EncoderFactory.get().directBinaryEncoder(out, null);
        try {
            writer.write(record, enc);
            enc.flush();
        } catch (IOException | AvroRuntimeException e) {
            throw OnefoldException.record("record of " + schema.getFullName() + " cannot be written as Avro: " + e.getMessage());
        }
        return out.toByteArray();
    }

    @Override
    public Row decode(String writerId, byte[] bytes) {
        long fp = headerFingerprint(bytes);
        if (!Fingerprints.hex(fp).equals(writerId)) {
            throw OnefoldException.corrupt("payload carries fingerprint " + Fingerprints.hex(fp) + " but was stored under writer id "
                    + writerId);
        }
        GenericRecord record = read(fp, bytes);
        try {
            return access.toRow(record);
        } catch (OnefoldException e) {
            throw OnefoldException.corrupt("payload of writer " + writerId + " decodes to an invalid record: " + e.getMessage());
        }
    }

    /**
     * Decodes a single-object payload written under any schema the store knows, resolved to the codec's
     * schema; errors as for {@link #decode}.
     */
    public GenericRecord decodeRecord(byte[] bytes) {
        return read(headerFingerprint(bytes), bytes);
    }

    /**
     * Record access over single-object payloads, for feeding raw Avro bytes to a batch engine: any payload that
     * cannot be decoded (malformed, over the limits, unknown or incompatible writer schema) is an
     * INVALID_RECORD, so the engine rejects it with the reason and carries on.
     */
    public RecordAccess<byte[]> payloadAccess() {
        return new RecordAccess<>() {
            @Override
            public RowSchema schema() {
                return access.schema();
            }

            @Override
            public Row toRow(byte[] payload) {
                try {
                    return access.toRow(decodeRecord(payload));
                } catch (OnefoldException e) {
                    throw OnefoldException.record(e.getMessage());
                }
            }

            @Override
            public byte[] fromRow(Row row) {
                return encode(row);
            }
        };
    }

    private long headerFingerprint(byte[] bytes) {
        if (bytes == null || bytes.length < HEADER_BYTES) {
            throw OnefoldException.corrupt("payload of " + (bytes == null ? "null" : bytes.length + " bytes")
                    + " is shorter than the 10-byte single-object header");
        }
        if (bytes[0] != MARKER_0 || bytes[1] != MARKER_1) {
            throw OnefoldException.corrupt(String.format("payload starts with %02x %02x, not the single-object marker c3 01",
                    bytes[0] & 0xff, bytes[1] & 0xff));
        }
        long fp = 0;
        for (int i = 9; i >= 2; i--) {
            fp = (fp << 8) | (bytes[i] & 0xff);
        }
        return fp;
    }

    private GenericRecord read(long writerFingerprint, byte[] bytes) {
        Resolution r = resolutions.get(writerFingerprint);
        if (r == null) {
            r = resolve(writerFingerprint);
            // unknown fingerprints are not remembered: hostile input must not grow the cache, and a store
            // may learn the schema later
            if (r.known) {
                resolutions.putIfAbsent(writerFingerprint, r);
            }
        }
        if (r.error != null) {
            throw AvroErrors.schema(r.error);
        }
        PayloadCheck.check(r.writer, bytes, HEADER_BYTES, bytes.length, limits);
        try {
            return r.reader.read(null, DecoderFactory.get().binaryDecoder(bytes, HEADER_BYTES, bytes.length - HEADER_BYTES, null));
        } catch (IOException | AvroRuntimeException e) {
            throw OnefoldException.corrupt("payload of writer " + Fingerprints.hex(writerFingerprint) + " cannot be decoded: "
                    + e.getMessage());
        }
    }

    private Resolution resolve(long writerFingerprint) {
        Schema w = writerFingerprint == fingerprint ? schema : store.find(writerFingerprint);
        if (w == null) {
            return new Resolution(null, null, false, "unknown writer schema fingerprint " + Fingerprints.hex(writerFingerprint)
                    + ": the schema store has no schema with it; add the writer's .avsc to the store");
        }
        SchemaCompatibility.SchemaPairCompatibility c = SchemaCompatibility.checkReaderWriterCompatibility(schema, w);
        if (c.getType() != SchemaCompatibility.SchemaCompatibilityType.COMPATIBLE) {
            return new Resolution(null, null, true, "writer schema " + Fingerprints.hex(writerFingerprint) + " (" + w.getFullName()
                    + ") cannot be resolved to reader schema " + writerId() + ": "
                    + Compatibility.reasons(c.getResult()));
        }
        return new Resolution(w, new GenericDatumReader<>(w, schema), true, null);
    }

    private static byte[] header(long fingerprint) {
        byte[] h = new byte[HEADER_BYTES];
        h[0] = MARKER_0;
        h[1] = MARKER_1;
        for (int i = 0; i < 8; i++) {
            h[2 + i] = (byte) (fingerprint >>> (8 * i));
        }
        return h;
    }

    /** The outcome of resolving one writer schema: a reader, or the reason there is none. */
    private record Resolution(Schema writer, GenericDatumReader<GenericRecord> reader, boolean known, String error) {}
}
