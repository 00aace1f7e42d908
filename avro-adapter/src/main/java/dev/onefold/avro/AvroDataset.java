package dev.onefold.avro;

import dev.onefold.BatchEngine;
import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.AvroErrors;
import dev.onefold.avro.internal.SpecChecks;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.internal.json.Json;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Optional;
import org.apache.avro.AvroRuntimeException;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericRecord;

/**
 * One dataset of Avro records: the record schema, the {@link DatasetSpec} checked against it, and the record
 * access, payload codec and batch engine built from them. The front door of the Avro adapter.
 *
 * <p>The spec may live inside the schema, as the custom attribute {@value #SPEC_ATTRIBUTE} on the record schema
 * holding the same JSON object as a spec file (Avro keeps unknown attributes and ignores them), so one
 * {@code .avsc} declares both the shape and the rules:
 * <pre>{@code
 * {"type": "record", "name": "Reading", "fields": [...],
 *  "onefold": {"key": ["sensor"], "merge": {"policy": "last-writer", "version": "seq"}}}
 * }</pre>
 * A separate spec still works; when both are present they must be equal, and an error lists every entry on
 * which they differ.
 *
 * <p>Creating a dataset checks that every field the spec names exists in the schema and fits its role (key:
 * orderable and not nullable unless null keys are allowed; version: non-null int or long; clock: map of long;
 * order: a primitive or logical type; tombstone: boolean), with messages that name the Avro field path and
 * type. Immutable and thread-safe; creation costs one pass over the schema and the spec.
 */
public final class AvroDataset {
    /** The record-schema attribute that carries an embedded spec. */
    public static final String SPEC_ATTRIBUTE = "onefold";

    private final Schema schema;
    private final DatasetSpec spec;
    private final AvroRecordAccess access;

    private AvroDataset(Schema schema, DatasetSpec spec) {
        this.schema = schema;
        this.spec = spec;
        this.access = AvroRecordAccess.of(schema);
        List<String> problems = SpecChecks.problems(spec, schema);
        if (!problems.isEmpty()) {
            throw OnefoldException.spec("spec does not fit Avro schema " + schema.getFullName() + ": "
                    + String.join("; ", problems));
        }
        BoundDataset.bind(spec, access.schema());
    }

    /**
     * A dataset whose spec is embedded in the schema.
     *
     * @throws OnefoldException (INVALID_SPEC) when the schema has no embedded spec or it does not fit,
     *     (INVALID_SCHEMA) when the schema has a shape with no neutral form
     */
    public static AvroDataset of(Schema schema) {
        return of(schema, null);
    }

    /**
     * A dataset from a schema and a separate spec; either may carry the spec, and when both do they must agree.
     *
     * @param specFile the separate spec, or null to use the embedded one
     * @throws OnefoldException (INVALID_SPEC) when neither carries a spec, when both do and differ (listing
     *     each differing entry), or when the spec does not fit the schema
     */
    public static AvroDataset of(Schema schema, DatasetSpec specFile) {
        Objects.requireNonNull(schema, "schema");
        Optional<DatasetSpec> embedded = embeddedSpec(schema);
        if (embedded.isEmpty() && specFile == null) {
            throw OnefoldException.spec("schema " + schema.getFullName() + " has no \"" + SPEC_ATTRIBUTE
                    + "\" attribute and no spec file was given; a dataset needs a spec");
        }
        if (embedded.isPresent() && specFile != null && !embedded.get().equals(specFile)) {
            throw OnefoldException.spec("the spec embedded in schema " + schema.getFullName() + " and the spec file disagree: "
                    + String.join("; ", SpecChecks.differences(embedded.get(), "schema", specFile, "spec file")));
        }
        return new AvroDataset(schema, specFile != null ? specFile : embedded.get());
    }

    /**
     * Reads a dataset from an {@code .avsc} file and an optional spec file.
     *
     * @param specFile a JSON spec file, or null to use the spec embedded in the schema
     * @throws OnefoldException (IO) when a file cannot be read, (INVALID_SCHEMA) naming the file when it is not
     *     a valid schema, and as {@link #of(Schema, DatasetSpec)}
     */
    public static AvroDataset read(Path schemaFile, Path specFile) {
        Schema schema;
        try {
            schema = new Schema.Parser().parse(Files.readString(schemaFile));
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "schema file " + schemaFile + ": cannot read: " + e, e);
        } catch (AvroRuntimeException e) {
            throw AvroErrors.schema("schema file " + schemaFile + ": not a valid Avro schema: " + e.getMessage());
        }
        DatasetSpec spec = null;
        if (specFile != null) {
            try {
                spec = DatasetSpec.fromJson(Files.readString(specFile), specFile.toString());
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, "spec file " + specFile + ": cannot read: " + e, e);
            }
        }
        return of(schema, spec);
    }

    /**
     * The spec embedded in a record schema's {@value #SPEC_ATTRIBUTE} attribute (a JSON object, or a string
     * holding one), if any.
     *
     * @throws OnefoldException (INVALID_SPEC) naming the schema when the attribute is not a valid spec
     */
    public static Optional<DatasetSpec> embeddedSpec(Schema schema) {
        Object value = schema.getObjectProp(SPEC_ATTRIBUTE);
        if (value == null) {
            return Optional.empty();
        }
        String source = "schema " + schema.getFullName() + " attribute \"" + SPEC_ATTRIBUTE + "\"";
        if (value instanceof Map<?, ?> m) {
            return Optional.of(DatasetSpec.fromMap(m, source));
        }
        if (value instanceof String s) {
            return Optional.of(DatasetSpec.fromJson(s, source));
        }
        throw OnefoldException.spec(source + ": must be a JSON object holding a spec");
    }

    /**
     * A copy of a record schema with the spec embedded (replacing any embedded before), ready to be written as
     * one {@code .avsc}. The copy has the same fingerprint: attributes are not part of the canonical form.
     */
    public static Schema withEmbeddedSpec(Schema schema, DatasetSpec spec) {
        if (schema.getType() != Schema.Type.RECORD) {
            throw AvroErrors.schema("schema " + AvroErrors.describe(schema) + " is not a record; a spec belongs on a record");
        }
        @SuppressWarnings("unchecked")
        Map<String, Object> root = (Map<String, Object>) Json.parse(schema.toString(), "schema " + schema.getFullName());
        root.put(SPEC_ATTRIBUTE, Json.parse(spec.toJson(), "spec"));
        return new Schema.Parser().parse(Json.write(root));
    }

    public Schema schema() { return schema; }
    public DatasetSpec spec() { return spec; }
    public AvroRecordAccess access() { return access; }

    /** A batch engine builder for this dataset's generic records (settings as in {@link BatchEngine.Builder}). */
    public BatchEngine.Builder<GenericRecord> engine() {
        return BatchEngine.builder(spec, access);
    }

    /** A payload codec for this dataset's schema, finding earlier writer schemas in {@code store}. */
    public AvroPayloadCodec codec(SchemaStore store, DecodeLimits limits) {
        return AvroPayloadCodec.of(schema, store, limits);
    }
}
