package dev.onefold.avro;

import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.AvroErrors;
import dev.onefold.avro.internal.Compatibility;
import dev.onefold.avro.internal.ContainerCheck;
import java.io.IOException;
import java.nio.file.Path;
import java.util.Iterator;
import java.util.Locale;
import java.util.NoSuchElementException;
import java.util.function.Consumer;
import org.apache.avro.AvroRuntimeException;
import org.apache.avro.Schema;
import org.apache.avro.SchemaCompatibility;
import org.apache.avro.file.CodecFactory;
import org.apache.avro.file.DataFileReader;
import org.apache.avro.file.DataFileWriter;
import org.apache.avro.generic.GenericDatumReader;
import org.apache.avro.generic.GenericDatumWriter;
import org.apache.avro.generic.GenericRecord;

/**
 * Import from and export to Avro object container files, the open file format any Avro tool reads: a header
 * with the writer schema and codec name, then blocks of records compressed with that codec.
 *
 * <p>Reading first checks the file's block structure (a truncated or oversized block is a CORRUPT error, where
 * Avro's own reader would stop silently), then resolves the file's schema to a reader schema by Avro's rules (checked first with Avro's
 * compatibility checker, so an incompatible file is refused up front with the reasons); every error names the
 * file and, while iterating, the 0-based index of the record at fault. Writing checks each record against the
 * dataset's schema first, so an export never holds a record that does not conform.
 *
 * <p>Readers and writers are single-threaded and must be closed; the static methods are thread-safe. Cost:
 * linear in the file size plus the codec's work.
 */
public final class ContainerFiles {
    /** Largest block a reader accepts (256 MiB); Avro's writers default to blocks of about 64 KiB. */
    public static final long MAX_BLOCK_BYTES = 256L << 20;

    private ContainerFiles() {}

    /** Block compression of a container file. */
    public enum Compression {
        /** No compression. */
        NULL("null"),
        /** Deflate (RFC 1951) at level 6. */
        DEFLATE("deflate"),
        /** Snappy with a CRC-32 per block; needs snappy-java on the class path. */
        SNAPPY("snappy"),
        /** Zstandard at level 3; needs zstd-jni on the class path. */
        ZSTD("zstandard");

        private final String avroName;
        private volatile Boolean available;

        Compression(String avroName) {
            this.avroName = avroName;
        }

        /** The codec name Avro writes into the file header. */
        public String avroName() {
            return avroName;
        }

        /**
         * Whether the codec's library is on the class path and works on this platform (tried once with a tiny
         * block, then remembered).
         */
        public boolean isAvailable() {
            Boolean a = available;
            if (a == null) {
                Schema probe = Schema.create(Schema.Type.STRING);
                try (DataFileWriter<Object> w = new DataFileWriter<>(new GenericDatumWriter<>(probe))) {
                    w.setCodec(factory());
                    w.create(probe, new java.io.ByteArrayOutputStream());
                    w.append("probe");
                    w.flush();
                    a = true;
                } catch (IOException | RuntimeException | LinkageError e) {
                    // a missing or broken native library shows up here; the codec is reported unavailable
                    a = false;
                }
                available = a;
            }
            return a;
        }

        private CodecFactory factory() {
            return switch (this) {
                case NULL -> CodecFactory.nullCodec();
                case DEFLATE -> CodecFactory.deflateCodec(6);
                case SNAPPY -> CodecFactory.snappyCodec();
                case ZSTD -> CodecFactory.zstandardCodec(3);
            };
        }

        /**
         * The compression for a name: null, deflate, snappy, zstd (or zstandard), case-insensitive.
         *
         * @throws OnefoldException (USAGE) naming the known names
         */
        public static Compression fromName(String name) {
            String n = name.toLowerCase(Locale.ROOT);
            for (Compression c : values()) {
                if (c.name().toLowerCase(Locale.ROOT).equals(n) || c.avroName.equals(n)) {
                    return c;
                }
            }
            throw OnefoldException.usage("unknown compression \"" + name + "\" (known: null, deflate, snappy, zstd)");
        }
    }

    /**
     * Opens a container file for reading, resolving its schema to {@code readerSchema}.
     *
     * @throws OnefoldException (IO) when the file cannot be opened, (CORRUPT) when it is not a container file,
     *     (INVALID_SCHEMA) when its schema cannot be resolved to the reader schema; each naming the file
     */
    public static Reader open(Path file, Schema readerSchema) {
        return new Reader(file, readerSchema);
    }

    /** The writer schema recorded in a container file's header. */
    public static Schema schemaOf(Path file) {
        try (Reader r = new Reader(file, null)) {
            return r.fileSchema();
        }
    }

    /**
     * Creates (or replaces) a container file for records of {@code schema}.
     *
     * @throws OnefoldException (USAGE) when the compression's library is not available, (IO) naming the file
     */
    public static Writer create(Path file, Schema schema, Compression compression) {
        return new Writer(file, schema, compression);
    }

    /** Reads records of a container file as one iteration, resolved to a reader schema. Not thread-safe. */
    public static final class Reader implements Iterator<GenericRecord>, AutoCloseable {
        private final Path file;
        private final DataFileReader<GenericRecord> in;
        private long index;

        private Reader(Path file, Schema readerSchema) {
            this.file = file;
            // Avro's reader ends silently at a truncated block; the structure is checked first so nothing is lost
            ContainerCheck.check(file, MAX_BLOCK_BYTES);
            GenericDatumReader<GenericRecord> datum = new GenericDatumReader<>();
            try {
                in = new DataFileReader<>(file.toFile(), datum);
            } catch (java.io.FileNotFoundException | java.nio.file.NoSuchFileException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "container file " + file + ": cannot open: " + e, e);
            } catch (IOException | AvroRuntimeException e) {
                throw OnefoldException.corrupt("container file " + file + ": not a readable Avro container file: " + e.getMessage());
            }
            if (readerSchema != null) {
                Schema writer = in.getSchema();
                SchemaCompatibility.SchemaPairCompatibility c = SchemaCompatibility.checkReaderWriterCompatibility(readerSchema,
                        writer);
                if (c.getType() != SchemaCompatibility.SchemaCompatibilityType.COMPATIBLE) {
                    closeQuietlyAfterFailure();
                    throw AvroErrors.schema("container file " + file + ": its schema " + writer.getFullName()
                            + " cannot be resolved to " + readerSchema.getFullName() + ": " + Compatibility.reasons(c.getResult()));
                }
                datum.setExpected(readerSchema);
            }
        }

        private void closeQuietlyAfterFailure() {
            try {
                in.close();
            } catch (IOException suppressed) {
                // the compatibility error being thrown is the one worth reporting
            }
        }

        /** The writer schema in the file's header. */
        public Schema fileSchema() {
            return in.getSchema();
        }

        /** The codec name in the file's header. */
        public String codecName() {
            String c = in.getMetaString("avro.codec");
            return c == null ? "null" : c;
        }

        @Override
        public boolean hasNext() {
            try {
                return in.hasNext();
            } catch (AvroRuntimeException e) {
                throw failure(e);
            }
        }

        @Override
        public GenericRecord next() {
            if (!hasNext()) {
                throw new NoSuchElementException("container file " + file + " has no more records");
            }
            try {
                GenericRecord r = in.next();
                index++;
                return r;
            } catch (AvroRuntimeException e) {
                throw failure(e);
            }
        }

        private OnefoldException failure(RuntimeException e) {
            return OnefoldException.corrupt("container file " + file + ": record " + index + " cannot be read: "
                    + (e.getCause() != null ? e.getCause().toString() : e.getMessage()));
        }

        @Override
        public void close() {
            try {
                in.close();
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "container file " + file + ": cannot close: " + e, e);
            }
        }
    }

    /** Appends records to a new container file. Not thread-safe. */
    public static final class Writer implements Consumer<GenericRecord>, AutoCloseable {
        private final Path file;
        private final AvroRecordAccess access;
        private final DataFileWriter<GenericRecord> out;
        private long count;

        private Writer(Path file, Schema schema, Compression compression) {
            this.file = file;
            this.access = AvroRecordAccess.of(schema);
            if (!compression.isAvailable()) {
                throw OnefoldException.usage("compression " + compression.name().toLowerCase(Locale.ROOT)
                        + " is not available: add its library (snappy-java or zstd-jni) to the class path, or choose null or deflate");
            }
            out = new DataFileWriter<>(new GenericDatumWriter<GenericRecord>(schema));
            out.setCodec(compression.factory());
            try {
                out.create(schema, file.toFile());
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "container file " + file + ": cannot create: " + e, e);
            }
        }

        /**
         * Appends one record after checking it against the schema.
         *
         * @throws OnefoldException (INVALID_RECORD) naming the file, the record index and the field path
         */
        @Override
        public void accept(GenericRecord record) {
            try {
                access.toRow(record);
            } catch (OnefoldException e) {
                throw OnefoldException.record("container file " + file + ": record " + count + ": " + e.getMessage());
            }
            try {
                out.append(record);
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "container file " + file + ": cannot write: " + e, e);
            }
            count++;
        }

        /** Records appended so far. */
        public long count() {
            return count;
        }

        @Override
        public void close() {
            try {
                out.close();
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "container file " + file + ": cannot close: " + e, e);
            }
        }
    }
}
