package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * The bad-input catalogue (DESIGN.md promise 6): every kind of bad record is rejected with its own reason and
 * position, the batch carries on, and in = accepted + rejected.
 */
class RejectionCatalogueTest {
    static final RowSchema SCHEMA = RowSchema.builder("order")
            .field("id", FieldType.string())
            .field("seq", FieldType.int64().nullable())
            .field("clock", FieldType.map(FieldType.int64()).nullable())
            .field("total", FieldType.float64().nullable())
            .build();

    /** Records arrive as loosely typed maps, the way a JSON source delivers them. */
    static final RecordAccess<Map<String, Object>> MAPS = new RecordAccess<>() {
        @Override
        public RowSchema schema() {
            return SCHEMA;
        }

        @Override
        public Row toRow(Map<String, Object> record) {
            Row.Builder b = Row.builder(SCHEMA);
            for (Map.Entry<String, Object> e : record.entrySet()) {
                b.set(e.getKey(), e.getValue());
            }
            return b.build();
        }

        @Override
        public Map<String, Object> fromRow(Row row) {
            Map<String, Object> m = new HashMap<>();
            for (RowSchema.Field f : SCHEMA.fields()) {
                m.put(f.name(), row.get(f.name()));
            }
            return m;
        }
    };

    static Map<String, Object> rec(Object... kv) {
        Map<String, Object> m = new HashMap<>();
        for (int i = 0; i < kv.length; i += 2) {
            m.put((String) kv[i], kv[i + 1]);
        }
        return m;
    }

    @Test
    void dedupe_lastWriterRejectsEachBadRecordWithItsReason() {
        DatasetSpec spec = DatasetSpec.builder().key("id").lastWriter("seq").build();
        List<Map<String, Object>> in = List.of(
                rec("id", "a", "seq", 1L),
                rec("seq", 1L),                          // missing key
                rec("id", "b", "seq", null),             // null version
                rec("id", "c", "seq", "seven"),          // unparsable version
                rec("id", "d", "seq", 2L, "total", "x"), // wrong type
                rec("id", "e", "seq", 1L, "colour", 1),  // unknown field
                rec("id", "a", "seq", 2L));
        BatchResult<Map<String, Object>> r = BatchEngine.builder(spec, MAPS).build().dedupe(in);
        List<String> reasons = new ArrayList<>();
        r.rejections().forEach(x -> reasons.add(x.position() + ": " + x.reason()));
        assertEquals(5, r.rejections().size(), reasons.toString());
        assertTrue(reasons.get(0).startsWith("1: ") && reasons.get(0).contains("required field 'id' is missing"), reasons.get(0));
        assertTrue(reasons.get(1).startsWith("2: ") && reasons.get(1).contains("version field 'seq' is null"), reasons.get(1));
        assertTrue(reasons.get(2).startsWith("3: ") && reasons.get(2).contains("'seq' expects long"), reasons.get(2));
        assertTrue(reasons.get(3).startsWith("4: ") && reasons.get(3).contains("'total' expects double"), reasons.get(3));
        assertTrue(reasons.get(4).startsWith("5: ") && reasons.get(4).contains("no field 'colour'"), reasons.get(4));
        r.rejections().forEach(x -> assertEquals(in.get((int) x.position()), x.record(), "the record itself is kept"));
        BatchReport rep = r.report();
        assertEquals(7, rep.in());
        assertEquals(rep.in(), rep.accepted() + rep.rejected());
        assertEquals(1, rep.out());
        assertEquals(2L, r.survivors().get(0).get("seq"));
    }

    @Test
    void dedupe_vectorClockRejectsMalformedClocks() {
        DatasetSpec spec = DatasetSpec.builder().key("id").vectorClock("clock", DatasetSpec.Concurrent.PICK).build();
        List<Map<String, Object>> in = List.of(
                rec("id", "a", "clock", Map.of("w1", 1L)),
                rec("id", "b", "clock", Map.of("w1", -1L)),        // negative counter
                rec("id", "c", "clock", Map.of("w1", 1.5)),        // non-integer counter
                rec("id", "d"),                                    // no clock
                rec("id", "e", "clock", Map.of("w1", 1L, "w2", 0L)));
        BatchResult<Map<String, Object>> r = BatchEngine.builder(spec, MAPS).build().dedupe(in);
        assertEquals(3, r.rejections().size());
        assertTrue(r.rejections().get(0).reason().contains("counter of writer 'w1' is negative: -1"));
        assertTrue(r.rejections().get(1).reason().contains("expects long but got Double 1.5"), r.rejections().get(1).reason());
        assertTrue(r.rejections().get(2).reason().contains("clock field 'clock' is null"));
        assertEquals(5, r.report().accepted() + r.report().rejected());
        assertEquals(2, r.report().out());
    }

    @Test
    void dedupe_nullKeyRejectedUnlessAllowed() {
        RowSchema nullableKey = RowSchema.builder("t").field("id", FieldType.string().nullable())
                .field("seq", FieldType.int64()).build();
        DatasetSpec strict = DatasetSpec.builder().key("id").lastWriter("seq").build();
        OnefoldException e = org.junit.jupiter.api.Assertions.assertThrows(OnefoldException.class,
                () -> BatchEngine.forRows(strict, nullableKey));
        assertTrue(e.getMessage().contains("key field 'id' is nullable"), e.getMessage());

        DatasetSpec lenient = DatasetSpec.builder().key("id").lastWriter("seq").allowNullKey(true).build();
        BatchResult<Row> r = BatchEngine.forRows(lenient, nullableKey).dedupe(List.of(
                Row.of(nullableKey, null, 1L), Row.of(nullableKey, null, 2L), Row.of(nullableKey, "x", 1L)));
        assertEquals(2, r.survivors().size());
        assertEquals(null, r.survivors().get(0).get("id"), "null keys sort first");
    }

    @Test
    void dedupe_recordOfAnotherSchemaRejected() {
        RowSchema other = RowSchema.builder("other").field("id", FieldType.string()).build();
        DatasetSpec spec = DatasetSpec.builder().key("id").lastWriter("seq").build();
        BatchResult<Row> r = BatchEngine.forRows(spec, SCHEMA).dedupe(List.of(Row.of(other, "x")));
        assertEquals(1, r.report().rejected());
        assertTrue(r.rejections().get(0).reason().contains("does not have the dataset's schema order"));
    }
}
