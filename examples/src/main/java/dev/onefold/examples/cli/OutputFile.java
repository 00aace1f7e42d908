package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.avro.AvroRecordAccess;
import dev.onefold.avro.ContainerFiles;
import dev.onefold.avro.JsonLines;
import dev.onefold.record.Row;
import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.CharBuffer;
import java.nio.charset.CharacterCodingException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericRecord;

/**
 * A record file being written: JSON lines or an Avro container file, by the target's ending. Records go to a
 * temporary file beside the target, which replaces the target only on {@link #commit()}; closing without a
 * commit deletes it, so a failed run never leaves a half-written output under the target's name.
 *
 * <p>Rows are converted (to JSON text, or to Avro records) in slices on worker threads ({@link SliceWorkers})
 * and written in the order they came; a slice of JSON lines becomes one block of text, written with one call.
 * Single-threaded for the caller; must be closed. Cost: one conversion per record and one write per slice
 * (JSON lines) or per record (Avro).
 */
final class OutputFile implements AutoCloseable {
    private final Path target;
    private final Path temp;
    /** Bytes buffered before the file: a few slices of text, so writes reach the disk in large blocks. */
    private static final int WRITE_BUFFER = 1 << 20;

    private final OutputStream lines;
    private final JsonLines json;
    private final ContainerFiles.Writer avro;
    private final AvroRecordAccess access;
    private final SliceWorkers<Object> workers = new SliceWorkers<>("onefold-output");
    private List<Row> slice = new ArrayList<>(InputFiles.SLICE);
    private long count;
    private boolean committed;

    private OutputFile(Path target, Schema schema, ContainerFiles.Compression compression) {
        this.target = target;
        FileFormat format = FileFormat.of(target);
        Path dir = target.toAbsolutePath().getParent();
        try {
            Files.createDirectories(dir);
            this.temp = Files.createTempFile(dir, "." + target.getFileName(), ".partial");
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, target + ": cannot create: " + e.getMessage(), e);
        }
        if (format == FileFormat.JSON_LINES) {
            this.json = JsonLines.of(schema);
            this.access = null;
            this.avro = null;
            try {
                this.lines = new BufferedOutputStream(Files.newOutputStream(temp), WRITE_BUFFER);
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, target + ": cannot write: " + e.getMessage(), e);
            }
        } else {
            this.json = null;
            this.lines = null;
            this.access = AvroRecordAccess.of(schema);
            this.avro = ContainerFiles.create(temp, schema, compression);
        }
    }

    /** Starts writing records of {@code schema} to {@code target}; {@code compression} applies to .avro targets. */
    static OutputFile create(Path target, Schema schema, ContainerFiles.Compression compression) {
        return new OutputFile(target, schema, compression);
    }

    void write(Row row) {
        slice.add(row);
        count++;
        if (slice.size() == InputFiles.SLICE) {
            submitSlice();
            while (workers.full()) {
                emit(workers.takeOldest());
            }
        }
    }

    private void submitSlice() {
        List<Row> rows = slice;
        slice = new ArrayList<>(InputFiles.SLICE);
        workers.submit(() -> lines != null ? List.of(text(rows)) : records(rows));
    }

    /** The slice's rows as JSON lines in UTF-8, each ended by a line feed. */
    private byte[] text(List<Row> rows) {
        StringBuilder sb = new StringBuilder(rows.size() * 128);
        for (Row r : rows) {
            json.writeRow(r, sb);
            sb.append('\n');
        }
        String text = sb.toString();
        byte[] bytes = text.getBytes(StandardCharsets.UTF_8);
        if (bytes.length != text.length()) {
            refuseUnpairedSurrogates(text);
        }
        return bytes;
    }

    /**
     * getBytes would write an unpaired surrogate (a string read from a "\ud800" escape) as '?': refuse it with the
     * UTF-8 encoder's own error instead, as a character writer does.
     */
    private void refuseUnpairedSurrogates(String text) {
        for (int i = 0; i < text.length(); i++) {
            if (Character.isSurrogate(text.charAt(i))) {
                try {
                    StandardCharsets.UTF_8.newEncoder().encode(CharBuffer.wrap(text));
                } catch (CharacterCodingException e) {
                    throw new OnefoldException(OnefoldException.Kind.IO, target + ": cannot write: " + e.getMessage(), e);
                }
                return;
            }
        }
    }

    private List<Object> records(List<Row> rows) {
        List<Object> out = new ArrayList<>(rows.size());
        for (Row r : rows) {
            out.add(access.fromRow(r));
        }
        return out;
    }

    private void emit(List<Object> converted) {
        for (Object o : converted) {
            if (lines != null) {
                try {
                    lines.write((byte[]) o);
                } catch (IOException e) {
                    throw new OnefoldException(OnefoldException.Kind.IO, target + ": cannot write: " + e.getMessage(), e);
                }
            } else {
                avro.accept((GenericRecord) o);
            }
        }
    }

    long count() {
        return count;
    }

    /** Finishes the file and moves it to the target's name. */
    void commit() {
        if (!slice.isEmpty()) {
            submitSlice();
        }
        while (!workers.isEmpty()) {
            emit(workers.takeOldest());
        }
        closeWriter();
        try {
            Files.move(temp, target, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, target + ": cannot move the finished file into place: "
                    + e.getMessage(), e);
        }
        committed = true;
    }

    private void closeWriter() {
        try {
            if (lines != null) {
                lines.close();
            } else {
                avro.close();
            }
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, target + ": cannot write: " + e.getMessage(), e);
        }
    }

    @Override
    public void close() {
        workers.close();
        if (committed) {
            return;
        }
        try {
            closeWriter();
        } finally {
            try {
                Files.deleteIfExists(temp);
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, temp + ": cannot delete the unfinished file: "
                        + e.getMessage(), e);
            }
        }
    }
}
