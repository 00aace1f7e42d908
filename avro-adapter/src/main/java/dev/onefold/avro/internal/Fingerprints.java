package dev.onefold.avro.internal;

import org.apache.avro.Schema;
import org.apache.avro.SchemaNormalization;

/**
 * Schema fingerprints: the CRC-64-AVRO (Rabin) fingerprint of a schema's Parsing Canonical Form, as the Avro
 * specification defines it for single-object encoding, and its 16-digit hex form used as a writer id.
 * Stateless and thread-safe; cost is linear in the schema's size.
 */
public final class Fingerprints {
    private Fingerprints() {}

    public static long of(Schema schema) {
        return SchemaNormalization.parsingFingerprint64(schema);
    }

    public static String hex(Schema schema) {
        return hex(of(schema));
    }

    public static String hex(long fingerprint) {
        return String.format("%016x", fingerprint);
    }

    /** Parses a 16-digit hex writer id, or returns null when it is not one. */
    public static Long parseHex(String id) {
        if (id == null || id.length() != 16) {
            return null;
        }
        try {
            return Long.parseUnsignedLong(id, 16);
        } catch (NumberFormatException e) {
            return null;
        }
    }
}
