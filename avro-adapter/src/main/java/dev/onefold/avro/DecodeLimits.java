package dev.onefold.avro;

import dev.onefold.OnefoldException;

/**
 * Limits that bound what decoding one Avro payload may allocate, so hostile or corrupt bytes become a clear
 * error (or a rejected record) instead of an OutOfMemoryError. Every declared length is also checked against
 * the bytes actually present, so a payload can never claim more than it holds.
 *
 * @param maxStringBytes  longest string, in UTF-8 bytes
 * @param maxBytesLength  longest bytes value
 * @param maxItems        most array elements plus map entries in one payload, summed over all its collections
 *                        (elements of type null or empty records take no bytes, so only a count bounds them)
 * @param maxDepth        deepest nesting of records, arrays, maps and unions (bounds recursive writer schemas)
 *
 * <p>Immutable and thread-safe.
 */
public record DecodeLimits(int maxStringBytes, int maxBytesLength, int maxItems, int maxDepth) {

    /** 16 MiB strings and bytes, one million items, depth 64. */
    public static final DecodeLimits DEFAULT = new DecodeLimits(16 << 20, 16 << 20, 1_000_000, 64);

    public DecodeLimits {
        if (maxStringBytes < 0 || maxBytesLength < 0 || maxItems < 0 || maxDepth < 1) {
            throw OnefoldException.usage("decode limits must be non-negative (depth at least 1), got string "
                    + maxStringBytes + ", bytes " + maxBytesLength + ", items " + maxItems + ", depth " + maxDepth);
        }
    }
}
