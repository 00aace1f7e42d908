package dev.onefold.avro;

import dev.onefold.avro.internal.DirectorySchemaStore;
import dev.onefold.avro.internal.Fingerprints;
import java.nio.file.Path;
import java.util.Collection;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.avro.Schema;

/**
 * Where the payload codec finds writer schemas: by the CRC-64-AVRO fingerprint of their Parsing Canonical Form,
 * the fingerprint every single-object payload carries. Schemas with equal canonical forms are interchangeable
 * as writer schemas (the canonical form keeps everything that decides the bytes).
 *
 * <p>Implementations must be thread-safe; a lookup should cost no more than a map lookup in the common case.
 */
@FunctionalInterface
public interface SchemaStore {

    /** The schema with this fingerprint, or null when the store does not know it. */
    Schema find(long fingerprint);

    /**
     * A fixed set of schemas held in memory; the first of several with one fingerprint wins. Immutable.
     * Building costs one fingerprint per schema.
     */
    static SchemaStore inMemory(Collection<Schema> schemas) {
        Map<Long, Schema> byFingerprint = new LinkedHashMap<>();
        for (Schema s : schemas) {
            byFingerprint.putIfAbsent(Fingerprints.of(s), s);
        }
        Map<Long, Schema> frozen = Map.copyOf(byFingerprint);
        return frozen::get;
    }

    static SchemaStore inMemory(Schema... schemas) {
        return inMemory(List.of(schemas));
    }

    /**
     * The {@code .avsc} files of a directory (not its subdirectories), each holding one schema. The directory
     * is read when the store is created and read again when a fingerprint is missing and the directory
     * changed since, so schemas added later are found.
     *
     * @throws dev.onefold.OnefoldException (IO) when the directory cannot be read, (INVALID_SCHEMA) naming the
     *     file when a file is not a valid schema
     */
    static SchemaStore directory(Path dir) {
        return new DirectorySchemaStore(dir);
    }
}
