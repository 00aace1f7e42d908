package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import java.util.Arrays;

/**
 * The named checks a chunk file must pass (see {@link ChunkFormat} for the layout). Every failure is an
 * {@link OnefoldException} of kind CORRUPT whose message starts with the file name and the problem's name, so
 * tests and operators can tell the problems apart. Stateless and thread-safe.
 */
public final class ChunkValidator {
    /** What can be wrong with a chunk file. */
    public enum Problem {
        /** Shorter than the fixed preamble and trailer. */
        TRUNCATED,
        /** Does not start or end with the chunk magic. */
        BAD_MAGIC,
        /** Written by a newer (or unknown) format version. */
        UNKNOWN_VERSION,
        /** A section's CRC-32C does not match. */
        CHECKSUM_MISMATCH,
        /** The trailer's own checksum or index offset is wrong. */
        BAD_TRAILER,
        /** Entries are not strictly ascending by order. */
        OUT_OF_ORDER,
        /** Counts, first/last order or index disagree with the entries, or with the manifest. */
        MISMATCH
    }

    private ChunkValidator() {}

    static OnefoldException problem(String file, Problem p, String detail) {
        return OnefoldException.corrupt(file + ": " + p + ": " + detail);
    }

    static void checkFrame(String file, byte[] bytes) {
        if (bytes.length < ChunkFormat.PREAMBLE + ChunkFormat.TRAILER) {
            throw problem(file, Problem.TRUNCATED, "has " + bytes.length + " bytes, fewer than the "
                    + (ChunkFormat.PREAMBLE + ChunkFormat.TRAILER) + " of an empty chunk");
        }
        if (!Arrays.equals(bytes, 0, 4, ChunkFormat.MAGIC, 0, 4)
                || !Arrays.equals(bytes, bytes.length - 4, bytes.length, ChunkFormat.MAGIC, 0, 4)) {
            throw problem(file, Problem.BAD_MAGIC, "does not start and end with the chunk magic OFCK");
        }
        if (bytes[4] != ChunkFormat.VERSION) {
            throw problem(file, Problem.UNKNOWN_VERSION, "format version " + bytes[4] + ", this library reads version "
                    + ChunkFormat.VERSION);
        }
    }

    static void checkTrailer(String file, long indexOffset, int storedCrc, int actualCrc, int fileLength) {
        if (storedCrc != actualCrc) {
            throw problem(file, Problem.BAD_TRAILER, "trailer checksum does not match");
        }
        if (indexOffset < ChunkFormat.PREAMBLE || indexOffset > fileLength - ChunkFormat.TRAILER - Sections.FRAME) {
            throw problem(file, Problem.BAD_TRAILER, "index offset " + indexOffset + " is outside the file");
        }
    }

    static void checkAscending(String file, byte[] previous, byte[] current, String where) {
        if (previous != null && Arrays.compareUnsigned(previous, current) >= 0) {
            throw problem(file, Problem.OUT_OF_ORDER, where + " does not sort after the entry before it");
        }
    }

    static void checkEqual(String file, String what, long expected, long actual) {
        if (expected != actual) {
            throw problem(file, Problem.MISMATCH, what + " is " + actual + ", expected " + expected);
        }
    }

    static void checkEqual(String file, String what, byte[] expected, byte[] actual) {
        if (!Arrays.equals(expected, actual)) {
            throw problem(file, Problem.MISMATCH, what + " differs");
        }
    }
}
