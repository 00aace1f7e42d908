package dev.onefold.avro.internal;

import dev.onefold.OnefoldException;
import dev.onefold.avro.SchemaStore;
import java.io.IOException;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.FileTime;
import java.util.ArrayList;
import java.util.Collections;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import org.apache.avro.Schema;
import org.apache.avro.AvroRuntimeException;

/**
 * A {@link SchemaStore} over the {@code .avsc} files of one directory. Files are read in name order so the
 * first file wins when two share a fingerprint. A miss re-reads the directory only when its modification time
 * changed, so unknown fingerprints in hostile input cost one file-system stat, not a directory scan.
 *
 * <p>Thread-safe: the index is replaced as a whole under a lock and read without one.
 */
public final class DirectorySchemaStore implements SchemaStore {
    private final Path dir;
    private volatile Map<Long, Schema> index;
    private volatile FileTime indexedAt;

    public DirectorySchemaStore(Path dir) {
        this.dir = Objects.requireNonNull(dir, "dir");
        reindex();
    }

    @Override
    public Schema find(long fingerprint) {
        Schema s = index.get(fingerprint);
        if (s == null && !modifiedTime().equals(indexedAt)) {
            synchronized (this) {
                if (!modifiedTime().equals(indexedAt)) {
                    reindex();
                }
            }
            s = index.get(fingerprint);
        }
        return s;
    }

    private synchronized void reindex() {
        FileTime stamp = modifiedTime();
        List<Path> files = new ArrayList<>();
        try (DirectoryStream<Path> ds = Files.newDirectoryStream(dir, "*.avsc")) {
            for (Path p : ds) {
                if (Files.isRegularFile(p)) {
                    files.add(p);
                }
            }
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "schema directory " + dir + ": cannot list: " + e, e);
        }
        Collections.sort(files);
        Map<Long, Schema> next = new HashMap<>();
        for (Path p : files) {
            Schema s = parse(p);
            next.putIfAbsent(Fingerprints.of(s), s);
        }
        index = Map.copyOf(next);
        indexedAt = stamp;
    }

    private static Schema parse(Path file) {
        String text;
        try {
            text = Files.readString(file);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "schema file " + file + ": cannot read: " + e, e);
        }
        try {
            return new Schema.Parser().parse(text);
        } catch (AvroRuntimeException e) {
            throw AvroErrors.schema("schema file " + file + ": not a valid Avro schema: " + e.getMessage());
        }
    }

    private FileTime modifiedTime() {
        try {
            return Files.getLastModifiedTime(dir);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "schema directory " + dir + ": cannot read: " + e, e);
        }
    }
}
