package dev.onefold.record;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * The heap estimate a row carries from construction: memory budgets count it, so it must grow with every
 * variable-size value (an estimate blind to a value lets a batch of such rows overrun its budget) and stay
 * fixed for fixed-width ones. The exact constants are common practice for a 64-bit JVM with compressed
 * references (object header 12 bytes, rounded to 8), not a measured layout.
 */
class RowHeapEstimateTest {
    private static final RowSchema INNER = RowSchema.builder("inner").field("note", FieldType.string()).build();
    private static final RowSchema SCHEMA = RowSchema.builder("outer")
            .field("id", FieldType.int64())
            .field("name", FieldType.string().nullable())
            .field("blob", FieldType.bytes().nullable())
            .field("tags", FieldType.list(FieldType.string()).nullable())
            .field("counters", FieldType.map(FieldType.int64()).nullable())
            .field("inner", FieldType.record(INNER).nullable())
            .build();

    private static long estimate(Object name, Object blob, Object tags, Object counters, Object inner) {
        return Row.of(SCHEMA, 1L, name, blob, tags, counters, inner).estimatedHeapBytes();
    }

    @Test
    void everyVariableSizeValueCountsItsLength() {
        long empty = estimate(null, null, null, null, null);
        long kilobyte = 1024;
        String longName = "x".repeat((int) kilobyte);
        assertTrue(estimate(longName, null, null, null, null) >= empty + kilobyte);
        assertTrue(estimate(null, new byte[(int) kilobyte], null, null, null) >= empty + kilobyte);
        assertTrue(estimate(null, null, List.of(longName), null, null) >= empty + kilobyte);
        assertTrue(estimate(null, null, null, Map.of(longName, 1L), null) >= empty + kilobyte);
        assertTrue(estimate(null, null, null, null, Row.of(INNER, longName)) >= empty + kilobyte);
    }

    @Test
    void aNestedRowCountsItsOwnEstimate() {
        Row inner = Row.of(INNER, "y".repeat(500));
        long without = estimate(null, null, null, null, null);
        long with = estimate(null, null, null, null, inner);
        assertEquals(without + inner.estimatedHeapBytes(), with);
    }

    @Test
    void aLargeValueIsEstimatedWithinAFactorOfTwo() {
        int megabyte = 1 << 20;
        long estimate = estimate(null, new byte[megabyte], null, null, null);
        assertTrue(estimate >= megabyte && estimate <= 2L * megabyte, "estimate " + estimate);
    }

    @Test
    void replacingAValueRecomputesTheEstimate() {
        Row small = Row.of(SCHEMA, 1L, "a", null, null, null, null);
        Row large = small.with("name", "a".repeat(4096));
        assertTrue(large.estimatedHeapBytes() >= small.estimatedHeapBytes() + 4095);
        assertEquals(Row.of(SCHEMA, 1L, "a".repeat(4096), null, null, null, null).estimatedHeapBytes(),
                large.estimatedHeapBytes());
    }
}
