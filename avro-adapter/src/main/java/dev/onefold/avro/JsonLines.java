package dev.onefold.avro;

import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.JsonValues;
import dev.onefold.internal.json.Json;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.util.Map;
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
 * <p>Immutable and thread-safe; each conversion is linear in the line's length.
 */
public final class JsonLines {
    private final AvroRecordAccess access;

    private JsonLines(AvroRecordAccess access) {
        this.access = access;
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
        try {
            Object json = Json.parse(line, where);
            if (!(json instanceof Map)) {
                throw OnefoldException.record("a line must hold one JSON object");
            }
            return (GenericRecord) JsonValues.toAvro(access.avroSchema(), json, "");
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

    private static String writeRow(Row row) {
        return Json.write(JsonValues.fromRow(row));
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
                return access.toRow(parse(line, "line"));
            }

            @Override
            public String fromRow(Row row) {
                return writeRow(row);
            }
        };
    }
}
