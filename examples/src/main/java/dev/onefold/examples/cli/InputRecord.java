package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;

/**
 * One record as the tool handles it: where it came from (file and line of a JSON lines file, or file and record
 * index of an Avro container file) and its row, or, when it could not be read, the reason and its raw text.
 * Records the engine builds for output carry only a row.
 *
 * <p>The raw text is kept only for records that could not be read, so a batch held by the engine costs its
 * rows plus a few fields per record. Immutable and thread-safe.
 */
public final class InputRecord {
    private final String file;
    private final long line;
    private final long index;
    private final Row row;
    private final String error;
    private final String text;

    private InputRecord(String file, long line, long index, Row row, String error, String text) {
        this.file = file;
        this.line = line;
        this.index = index;
        this.row = row;
        this.error = error;
        this.text = text;
    }

    static InputRecord read(String file, long line, long index, Row row) {
        return new InputRecord(file, line, index, row, null, null);
    }

    static InputRecord unreadable(String file, long line, long index, String error, String text) {
        return new InputRecord(file, line, index, null, error, text);
    }

    static InputRecord of(Row row) {
        return new InputRecord(null, -1, -1, row, null, null);
    }

    /** The file it came from, or null for a record the engine built. */
    public String file() { return file; }

    /** Its 1-based line in a JSON lines file, or -1. */
    public long line() { return line; }

    /** Its 0-based record index in its file. */
    public long index() { return index; }

    /** Its row, or null when it could not be read. */
    public Row row() { return row; }

    /** The raw text of a line that could not be read, or null. */
    String text() { return text; }

    /**
     * Record access over input records: {@code toRow} returns the row read from the file or throws the reason
     * it could not be read (INVALID_RECORD, so the engine rejects it and carries on); {@code fromRow} wraps a
     * row. Thread-safe.
     */
    static RecordAccess<InputRecord> access(RowSchema schema) {
        return new RecordAccess<>() {
            @Override
            public RowSchema schema() {
                return schema;
            }

            @Override
            public Row toRow(InputRecord record) {
                if (record.row == null) {
                    throw OnefoldException.record(record.error);
                }
                return record.row;
            }

            @Override
            public InputRecord fromRow(Row row) {
                return of(row);
            }
        };
    }
}
