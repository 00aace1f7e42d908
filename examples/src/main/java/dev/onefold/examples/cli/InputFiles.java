package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.avro.AvroRecordAccess;
import dev.onefold.avro.ContainerFiles;
import dev.onefold.record.Row;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Iterator;
import java.util.List;
import java.util.NoSuchElementException;
import java.util.function.Supplier;
import org.apache.avro.generic.GenericRecord;

/**
 * Reads record files ({@code .jsonl} and {@code .avro}, by ending) one after another as one stream of
 * {@link InputRecord}s, in file order and, within a file, in line or record order.
 *
 * <h2>Streaming and parallelism</h2>
 * JSON lines are read as blocks of whole lines of bytes ({@link LineBlocks}) and each block is decoded and parsed
 * into rows on a worker thread ({@link SliceWorkers}) while the caller consumes earlier blocks, so memory is
 * bounded by the blocks ahead, never by the file. Avro records are decoded on the caller's thread (Avro's reader
 * is sequential) and converted to rows on the workers. The output order is the input order whatever the timing.
 *
 * <h2>Errors</h2>
 * A line or record that cannot be read into a row of the dataset's schema becomes an unreadable input record
 * carrying the reason, naming the file, the line and the field, so the engine rejects it and carries on. A file
 * that cannot be opened or read at all (missing, not UTF-8, a corrupt container file) is an OnefoldException
 * naming the file, which ends the run.
 *
 * <p>Single-threaded for the caller; must be closed, which stops the workers. Cost: linear in the input.
 */
final class InputFiles implements Iterator<InputRecord>, AutoCloseable {
    static final int SLICE = 2048;

    private final List<Path> files;
    private final LineParser lines;
    private final AvroRecordAccess target;
    private final Progress progress;
    private final SliceWorkers<InputRecord> workers = new SliceWorkers<>("onefold-input");
    private Iterator<InputRecord> current = Collections.emptyIterator();
    private int nextFile;
    private String fileName;
    private LineBlocks lineBlocks;
    private ContainerFiles.Reader avroReader;
    private long index;
    private boolean inputDone;

    /** Reads one JSON line into a row of the dataset's schema; thread-safe, called on the workers. */
    @FunctionalInterface
    interface LineParser {
        /**
         * @param where names the line (file and line number), built only when needed for a message
         * @throws OnefoldException (INVALID_RECORD) naming {@code where}, the field and the reason
         */
        Row parse(String line, Supplier<String> where);
    }

    /**
     * @param files  the files, each ending in .jsonl or .avro
     * @param lines  reads JSON lines, written under the files' schema, into rows of the target schema
     * @param target reads records of the dataset's schema into rows; Avro files are resolved to its schema
     */
    InputFiles(List<Path> files, LineParser lines, AvroRecordAccess target, Progress progress) {
        this.files = List.copyOf(files);
        this.lines = lines;
        this.target = target;
        this.progress = progress;
    }

    /**
     * Checks before any work starts that every file has a known ending and can be read, so a typo ends the run
     * before an output is half written.
     *
     * @throws OnefoldException (USAGE) for an unknown ending, (IO) naming a file that is missing or unreadable
     */
    static void checkReadable(List<Path> files) {
        for (Path f : files) {
            FileFormat.of(f);
            if (!Files.isRegularFile(f)) {
                throw new OnefoldException(OnefoldException.Kind.IO, f + ": no such file");
            }
            if (!Files.isReadable(f)) {
                throw new OnefoldException(OnefoldException.Kind.IO, f + ": cannot read (permission denied)");
            }
        }
    }

    @Override
    public boolean hasNext() {
        while (!current.hasNext()) {
            fill();
            if (workers.isEmpty()) {
                if (!inputDone) {
                    inputDone = true;
                    progress.inputDone();
                }
                return false;
            }
            current = workers.takeOldest().iterator();
        }
        return true;
    }

    @Override
    public InputRecord next() {
        if (!hasNext()) {
            throw new NoSuchElementException("no more input records");
        }
        progress.recordRead();
        return current.next();
    }

    /** Starts slices until enough are in flight or the input is exhausted. */
    private void fill() {
        while (!workers.full()) {
            if (lineBlocks == null && avroReader == null && !openNext()) {
                return;
            }
            if (lineBlocks != null) {
                readLines();
            } else {
                readAvro();
            }
        }
    }

    private boolean openNext() {
        if (nextFile >= files.size()) {
            return false;
        }
        Path file = files.get(nextFile++);
        fileName = file.toString();
        index = 0;
        if (FileFormat.of(file) == FileFormat.JSON_LINES) {
            lineBlocks = LineBlocks.open(file);
        } else {
            avroReader = ContainerFiles.open(file, target.avroSchema());
        }
        return true;
    }

    private void readLines() {
        LineBlocks.Block block = lineBlocks.next();
        if (block == null) {
            lineBlocks.close();
            lineBlocks = null;
        } else if (block.count() > 0) {
            workers.submit(() -> parseLines(block));
        }
    }

    private List<InputRecord> parseLines(LineBlocks.Block block) {
        List<InputRecord> out = new ArrayList<>(block.count());
        String file = block.file();
        for (int i = 0; i < block.count(); i++) {
            long line = block.numbers()[i];
            long at = block.firstIndex() + i;
            String text = block.text(i);
            try {
                out.add(InputRecord.read(file, line, at, lines.parse(text, () -> file + " line " + line)));
            } catch (OnefoldException e) {
                if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                    throw e;
                }
                String where = file + " line " + line;
                String reason = e.getMessage().startsWith(where) ? e.getMessage() : where + ": " + e.getMessage();
                out.add(InputRecord.unreadable(file, line, at, reason, text));
            }
        }
        return out;
    }

    private void readAvro() {
        List<GenericRecord> records = new ArrayList<>(SLICE);
        while (records.size() < SLICE && avroReader.hasNext()) {
            records.add(avroReader.next());
        }
        if (records.size() < SLICE) {
            avroReader.close();
            avroReader = null;
        }
        long firstIndex = index;
        index += records.size();
        if (!records.isEmpty()) {
            String file = fileName;
            workers.submit(() -> convertRecords(file, records, firstIndex));
        }
    }

    private List<InputRecord> convertRecords(String file, List<GenericRecord> records, long firstIndex) {
        List<InputRecord> out = new ArrayList<>(records.size());
        for (int i = 0; i < records.size(); i++) {
            long at = firstIndex + i;
            try {
                out.add(InputRecord.read(file, -1, at, target.toRow(records.get(i))));
            } catch (OnefoldException e) {
                if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                    throw e;
                }
                out.add(InputRecord.unreadable(file, -1, at, file + " record " + at + ": " + e.getMessage(),
                        String.valueOf(records.get(i))));
            }
        }
        return out;
    }

    @Override
    public void close() {
        workers.close();
        try {
            if (lineBlocks != null) {
                lineBlocks.close();
            }
        } finally {
            lineBlocks = null;
            if (avroReader != null) {
                avroReader.close();
                avroReader = null;
            }
        }
    }
}
