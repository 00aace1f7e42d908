package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.archive.Archive;
import dev.onefold.avro.AvroDataset;
import dev.onefold.avro.AvroPayloadCodec;
import dev.onefold.avro.AvroRecordAccess;
import dev.onefold.avro.DecodeLimits;
import dev.onefold.avro.JsonLines;
import dev.onefold.avro.SchemaVersions;
import dev.onefold.record.Row;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.function.Supplier;
import java.util.function.UnaryOperator;
import java.util.stream.Stream;
import org.apache.avro.AvroRuntimeException;
import org.apache.avro.Schema;
import org.apache.avro.SchemaFormatter;
import org.apache.avro.generic.GenericRecord;

/**
 * An archive directory as the command-line tool keeps it: the archive's own files ({@code manifests/},
 * {@code chunks/}) plus {@code schemas/}, the dataset's Avro schema versions with the spec embedded
 * ({@code 0001.avsc}, {@code 0002.avsc}, ... in the order they were registered). So {@code export},
 * {@code verify} and {@code reconcile} need nothing but the directory, records are stored as Avro payloads
 * ({@link AvroPayloadCodec}), and payloads written under an older schema version are read under the newest.
 *
 * <p>Invariants: every registered version passed {@link SchemaVersions}' compatibility gate against all earlier
 * ones; the spec never changes except for its checks. A version file is created exclusively and never
 * rewritten, so two runs registering at once cannot overwrite each other (the loser is told to run again).
 *
 * <p>Thread-safe as the archive is. Opening costs reading the schema files and one compatibility check per
 * version.
 */
public final class ArchiveDirectory {
    static final String SCHEMAS = "schemas";

    private final Path dir;
    private final SchemaVersions versions;
    private final Archive<InputRecord> archive;

    private ArchiveDirectory(Path dir, SchemaVersions versions) {
        this.dir = dir;
        this.versions = versions;
        AvroDataset d = versions.dataset();
        this.archive = Archive.builder(d.spec(), InputRecord.access(d.access().schema())).directory(dir)
                .codec(versions.codec(DecodeLimits.DEFAULT)).open();
    }

    /**
     * Opens an archive directory made by {@code apply}.
     *
     * @throws OnefoldException (USAGE) when the directory does not exist or holds no archive made by the tool,
     *     (INVALID_SCHEMA) naming a schema file that is damaged
     */
    public static ArchiveDirectory open(Path dir) {
        if (!Files.isDirectory(dir)) {
            throw OnefoldException.usage(dir + ": no such archive directory");
        }
        List<Schema> schemas = readVersions(dir);
        if (schemas.isEmpty()) {
            throw OnefoldException.usage(dir + ": not an archive made by onefold (no " + SCHEMAS
                    + "/*.avsc); create one with 'onefold apply'");
        }
        return new ArchiveDirectory(dir, SchemaVersions.of(schemas, null));
    }

    /**
     * Opens the archive directory that records of {@code input} are applied to: creates it on first use; registers
     * the input's schema as the newest version when it is new and passes the compatibility gate; accepts an
     * older registered version (its records are resolved to the newest, see {@link #fromSchema}).
     *
     * @throws OnefoldException (INVALID_SPEC) when the input's spec differs from the archive's, (INVALID_SCHEMA)
     *     listing every reason a new schema version is refused
     */
    public static ArchiveDirectory forApply(Path dir, AvroDataset input) {
        try {
            Files.createDirectories(dir.resolve(SCHEMAS));
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, dir + ": cannot create archive directory: " + e.getMessage(), e);
        }
        Schema withSpec = AvroDataset.withEmbeddedSpec(input.schema(), input.spec());
        List<Schema> schemas = readVersions(dir);
        if (schemas.isEmpty()) {
            if (Files.isDirectory(dir.resolve("manifests"))) {
                throw OnefoldException.usage(dir + ": holds an archive without " + SCHEMAS
                        + "/ (not made by the onefold tool); the tool cannot tell its schema");
            }
            register(dir, 1, withSpec);
            return new ArchiveDirectory(dir, SchemaVersions.first(withSpec, null));
        }
        SchemaVersions versions = SchemaVersions.of(schemas, null);
        long fingerprint = AvroPayloadCodec.fingerprint(input.schema());
        boolean known = schemas.stream().anyMatch(s -> AvroPayloadCodec.fingerprint(s) == fingerprint);
        if (!known) {
            versions = versions.register(withSpec);
            register(dir, schemas.size() + 1, withSpec);
        }
        if (!versions.spec().equals(input.spec())) {
            throw OnefoldException.spec(dir + ": the archive's spec " + versions.spec().toJson()
                    + " differs from the given spec " + input.spec().toJson()
                    + "; an archive keeps one spec (only its checks may change with a new schema version)");
        }
        return new ArchiveDirectory(dir, versions);
    }

    private static List<Schema> readVersions(Path dir) {
        Path schemaDir = dir.resolve(SCHEMAS);
        if (!Files.isDirectory(schemaDir)) {
            return List.of();
        }
        List<Path> files;
        try (Stream<Path> s = Files.list(schemaDir)) {
            files = s.filter(p -> p.getFileName().toString().matches("\\d{4,}\\.avsc")).sorted().toList();
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, schemaDir + ": cannot list: " + e.getMessage(), e);
        }
        List<Schema> out = new ArrayList<>(files.size());
        for (Path f : files) {
            try {
                out.add(new Schema.Parser().parse(Files.readString(f)));
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, f + ": cannot read: " + e.getMessage(), e);
            } catch (AvroRuntimeException e) {
                throw new OnefoldException(OnefoldException.Kind.INVALID_SCHEMA, f + ": not a valid Avro schema: "
                        + e.getMessage(), e);
            }
        }
        return out;
    }

    private static void register(Path dir, int number, Schema schema) {
        Path target = dir.resolve(SCHEMAS).resolve(String.format("%04d.avsc", number));
        try {
            Path temp = Files.createTempFile(target.getParent(), ".register", ".tmp");
            try {
                Files.writeString(temp, SchemaFormatter.format("json/pretty", schema) + "\n", StandardCharsets.UTF_8);
                Files.createLink(target, temp);
            } finally {
                Files.deleteIfExists(temp);
            }
        } catch (FileAlreadyExistsException e) {
            throw new OnefoldException(OnefoldException.Kind.CONCURRENT_COMMIT, target
                    + ": another run registered a schema version at the same time; run again", e);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, target + ": cannot write schema version: " + e.getMessage(), e);
        }
    }

    public Path directory() {
        return dir;
    }

    /** The dataset at the newest schema version. */
    public AvroDataset dataset() {
        return versions.dataset();
    }

    public Archive<InputRecord> archive() {
        return archive;
    }

    /**
     * How to read JSON lines written under {@code writer}, a registered schema version: the parser for that
     * version and the step that turns its records into records of the newest version (Avro's schema resolution;
     * nothing for the newest version itself, whose records are parsed with the archive's own copy of it).
     * Thread-safe.
     */
    public InputSchema inputSchema(Schema writer) {
        Schema newest = versions.latest();
        if (AvroPayloadCodec.fingerprint(writer) == AvroPayloadCodec.fingerprint(newest)) {
            return new InputSchema(JsonLines.of(newest), UnaryOperator.identity(), true);
        }
        AvroPayloadCodec from = AvroPayloadCodec.of(writer);
        AvroPayloadCodec to = versions.codec(DecodeLimits.DEFAULT);
        return new InputSchema(JsonLines.of(writer), record -> to.decodeRecord(from.encodeRecord(record)), false);
    }

    /**
     * A JSON lines parser for one schema version and the step from its records to the newest version's;
     * {@code isNewest} when the version is the newest itself (the step is then the identity).
     */
    public record InputSchema(JsonLines lines, UnaryOperator<GenericRecord> toNewest, boolean isNewest) {
        /**
         * One line of this version as a row of the newest version: read straight into a row when this is the
         * newest version, else parsed into a record and resolved through Avro.
         *
         * @param where names the line in errors; asked for only when needed
         * @throws dev.onefold.OnefoldException (INVALID_RECORD) naming {@code where}, the field and the reason
         */
        public Row parseRow(String line, Supplier<String> where, AvroRecordAccess newest) {
            return isNewest ? lines.parseRow(line, where) : newest.toRow(toNewest.apply(lines.parse(line, where.get())));
        }
    }
}
