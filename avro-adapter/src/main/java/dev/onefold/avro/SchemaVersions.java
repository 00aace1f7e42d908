package dev.onefold.avro;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.avro.internal.AvroErrors;
import dev.onefold.avro.internal.Compatibility;
import dev.onefold.avro.internal.Fingerprints;
import dev.onefold.avro.internal.SpecChecks;
import dev.onefold.record.FieldPath;
import dev.onefold.record.RowSchema;
import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Objects;
import java.util.Optional;
import java.util.Set;
import org.apache.avro.Schema;
import org.apache.avro.SchemaCompatibility;

/**
 * The schema versions of one dataset, in the order they were registered, and the compatibility gate every new
 * version passes: it must be able to read every earlier version (checked with Avro's own
 * {@link SchemaCompatibility} checker), and the fields the spec gives a role (key, version, clock, order,
 * partition, tombstone and field-wise rule fields) must keep their meaning: same path, same type, and for enums
 * no symbol dropped. A version that embeds a spec may change only its checks; any other spec change is refused.
 *
 * <p>A refused version gets an INVALID_SCHEMA error listing every reason, and naming the remedy: such a change
 * needs a new dataset, filled by re-importing the records of the old one.
 *
 * <p>Let V be a SchemaVersions and s a schema it accepts. Then a payload written under any schema of V decodes
 * under {@code V.register(s).codec(...)} with its role fields unchanged.
 *
 * <p>Immutable and thread-safe: {@link #register} returns a new instance. Registering costs one compatibility
 * check per earlier version.
 */
public final class SchemaVersions {
    private final List<Schema> versions;
    private final DatasetSpec spec;

    private SchemaVersions(List<Schema> versions, DatasetSpec spec) {
        this.versions = List.copyOf(versions);
        this.spec = spec;
    }

    /**
     * The first version of a dataset.
     *
     * @param spec the dataset's spec, or null when the schema embeds it
     * @throws OnefoldException as {@link AvroDataset#of(Schema, DatasetSpec)}
     */
    public static SchemaVersions first(Schema schema, DatasetSpec spec) {
        AvroDataset d = AvroDataset.of(schema, spec);
        return new SchemaVersions(List.of(schema), d.spec());
    }

    /**
     * Versions registered in order, each through the gate.
     *
     * @throws OnefoldException (INVALID_SCHEMA) for the first version refused
     */
    public static SchemaVersions of(List<Schema> schemas, DatasetSpec spec) {
        if (schemas.isEmpty()) {
            throw OnefoldException.usage("a dataset needs at least one schema version");
        }
        SchemaVersions v = first(schemas.get(0), spec);
        for (Schema s : schemas.subList(1, schemas.size())) {
            v = v.register(s);
        }
        return v;
    }

    /**
     * Registers the next version after checking it against every earlier one.
     *
     * @throws OnefoldException (INVALID_SCHEMA) listing every reason the version is refused, and the remedy
     */
    public SchemaVersions register(Schema next) {
        Objects.requireNonNull(next, "next");
        List<String> reasons = new ArrayList<>();
        DatasetSpec nextSpec = spec;
        Optional<DatasetSpec> embedded = AvroDataset.embeddedSpec(next);
        if (embedded.isPresent()) {
            nextSpec = embedded.get();
            for (String d : SpecChecks.differences(spec, "version " + versions.size(), nextSpec, "the new version")) {
                if (!d.startsWith("checks")) {
                    reasons.add("the spec changes " + d);
                }
            }
        }
        AvroRecordAccess nextAccess = null;
        try {
            AvroDataset.of(next, nextSpec);
            nextAccess = AvroRecordAccess.of(next);
        } catch (OnefoldException e) {
            reasons.add(e.getMessage());
        }
        for (int i = 0; i < versions.size(); i++) {
            Schema earlier = versions.get(i);
            SchemaCompatibility.SchemaPairCompatibility c = SchemaCompatibility.checkReaderWriterCompatibility(next, earlier);
            if (c.getType() != SchemaCompatibility.SchemaCompatibilityType.COMPATIBLE) {
                reasons.add("it cannot read version " + (i + 1) + " (fingerprint " + Fingerprints.hex(earlier) + "): "
                        + Compatibility.reasons(c.getResult()));
            }
            if (nextAccess != null) {
                roleMeaning(earlier, i + 1, next, nextAccess.schema(), reasons);
            }
        }
        if (!reasons.isEmpty()) {
            throw AvroErrors.schema("schema version " + (versions.size() + 1) + " (" + next.getFullName() + ", fingerprint "
                    + Fingerprints.hex(next) + ") is refused: " + String.join("; ", new LinkedHashSet<>(reasons))
                    + ". A change like this needs a new dataset: create one under the new schema and re-import the records"
                    + " of this one");
        }
        List<Schema> all = new ArrayList<>(versions);
        all.add(next);
        return new SchemaVersions(all, nextSpec);
    }

    private void roleMeaning(Schema earlier, int number, Schema next, RowSchema nextRows, List<String> reasons) {
        RowSchema earlierRows = AvroRecordAccess.of(earlier).schema();
        for (String path : rolePaths(spec)) {
            if (!earlierRows.has(path) || !nextRows.has(path)) {
                continue;
            }
            FieldPath before = earlierRows.resolve(path);
            FieldPath after = nextRows.resolve(path);
            if (!before.type().equals(after.type())) {
                reasons.add("field '" + path + "' has a role in the spec and changes type from " + before.type() + " in version "
                        + number + " to " + after.type() + ", which changes its encoded key, order or version");
            }
            List<String> dropped = droppedSymbols(avroAt(earlier, path), avroAt(next, path));
            if (!dropped.isEmpty()) {
                reasons.add("enum field '" + path + "' has a role in the spec and drops symbols " + dropped + " of version "
                        + number + ", so old values would change meaning");
            }
        }
    }

    private static List<String> droppedSymbols(Schema before, Schema after) {
        if (before.getType() != Schema.Type.ENUM || after.getType() != Schema.Type.ENUM) {
            return List.of();
        }
        List<String> dropped = new ArrayList<>(before.getEnumSymbols());
        dropped.removeAll(after.getEnumSymbols());
        return dropped;
    }

    /** The non-null Avro schema at a path known to exist. */
    private static Schema avroAt(Schema root, String path) {
        Schema s = root;
        for (String step : path.split("\\.")) {
            s = SpecChecks.nonNull(SpecChecks.nonNull(s).getField(step).schema());
        }
        return s;
    }

    private static Set<String> rolePaths(DatasetSpec spec) {
        Set<String> paths = new LinkedHashSet<>(spec.key());
        spec.order().forEach(o -> paths.add(o.path()));
        if (spec.partition() instanceof DatasetSpec.TimeBucket t) {
            paths.add(t.field());
        } else if (spec.partition() instanceof DatasetSpec.ByValues v) {
            paths.addAll(v.fields());
        }
        if (spec.merge() instanceof DatasetSpec.LastWriter lw) {
            paths.add(lw.version());
        } else if (spec.merge() instanceof DatasetSpec.VectorClock vc) {
            paths.add(vc.clock());
        } else if (spec.merge() instanceof DatasetSpec.FieldWise fw) {
            paths.add(fw.version());
            paths.addAll(fw.fields().keySet());
        }
        if (spec.tombstone() != null) {
            paths.add(spec.tombstone());
        }
        return paths;
    }

    /** Every registered version, oldest first. */
    public List<Schema> versions() { return versions; }

    /** The newest version: the reader schema for everything written under any version. */
    public Schema latest() { return versions.get(versions.size() - 1); }

    /** The spec in force (the newest version's). */
    public DatasetSpec spec() { return spec; }

    /** A schema store holding every version, for the payload codec to find writer schemas. */
    public SchemaStore store() {
        return SchemaStore.inMemory(versions);
    }

    /** The dataset at the newest version. */
    public AvroDataset dataset() {
        return AvroDataset.of(latest(), spec);
    }

    /** A payload codec reading every version as the newest, with the given limits. */
    public AvroPayloadCodec codec(DecodeLimits limits) {
        return AvroPayloadCodec.of(latest(), store(), limits);
    }
}
