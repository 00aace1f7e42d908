package dev.onefold.avro;

import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.util.List;
import java.util.Map;
import java.util.UUID;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/** Schemas shared by the adapter's tests, covering every shape the adapter maps. */
final class TestSchemas {
    private TestSchemas() {}

    /** A record with nested records, nullable unions, every logical type, enum, fixed, array and maps. */
    static final Schema WIDE = new Schema.Parser().parse("""
            {"type": "record", "name": "Wide", "namespace": "t",
             "fields": [
               {"name": "id", "type": "string"},
               {"name": "seq", "type": "long"},
               {"name": "outer", "type": {"type": "record", "name": "Outer", "fields": [
                   {"name": "inner", "type": ["null", {"type": "record", "name": "Inner", "fields": [
                       {"name": "name", "type": "string"},
                       {"name": "code", "type": "int"}]}]},
                   {"name": "amount", "type": {"type": "bytes", "logicalType": "decimal", "precision": 10, "scale": 2}}]}},
               {"name": "at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
               {"name": "at_us", "type": {"type": "long", "logicalType": "timestamp-micros"}},
               {"name": "day", "type": {"type": "int", "logicalType": "date"}},
               {"name": "ref", "type": {"type": "string", "logicalType": "uuid"}},
               {"name": "status", "type": {"type": "enum", "name": "Status", "symbols": ["A", "B", "C"]}},
               {"name": "tag", "type": {"type": "fixed", "name": "Tag", "size": 4}},
               {"name": "price", "type": {"type": "fixed", "name": "Price", "size": 8, "logicalType": "decimal",
                                           "precision": 12, "scale": 3}},
               {"name": "tags", "type": {"type": "array", "items": "string"}},
               {"name": "attrs", "type": {"type": "map", "values": ["null", "double"]}},
               {"name": "clock", "type": {"type": "map", "values": "long"}},
               {"name": "note", "type": ["null", "string"], "default": null},
               {"name": "deleted", "type": ["null", "boolean"], "default": null}]}""");

    static final Schema OUTER = WIDE.getField("outer").schema();
    static final Schema INNER = OUTER.getField("inner").schema().getTypes().get(1);

    /** A WIDE record with values derived from {@code n}. */
    static GenericRecord wide(String id, long seq, long n) {
        GenericRecord inner = new GenericData.Record(INNER);
        inner.put("name", "n" + n);
        inner.put("code", (int) n);
        GenericRecord outer = new GenericData.Record(OUTER);
        outer.put("inner", Math.floorMod(n, 3) == 0 ? null : inner);
        outer.put("amount", ByteBuffer.wrap(BigDecimal.valueOf(n * 7, 2).unscaledValue().toByteArray()));
        GenericRecord r = new GenericData.Record(WIDE);
        r.put("id", id);
        r.put("seq", seq);
        r.put("outer", outer);
        r.put("at", 1_700_000_000_000L + n);
        r.put("at_us", -n * 1000 - 1);
        r.put("day", (int) (n - 10));
        r.put("ref", new UUID(n, -n).toString());
        r.put("status", new GenericData.EnumSymbol(WIDE.getField("status").schema(), List.of("A", "B", "C").get(Math.floorMod(n, 3))));
        r.put("tag", new GenericData.Fixed(WIDE.getField("tag").schema(), new byte[] {1, 2, 3, (byte) n}));
        r.put("price", new GenericData.Fixed(WIDE.getField("price").schema(),
                ByteBuffer.allocate(8).putLong(n * 1001 - 5000).array()));
        r.put("tags", List.of("x" + n, "y"));
        r.put("attrs", Math.floorMod(n, 2) == 0 ? Map.of("a", 1.5 * n, "b", Double.NaN) : new java.util.HashMap<>(Map.of("z", -0.0)));
        r.put("clock", Map.of("w" + Math.floorMod(n, 2), n + 1));
        r.put("note", Math.floorMod(n, 2) == 0 ? null : "note " + n);
        r.put("deleted", null);
        return r;
    }

    static Schema parse(String json) {
        return new Schema.Parser().parse(json);
    }
}
