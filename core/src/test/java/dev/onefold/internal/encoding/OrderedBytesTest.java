package dev.onefold.internal.encoding;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.record.FieldType;
import java.math.BigDecimal;
import java.math.BigInteger;
import java.util.Arrays;
import java.util.UUID;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;

/**
 * Order preservation: the sign of the byte comparison equals the sign of the values' natural comparison, for
 * every orderable kind, ascending and descending, with null first. The natural comparisons are the JDK's own
 * (Long.compare, Double.compare, BigDecimal.compareTo, code-point order for strings) and, for UUIDs, unsigned
 * order of the 128-bit value, which is the order of their RFC 4122 text form.
 */
class OrderedBytesTest {

    private static int sign(int c) {
        return Integer.signum(c);
    }

    private static void check(FieldType t, Object a, Object b, int expected) {
        byte[] x = OrderedBytes.encode(t.nullable(), a);
        byte[] y = OrderedBytes.encode(t.nullable(), b);
        assertEquals(sign(expected), sign(Arrays.compareUnsigned(x, y)), a + " vs " + b);
        dev.onefold.internal.bytes.ByteWriter wx = new dev.onefold.internal.bytes.ByteWriter();
        dev.onefold.internal.bytes.ByteWriter wy = new dev.onefold.internal.bytes.ByteWriter();
        OrderedBytes.write(wx, t.nullable(), a, true);
        OrderedBytes.write(wy, t.nullable(), b, true);
        assertEquals(-sign(expected), sign(Arrays.compareUnsigned(wx.toByteArray(), wy.toByteArray())), "descending " + a + " vs " + b);
    }

    @Property
    void encode_longsKeepOrder(@ForAll Long a, @ForAll Long b) {
        check(FieldType.int64(), a, b, Long.compare(a, b));
    }

    @Property
    void encode_intsKeepOrder(@ForAll int a, @ForAll int b) {
        check(FieldType.int32(), a, b, Integer.compare(a, b));
    }

    @Property
    void encode_doublesKeepOrder(@ForAll double a, @ForAll double b) {
        check(FieldType.float64(), a, b, Double.compare(a, b));
    }

    @Property
    void encode_floatsKeepOrder(@ForAll float a, @ForAll float b) {
        check(FieldType.float32(), a, b, Float.compare(a, b));
    }

    @Property
    void encode_stringsKeepCodePointOrder(@ForAll String a, @ForAll String b) {
        check(FieldType.string(), a, b, Arrays.compare(a.codePoints().toArray(), b.codePoints().toArray()));
    }

    @Property
    void encode_stringsAreNotPrefixesOfEachOther(@ForAll String a) {
        // "a" < "a\0" < "a\0\0" < "ab": escaping keeps the encoding prefix-free
        check(FieldType.string(), a, a + "\u0000", -1);
        check(FieldType.string(), a + "\u0000", a + "\u0001", -1);
    }

    @Property
    void encode_bytesKeepUnsignedOrder(@ForAll byte[] a, @ForAll byte[] b) {
        check(FieldType.bytes(), java.nio.ByteBuffer.wrap(a), java.nio.ByteBuffer.wrap(b), Arrays.compareUnsigned(a, b));
    }

    @Property
    void encode_decimalsKeepOrder(@ForAll long a, @ForAll long b, @ForAll boolean big) {
        BigInteger x = BigInteger.valueOf(a);
        BigInteger y = BigInteger.valueOf(b);
        if (big) {
            x = x.multiply(BigInteger.TEN.pow(20));
        }
        BigDecimal dx = new BigDecimal(x, 3);
        BigDecimal dy = new BigDecimal(y, 3);
        check(FieldType.decimal(38, 3), dx, dy, dx.compareTo(dy));
    }

    @Property
    void encode_uuidsKeepUnsignedOrder(@ForAll long m1, @ForAll long l1, @ForAll long m2, @ForAll long l2) {
        UUID a = new UUID(m1, l1);
        UUID b = new UUID(m2, l2);
        int c = Long.compareUnsigned(m1, m2);
        check(FieldType.uuid(), a, b, c != 0 ? c : Long.compareUnsigned(l1, l2));
        // the text form of a UUID orders the same way (lower-case hex of fixed width)
        assertEquals(sign(c != 0 ? c : Long.compareUnsigned(l1, l2)), sign(a.toString().compareTo(b.toString())));
    }

    @Property
    void encode_nullSortsFirst(@ForAll long a) {
        check(FieldType.int64(), null, a, -1);
    }
}
