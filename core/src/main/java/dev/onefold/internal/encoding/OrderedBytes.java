package dev.onefold.internal.encoding;

import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.record.FieldType;
import java.math.BigDecimal;
import java.math.BigInteger;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.UUID;

/**
 * Order-preserving, prefix-free encoding of orderable values: for values a and b of one type,
 * {@code compare(a, b)} has the sign of the unsigned lexicographic comparison of their encodings, and equal
 * values have equal bytes. Concatenating encodings of several fields therefore orders by the fields in turn,
 * and flipping every bit of one field's encoding reverses that field alone (descending order).
 *
 * <pre>
 *  null                 00
 *  present              01, then:
 *  BOOLEAN              00 | 01
 *  INT, DATE            4 bytes big-endian, sign bit flipped
 *  LONG, TIMESTAMP_*    8 bytes big-endian, sign bit flipped
 *  FLOAT, DOUBLE        IEEE bits; negative: all bits flipped, else sign bit flipped; NaN canonical
 *  STRING (UTF-8), BYTES  content with 00 written as 00 FF, then terminator 00 01
 *  UUID                 16 bytes, most significant first (unsigned, the order of its text form)
 *  DECIMAL              unscaled value: 00 negative | 01 zero | 02 positive, then for non-zero the
 *                       magnitude length (4 bytes) and magnitude, all flipped when negative
 * </pre>
 * Stateless and thread-safe; cost is linear in the value's size.
 */
public final class OrderedBytes {
    private OrderedBytes() {}

    /** Appends the encoding of {@code value} (possibly null) of the given type, flipped when descending. */
    public static void write(ByteWriter out, FieldType type, Object value, boolean descending) {
        int start = out.length();
        if (value == null) {
            out.write(0);
        } else {
            out.write(1);
            writePresent(out, type.kind(), value);
        }
        if (descending) {
            byte[] a = out.array();
            for (int i = start; i < out.length(); i++) {
                a[i] = (byte) ~a[i];
            }
        }
    }

    /** The encoding of one value as a fresh array. */
    public static byte[] encode(FieldType type, Object value) {
        ByteWriter w = new ByteWriter(16);
        write(w, type, value, false);
        return w.toByteArray();
    }

    private static void writePresent(ByteWriter out, FieldType.Kind kind, Object value) {
        switch (kind) {
            case BOOLEAN -> out.write((Boolean) value ? 1 : 0);
            case INT, DATE -> out.writeInt(((Integer) value) ^ Integer.MIN_VALUE);
            case LONG, TIMESTAMP_MILLIS, TIMESTAMP_MICROS -> out.writeLong(((Long) value) ^ Long.MIN_VALUE);
            case FLOAT -> {
                float f = (Float) value;
                int bits = Float.floatToIntBits(f);
                out.writeInt(bits < 0 ? ~bits : bits ^ Integer.MIN_VALUE);
            }
            case DOUBLE -> {
                double d = (Double) value;
                long bits = Double.doubleToLongBits(d);
                out.writeLong(bits < 0 ? ~bits : bits ^ Long.MIN_VALUE);
            }
            case STRING -> writeString(out, (String) value);
            case BYTES -> {
                ByteBuffer b = ((ByteBuffer) value).duplicate();
                byte[] a = new byte[b.remaining()];
                b.get(a);
                writeEscaped(out, a);
            }
            case UUID -> {
                UUID u = (UUID) value;
                out.writeLong(u.getMostSignificantBits());
                out.writeLong(u.getLeastSignificantBits());
            }
            case DECIMAL -> writeDecimal(out, ((BigDecimal) value).unscaledValue());
            default -> throw new IllegalArgumentException(kind + " values have no order");
        }
    }

    /**
     * A string's escaped UTF-8 bytes. ASCII text without NUL, the common case, is copied char by char straight
     * into the buffer: the bytes {@code getBytes(UTF_8)} would give, without the intermediate array.
     */
    private static void writeString(ByteWriter out, String s) {
        int n = s.length();
        byte[] a = out.reserve(n);
        int at = out.length();
        for (int i = 0; i < n; i++) {
            char ch = s.charAt(i);
            if (ch == 0 || ch >= 0x80) {
                // NUL needs escaping and other characters need UTF-8 encoding: take the general path
                writeEscaped(out, s.getBytes(StandardCharsets.UTF_8));
                return;
            }
            a[at + i] = (byte) ch;
        }
        out.advance(n);
        out.write(0).write(1);
    }

    private static void writeEscaped(ByteWriter out, byte[] a) {
        for (byte b : a) {
            if (b == 0) {
                out.write(0).write(0xFF);
            } else {
                out.write(b);
            }
        }
        out.write(0).write(1);
    }

    private static void writeDecimal(ByteWriter out, BigInteger unscaled) {
        int sign = unscaled.signum();
        if (sign == 0) {
            out.write(1);
            return;
        }
        byte[] mag = unscaled.abs().toByteArray();
        int skip = mag.length > 1 && mag[0] == 0 ? 1 : 0;
        int start = out.length();
        out.write(sign > 0 ? 2 : 0);
        int bodyStart = out.length();
        out.writeInt(mag.length - skip);
        out.write(mag, skip, mag.length - skip);
        if (sign < 0) {
            byte[] a = out.array();
            for (int i = bodyStart; i < out.length(); i++) {
                a[i] = (byte) ~a[i];
            }
        }
        assert out.length() > start;
    }

    /** Unsigned lexicographic comparison, the order the encodings define. */
    public static int compare(byte[] a, byte[] b) {
        return Arrays.compareUnsigned(a, b);
    }
}
