package dev.onefold.spi;

import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;

/**
 * How onefold reads a user's record type and builds records of it: every record is read once into onefold's
 * neutral {@link Row} (from which the engine extracts key, version, clock, order, tombstone and field values
 * through paths resolved once per schema), and merged results are turned back into the user's type.
 *
 * <p>Let {@code a} be a RecordAccess and {@code r} a record it accepts; then
 * {@code a.toRow(a.fromRow(a.toRow(r))).equals(a.toRow(r))}.
 *
 * <p>Implementations must be thread-safe: the engine may call them from several threads. Cost: one
 * conversion per record in each direction.
 */
public interface RecordAccess<R> {

    /** The schema every row produced by {@link #toRow} has. */
    RowSchema schema();

    /**
     * Reads one record.
     *
     * @throws dev.onefold.OnefoldException (INVALID_RECORD) naming the field path and reason when the record
     *     does not fit the schema; the batch engine turns it into a rejection
     */
    Row toRow(R record);

    /** Builds a record of the user's type from a row of {@link #schema()}. */
    R fromRow(Row row);

    /** Access for onefold's own {@link Row}: both conversions check the schema and return the row itself. */
    static RecordAccess<Row> rows(RowSchema schema) {
        return new RecordAccess<>() {
            @Override
            public RowSchema schema() {
                return schema;
            }

            @Override
            public Row toRow(Row record) {
                if (record.schema() != schema && !record.schema().equals(schema)) {
                    throw dev.onefold.OnefoldException.record("record of schema " + record.schema().name()
                            + " does not have the dataset's schema " + schema.name());
                }
                return record;
            }

            @Override
            public Row fromRow(Row row) {
                return row;
            }
        };
    }
}
