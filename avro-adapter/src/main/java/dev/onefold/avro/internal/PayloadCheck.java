package dev.onefold.avro.internal;

import dev.onefold.OnefoldException;
import dev.onefold.avro.DecodeLimits;
import java.util.List;
import org.apache.avro.Schema;

/**
 * Walks an Avro binary body with its writer schema, without building values, and checks that every length,
 * count, enum index and union branch is valid, within {@link DecodeLimits} and within the bytes actually
 * present, and that the body ends exactly where the record ends. Only a body that passes is handed to Avro's
 * decoder, so decoding can neither run past the input nor allocate more than the limits allow.
 *
 * <p>Invariants: a length or count is read as a zig-zag varint of at most 10 bytes; a declared size is never
 * trusted before it is compared with the remaining bytes. Cost: one pass over the body, no allocation.
 * Not thread-safe (one instance per check).
 */
public final class PayloadCheck {
    private static final Schema MAP_KEY = Schema.create(Schema.Type.STRING);
    private final byte[] buf;
    private final int end;
    private final DecodeLimits limits;
    private int pos;
    private long items;

    private PayloadCheck(byte[] buf, int start, int end, DecodeLimits limits) {
        this.buf = buf;
        this.pos = start;
        this.end = end;
        this.limits = limits;
    }

    /**
     * Checks the body {@code buf[start, end)} against the writer schema.
     *
     * @throws OnefoldException (CORRUPT) naming the field path, the offset and what is wrong
     */
    public static void check(Schema writer, byte[] buf, int start, int end, DecodeLimits limits) {
        PayloadCheck c = new PayloadCheck(buf, start, end, limits);
        c.value(writer, "", 0);
        if (c.pos != end) {
            throw OnefoldException.corrupt("payload has " + (end - c.pos) + " bytes after the end of the record");
        }
    }

    private void value(Schema s, String path, int depth) {
        if (depth > limits.maxDepth()) {
            throw fail(path, "nesting deeper than the limit of " + limits.maxDepth());
        }
        switch (s.getType()) {
            case NULL -> { }
            case BOOLEAN -> skip(1, path);
            case INT -> varint(path, 5);
            case LONG -> varint(path, 10);
            case FLOAT -> skip(4, path);
            case DOUBLE -> skip(8, path);
            case STRING -> skip(length(path, limits.maxStringBytes(), "string"), path);
            case BYTES -> skip(length(path, limits.maxBytesLength(), "bytes value"), path);
            case FIXED -> skip(s.getFixedSize(), path);
            case ENUM -> {
                long i = varint(path, 5);
                if (i < 0 || i >= s.getEnumSymbols().size()) {
                    throw fail(path, "enum index " + i + " is outside the " + s.getEnumSymbols().size() + " symbols of "
                            + s.getFullName());
                }
            }
            case UNION -> {
                List<Schema> branches = s.getTypes();
                long i = varint(path, 5);
                if (i < 0 || i >= branches.size()) {
                    throw fail(path, "union branch " + i + " is outside the " + branches.size() + " branches");
                }
                value(branches.get((int) i), path, depth + 1);
            }
            case RECORD -> {
                for (Schema.Field f : s.getFields()) {
                    value(f.schema(), path.isEmpty() ? f.name() : path + "." + f.name(), depth + 1);
                }
            }
            case ARRAY -> blocks(s.getElementType(), null, path + "[]", depth + 1);
            case MAP -> blocks(s.getValueType(), MAP_KEY, path + "{}", depth + 1);
            default -> throw new AssertionError(s.getType());
        }
    }

    private void blocks(Schema item, Schema key, String path, int depth) {
        while (true) {
            long count = varint(path, 10);
            if (count == 0) {
                return;
            }
            if (count < 0) {
                if (count == Long.MIN_VALUE) {
                    throw fail(path, "block count " + count + " is invalid");
                }
                count = -count;
                long size = varint(path, 10);
                if (size < 0 || size > end - pos) {
                    throw fail(path, "block declares " + size + " bytes but " + (end - pos) + " remain");
                }
            }
            items += count;
            if (count > limits.maxItems() || items > limits.maxItems()) {
                throw fail(path, "collection items exceed the limit of " + limits.maxItems() + " per payload");
            }
            for (long i = 0; i < count; i++) {
                if (key != null) {
                    value(key, path, depth);
                }
                value(item, path, depth);
            }
        }
    }

    private int length(String path, int limit, String what) {
        long n = varint(path, 10);
        if (n < 0) {
            throw fail(path, what + " has negative length " + n);
        }
        if (n > limit) {
            throw fail(path, what + " of " + n + " bytes exceeds the limit of " + limit);
        }
        return (int) n;
    }

    private void skip(int n, String path) {
        if (n > end - pos) {
            throw fail(path, "needs " + n + " bytes but " + (end - pos) + " remain (payload truncated?)");
        }
        pos += n;
    }

    /** Reads a zig-zag varint of at most {@code maxBytes} bytes and returns its value. */
    private long varint(String path, int maxBytes) {
        long raw = 0;
        for (int shift = 0, i = 0; i < maxBytes; i++, shift += 7) {
            if (pos >= end) {
                throw fail(path, "payload ends inside a number (truncated?)");
            }
            int b = buf[pos++] & 0xff;
            raw |= (long) (b & 0x7f) << shift;
            if ((b & 0x80) == 0) {
                return (raw >>> 1) ^ -(raw & 1);
            }
        }
        throw fail(path, "number longer than " + maxBytes + " bytes");
    }

    private OnefoldException fail(String path, String what) {
        return OnefoldException.corrupt("payload " + (path.isEmpty() ? "" : "field '" + path + "' ") + "at byte " + pos + ": "
                + what);
    }
}
