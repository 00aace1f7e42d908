package dev.onefold.avro.internal;

import dev.onefold.OnefoldException;
import org.apache.avro.Schema;

/** Message helpers shared by the adapter, so every error names field paths and Avro types the same way. */
public final class AvroErrors {
    private AvroErrors() {}

    /** "field 'a.b': " for a path, or "record: " for the root. */
    public static String at(String path) {
        return path.isEmpty() ? "record: " : "field '" + path + "': ";
    }

    /** A schema as compact JSON, shortened for messages. */
    public static String describe(Schema schema) {
        return abbreviate(schema.toString());
    }

    public static String abbreviate(Object value) {
        String s = String.valueOf(value);
        return s.length() > 80 ? s.substring(0, 77) + "..." : s;
    }

    public static OnefoldException schema(String message) {
        return new OnefoldException(OnefoldException.Kind.INVALID_SCHEMA, message);
    }
}
