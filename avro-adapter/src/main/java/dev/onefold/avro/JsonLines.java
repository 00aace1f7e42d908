package dev.onefold.avro;

import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.JsonRowReader;
import dev.onefold.avro.internal.JsonRowWriter;
import dev.onefold.avro.internal.JsonValues;
import dev.onefold.internal.json.Json;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.util.Map;
import java.util.function.Supplier;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericRecord;

/**
 * JSON lines for Avro records of one schema: one JSON object per line, in plain JSON (nulls for empty nullable
 * fields, maps as objects, arrays as arrays, timestamps and dates as ISO-8601 text, bytes as base64), with
 * Avro's own tagged-union form also accepted on input. Fields missing from a line take their schema default,
 * or null when nullable; unknown fields are refused.
 *
 * <p>Errors are INVALID_RECORD and name where the line came from, the field path and the reason. Writing a
 * record and parsing the line gives back an equal record.
 *
 * <p>Lines are read straight into rows in one pass ({@link #parseRow}); a line that is malformed, does not
 * conform, or uses a rare shape (a tagged union of a record or map, a missing field with a non-scalar default)
 * is read again through the generic JSON reader, which gives the result or the precise error, so both paths
 * always agree. Rows are written straight to text ({@link #writeRow(Row, StringBuilder)}).
 *
 * <p>Immutable and thread-safe; each conversion is linear in the line's length.
 */
public final class JsonLines {
    private final AvroRecordAccess access;
    private final JsonRowReader reader;

    private JsonLines(AvroRecordAccess access) {
        this.access = access;
        this.reader = JsonRowReader.of(access.avroSchema(), access.schema());
    }

    /** JSON lines for records of a record schema (INVALID_SCHEMA as for {@link AvroRecordAccess#of}). */
    public static JsonLines of(Schema schema) {
        return new JsonLines(AvroRecordAccess.of(schema));
    }

    public Schema schema() {
        return access.avroSchema();
    }

    /**
     * Parses one line into a record of the schema.
     *
     * @param where names the line in errors, for example {@code "readings.jsonl line 7"}
     * @throws OnefoldException (INVALID_RECORD) naming {@code where}, the field path and the reason
     */
    public GenericRecord parse(String line, String where) {
        return access.fromRow(parseRow(line, where));
    }

    /**
     * Parses one line into a row of {@link #rowSchema()}: the same row as {@code parse} then
     * {@link AvroRecordAccess#toRow}, without building the Avro record.
     *
     * @param where names the line in errors, for example {@code "readings.jsonl line 7"}
     * @throws OnefoldException (INVALID_RECORD) naming {@code where}, the field path and the reason
     */
    public Row parseRow(String line, String where) {
        Row row = reader.read(line);
        return row != null ? row : parseGenericRow(line, where);
    }

    /**
     * As {@link #parseRow(String, String)}, asking for the line's name only when the line is refused or needs the
     * generic path, so reading good lines builds no message text.
     */
    public Row parseRow(String line, Supplier<String> where) {
        Row row = reader.read(line);
        return row != null ? row : parseGenericRow(line, where.get());
    }

    /**
     * The generic path: the whole line as JSON values, then the Avro record they describe, then its row. Package
     * access so tests can hold the direct reader to it.
     */
    Row parseGenericRow(String line, String where) {
        try {
            Object json = Json.parse(line, where);
            if (!(json instanceof Map)) {
                throw OnefoldException.record("a line must hold one JSON object");
            }
            return access.toRow((GenericRecord) JsonValues.toAvro(access.avroSchema(), json, ""));
        } catch (OnefoldException e) {
            String m = e.getMessage();
            throw OnefoldException.record(m.startsWith(where) ? m : where + ": " + m);
        }
    }

    /**
     * Writes a record as one line of JSON (no line break).
     *
     * @throws OnefoldException (INVALID_RECORD) naming the field path when the record does not conform
     */
    public String write(GenericRecord record) {
        return writeRow(access.toRow(record));
    }

    /** The row schema of the records: what {@link #parseRow} returns and {@link #writeRow} takes. */
    public RowSchema rowSchema() {
        return access.schema();
    }

    /** Writes a row of {@link #rowSchema()} as one line of JSON (no line break). */
    public String writeRow(Row row) {
        StringBuilder sb = new StringBuilder(256);
        writeRow(row, sb);
        return sb.toString();
    }

    /** Appends a row of {@link #rowSchema()} as one line of JSON (no line break) to {@code sb}. */
    public void writeRow(Row row, StringBuilder sb) {
        JsonRowWriter.write(row, sb);
    }

    /**
     * Record access over JSON lines, for feeding lines to a batch engine: a line that does not parse or conform
     * is rejected with the reason (its position is the line's 0-based index in the input), and survivors come
     * back as lines.
     */
    public RecordAccess<String> lineAccess() {
        return new RecordAccess<>() {
            @Override
            public RowSchema schema() {
                return access.schema();
            }

            @Override
            public Row toRow(String line) {
                return parseRow(line, "line");
            }

            @Override
            public String fromRow(Row row) {
                return writeRow(row);
            }
        };
    }
}
