package dev.onefold.avro;

import dev.onefold.avro.internal.SchemaMapping;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericRecord;

/**
 * Record access for Avro generic records of one record schema: reads each record into onefold's neutral
 * {@link Row} and builds merged rows back into {@link GenericRecord}s of the same schema.
 *
 * <p>The Avro schema maps to a {@link RowSchema} with the same field names, so spec field paths are Avro field
 * paths ({@code shipment.origin.port}). Nullable unions ({@code ["null", T]}) become nullable fields; logical
 * types timestamp-millis, timestamp-micros, date, uuid and decimal keep their meaning (and their order as key
 * and order fields); enums become their symbol and fixed values their bytes, and both are rebuilt on the way
 * back. Unions of several non-null types, fields of type null and recursive records are refused when the
 * access is created (INVALID_SCHEMA naming the field path).
 *
 * <p>{@link #toRow} accepts Avro's plain generic values and the converted ones (Instant, LocalDate, BigDecimal,
 * UUID); a record of another schema, or a value that does not fit its field, is an INVALID_RECORD naming the
 * field path, which the batch engine turns into a rejection. {@link #fromRow} builds Avro's plain generic
 * representation, which any Avro writer accepts.
 *
 * <p>Immutable and thread-safe. Field positions are resolved once, when the access is created; each
 * conversion is one pass over the record's values.
 */
public final class AvroRecordAccess implements RecordAccess<GenericRecord> {
    private final SchemaMapping mapping;

    private AvroRecordAccess(SchemaMapping mapping) {
        this.mapping = mapping;
    }

    /**
     * Access for records of one Avro record schema.
     *
     * @throws dev.onefold.OnefoldException (INVALID_SCHEMA) naming the field path of a shape with no neutral form
     */
    public static AvroRecordAccess of(Schema recordSchema) {
        return new AvroRecordAccess(SchemaMapping.of(recordSchema));
    }

    /** The Avro schema of every record this access reads and builds. */
    public Schema avroSchema() {
        return mapping.avroSchema();
    }

    @Override
    public RowSchema schema() {
        return mapping.rowSchema();
    }

    @Override
    public Row toRow(GenericRecord record) {
        return mapping.toRow(record);
    }

    @Override
    public GenericRecord fromRow(Row row) {
        return mapping.fromRow(row);
    }
}
