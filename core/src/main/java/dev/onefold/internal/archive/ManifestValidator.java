package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import java.util.Arrays;

/**
 * The named checks a manifest file must pass (layout in {@link ManifestFormat}). Every failure is an
 * {@link OnefoldException} of kind CORRUPT whose message starts with the file name and the problem's name.
 * Stateless and thread-safe.
 */
public final class ManifestValidator {
    /** What can be wrong with a manifest. */
    public enum Problem {
        /** Shorter than its preamble, or a section is cut off. */
        TRUNCATED,
        /** Does not start with the manifest magic. */
        BAD_MAGIC,
        /** Written by a newer (or unknown) format version. */
        UNKNOWN_VERSION,
        /** The body's CRC-32C does not match. */
        CHECKSUM_MISMATCH,
        /** The version inside differs from the version in the file name. */
        VERSION_MISMATCH,
        /** Bytes follow the body. */
        TRAILING_BYTES,
        /** A partition's name does not encode its values, or partitions are not sorted and unique. */
        BAD_PARTITION,
        /** A chunk name is not inside its partition's directory. */
        BAD_CHUNK_NAME
    }

    private ManifestValidator() {}

    static OnefoldException problem(String file, Problem p, String detail) {
        return OnefoldException.corrupt(file + ": " + p + ": " + detail);
    }

    static void checkPreamble(String file, byte[] bytes) {
        if (bytes.length < ManifestFormat.PREAMBLE) {
            throw problem(file, Problem.TRUNCATED, "has " + bytes.length + " bytes");
        }
        if (!Arrays.equals(bytes, 0, 4, ManifestFormat.MAGIC, 0, 4)) {
            throw problem(file, Problem.BAD_MAGIC, "does not start with the manifest magic OFMF");
        }
        if (bytes[4] != ManifestFormat.VERSION) {
            throw problem(file, Problem.UNKNOWN_VERSION, "format version " + bytes[4] + ", this library reads version "
                    + ManifestFormat.VERSION);
        }
    }

    static void checkVersion(String file, long expected, long actual) {
        if (expected >= 0 && expected != actual) {
            throw problem(file, Problem.VERSION_MISMATCH, "holds version " + actual + " but is named for version " + expected);
        }
    }

    static void checkEnd(String file, int remaining) {
        if (remaining != 0) {
            throw problem(file, Problem.TRAILING_BYTES, remaining + " bytes after the body");
        }
    }

    static void checkPartition(String file, String previousName, PartitionEntry p) {
        if (!PartitionNames.encode(p.values()).equals(p.name())) {
            throw problem(file, Problem.BAD_PARTITION, "partition " + p.name() + " does not encode its values " + p.values());
        }
        if (previousName != null && previousName.compareTo(p.name()) >= 0) {
            throw problem(file, Problem.BAD_PARTITION, "partition " + p.name() + " is out of order or repeated");
        }
        if (p.chunks().isEmpty()) {
            throw problem(file, Problem.BAD_PARTITION, "partition " + p.name() + " lists no chunks");
        }
        for (ChunkRef c : p.chunks()) {
            String dir = ManifestFormat.chunkDirectory(p.name());
            if (!c.name().startsWith(dir) || c.name().indexOf('/', dir.length()) >= 0 || c.name().contains("..")) {
                throw problem(file, Problem.BAD_CHUNK_NAME, "chunk " + c.name() + " is not inside " + dir);
            }
        }
    }
}
