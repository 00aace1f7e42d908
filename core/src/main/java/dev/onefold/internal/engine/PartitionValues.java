package dev.onefold.internal.engine;

import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.util.HexFormat;

/** Renders partition field values as text: numbers and booleans as Java prints them, bytes as hex. */
final class PartitionValues {
    private PartitionValues() {}

    static String render(Object v) {
        if (v instanceof ByteBuffer b) {
            byte[] a = new byte[b.remaining()];
            b.duplicate().get(a);
            return HexFormat.of().formatHex(a);
        }
        if (v instanceof BigDecimal d) {
            return d.toPlainString();
        }
        return String.valueOf(v);
    }
}
