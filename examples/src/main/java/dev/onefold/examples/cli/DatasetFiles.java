package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.avro.AvroDataset;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.function.Supplier;

/** Reads a dataset from the command line's {@code --schema} and optional {@code --spec} files. Stateless. */
final class DatasetFiles {
    private DatasetFiles() {}

    /**
     * The dataset of an {@code .avsc} file and an optional spec file (the spec may be embedded in the schema).
     *
     * @throws OnefoldException (IO) naming a missing file; (INVALID_SCHEMA, INVALID_SPEC) whose message names
     *     the schema or spec file, and where the parser reports them, the line and the field
     */
    static AvroDataset read(Path schema, Path spec) {
        requireFile(schema, "schema");
        if (spec != null) {
            requireFile(spec, "spec");
        }
        return naming(schema, spec, () -> AvroDataset.read(schema, spec));
    }

    /**
     * Runs a step that checks the schema or spec (reading them, registering a schema version with an archive) so
     * that its error names the files: a message that names neither gets them put in front.
     */
    static <T> T naming(Path schema, Path spec, Supplier<T> step) {
        try {
            return step.get();
        } catch (OnefoldException e) {
            String m = e.getMessage();
            boolean named = m.contains(schema.toString()) || (spec != null && m.contains(spec.toString()));
            if (named) {
                throw e;
            }
            String files = spec == null ? "schema " + schema : "schema " + schema + " with spec " + spec;
            throw new OnefoldException(e.kind(), files + ": " + m, e);
        }
    }

    static void requireFile(Path file, String what) {
        if (!Files.isRegularFile(file)) {
            throw new OnefoldException(OnefoldException.Kind.IO, what + " file " + file + ": no such file");
        }
        if (!Files.isReadable(file)) {
            throw new OnefoldException(OnefoldException.Kind.IO, what + " file " + file + ": cannot read (permission denied)");
        }
    }
}
