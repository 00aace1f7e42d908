package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.BatchEngine;
import dev.onefold.BatchResult;
import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.record.Row;
import java.math.BigDecimal;
import java.util.List;
import java.util.Map;
import java.util.UUID;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.Test;

class JsonLinesTest {
    private static final JsonLines LINES = JsonLines.of(TestSchemas.WIDE);
    private static final AvroRecordAccess ACCESS = AvroRecordAccess.of(TestSchemas.WIDE);

    private static final String PLAIN = """
            {"id": "a", "seq": 3, "outer": {"inner": {"name": "n", "code": -4}, "amount": 12.5},
             "at": "2024-02-29T00:00:00Z", "at_us": -1, "day": "2024-02-29",
             "ref": "123e4567-e89b-12d3-a456-426614174000", "status": "B", "tag": "AQIDBA==", "price": -0.996,
             "tags": ["x", "y"], "attrs": {"p": 1.5, "q": null, "r": "NaN"}, "clock": {"w": 7}, "note": null}""";

    @Test
    void parse_plainJson_readsEveryShape() {
        Row r = ACCESS.toRow(LINES.parse(PLAIN.replace("\n", " "), "in.jsonl line 1"));
        assertEquals(3L, r.get("seq"));
        // Source: REFERENCES.md section 7, 2024-02-29T00:00Z is 1709164800000 epoch millis (computed with java.time)
        assertEquals(1709164800000L, r.get("at"));
        assertEquals(1709164800000L / 86_400_000L, ((Integer) r.get("day")).longValue());
        assertEquals(new BigDecimal("12.50"), ((Row) r.get("outer")).get("amount"));
        assertEquals(new BigDecimal("-0.996"), r.get("price"));
        assertEquals(UUID.fromString("123e4567-e89b-12d3-a456-426614174000"), r.get("ref"));
        assertEquals("B", r.get("status"));
        assertEquals(java.nio.ByteBuffer.wrap(new byte[] {1, 2, 3, 4}), r.get("tag"));
        assertTrue(Double.isNaN((Double) ((Map<?, ?>) r.get("attrs")).get("r")));
        assertEquals(null, r.get("note"));
        assertEquals(null, r.get("deleted"), "a missing field takes its default");
    }

    @Test
    void parse_avroTaggedUnions_areAccepted() {
        String tagged = PLAIN.replace("\n", " ").replace("\"note\": null", "\"note\": {\"string\": \"hi\"}")
                .replace("\"inner\": {\"name\"", "\"inner\": {\"t.Inner\": {\"name\"").replace("\"code\": -4}", "\"code\": -4}}")
                .replace("\"q\": null", "\"q\": {\"double\": 2.0}");
        Row r = ACCESS.toRow(LINES.parse(tagged, "line"));
        assertEquals("hi", r.get("note"));
        assertEquals(-4, ((Row) ((Row) r.get("outer")).get("inner")).get("code"));
        assertEquals(2.0, ((Map<?, ?>) r.get("attrs")).get("q"));
    }

    @Test
    void write_thenParse_givesEqualRecords() {
        for (int n = -5; n < 20; n++) {
            GenericRecord g = TestSchemas.wide("k" + n, n, n);
            String line = LINES.write(g);
            assertTrue(!line.contains("\n"));
            assertEquals(ACCESS.toRow(g), ACCESS.toRow(LINES.parse(line, "line")), line);
        }
    }

    @Test
    void parse_errors_nameWhereAndFieldPath() {
        String base = PLAIN.replace("\n", " ");
        assertError(base.replace("\"code\": -4", "\"code\": 3000000000"), "field 'outer.inner.code'", "range of int");
        assertError(base.replace("\"status\": \"B\"", "\"status\": \"Q\""), "field 'status'", "[A, B, C]");
        assertError(base.replace("\"tag\": \"AQIDBA==\"", "\"tag\": \"AQI=\""), "field 'tag'", "size 4");
        assertError(base.replace("\"price\": -0.996", "\"price\": 0.0001"), "field 'price'", "scale 3");
        assertError(base.replace("\"seq\": 3,", "\"seq\": 3, \"extra\": 1,"), "no field 'extra'", "");
        assertError(base.replace("\"id\": \"a\",", ""), "field 'id'", "missing and has no default");
        assertError(base.replace("\"at\": \"2024-02-29T00:00:00Z\"", "\"at\": \"2024-02-29T00:00:00.0001Z\""), "field 'at'",
                "finer than milliseconds");
        assertError(base.replace("\"tags\": [\"x\", \"y\"]", "\"tags\": [\"x\", null]"), "field 'tags[1]'", "not nullable");
        assertError("{\"id\": ", "invalid JSON", "");
    }

    private static void assertError(String line, String part1, String part2) {
        OnefoldException e = assertThrows(OnefoldException.class, () -> LINES.parse(line, "in.jsonl line 9"));
        assertEquals(OnefoldException.Kind.INVALID_RECORD, e.kind());
        assertTrue(e.getMessage().startsWith("in.jsonl line 9") && e.getMessage().contains(part1) && e.getMessage().contains(part2),
                e.getMessage());
    }

    @Test
    void lineAccess_feedsTheEngineAndRejectsBadLinesWithTheirPosition() {
        String good = PLAIN.replace("\n", " ");
        List<String> lines = List.of(good, good.replace("\"seq\": 3", "\"seq\": 5"), "not json",
                good.replace("\"id\": \"a\"", "\"id\": \"b\""));
        DatasetSpec spec = DatasetSpec.builder().key("id").lastWriter("seq").build();
        BatchResult<String> r = BatchEngine.builder(spec, LINES.lineAccess()).build().dedupe(lines);
        assertEquals(2, r.survivors().size());
        assertEquals(1, r.rejections().size());
        assertEquals(2, r.rejections().get(0).position());
        assertEquals("not json", r.rejections().get(0).record());
        assertEquals(5L, ACCESS.toRow(LINES.parse(r.survivors().get(0), "out")).get("seq"));
    }
}
