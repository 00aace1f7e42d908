package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

class BatchEngineSmokeTest {
    static final RowSchema READING = RowSchema.builder("reading")
            .field("container_id", FieldType.string())
            .field("seq", FieldType.int64())
            .field("recorded_at", FieldType.timestampMillis())
            .field("temp", FieldType.float64().nullable())
            .field("deleted", FieldType.bool().nullable())
            .build();

    @Test
    void dedupe_lastWriterKeepsHighestVersionAndOrders() {
        DatasetSpec spec = DatasetSpec.fromJson("""
                {"key": ["container_id"], "order": ["recorded_at"],
                 "merge": {"policy": "last-writer", "version": "seq"}, "tombstone": "deleted"}""", "spec");
        BatchEngine<Row> engine = BatchEngine.forRows(spec, READING);
        Row a1 = Row.of(READING, "A", 1L, 100L, 1.5, null);
        Row a2 = Row.of(READING, "A", 2L, 50L, 2.5, null);
        Row b1 = Row.of(READING, "B", 1L, 70L, 3.5, null);
        Row c1 = Row.of(READING, "C", 1L, 10L, 3.5, null);
        Row c2 = Row.of(READING, "C", 2L, 10L, null, true);
        BatchResult<Row> r = engine.dedupe(List.of(a1, b1, a2, a1, c1, c2));
        assertEquals(List.of(a2, b1), r.survivors());
        assertEquals(6, r.report().in());
        assertEquals(1, r.report().duplicates());
        assertEquals(2, r.report().superseded());
        assertEquals(1, r.report().tombstonedKeys());
        assertEquals(Map.of(), Map.of());
    }
}
