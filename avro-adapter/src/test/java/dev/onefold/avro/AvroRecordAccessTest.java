package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.BatchEngine;
import dev.onefold.BatchResult;
import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.record.FieldType;
import dev.onefold.record.FieldType.Kind;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.UUID;
import java.util.function.Function;
import org.apache.avro.Conversions;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericEnumSymbol;
import org.apache.avro.generic.GenericFixed;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.Test;

class AvroRecordAccessTest {
    private static final AvroRecordAccess ACCESS = AvroRecordAccess.of(TestSchemas.WIDE);

    // ---- schema mapping ----

    @Test
    void schema_mapsEveryShape() {
        RowSchema s = ACCESS.schema();
        assertEquals("t.Wide", s.name());
        assertEquals(FieldType.string(), s.resolve("id").type());
        assertEquals(FieldType.string(), s.resolve("outer.inner.name").type().required());
        assertTrue(s.resolve("outer.inner.name").type().isNullable(), "nullable on the way through a [null, record] union");
        assertEquals(FieldType.decimal(10, 2), s.resolve("outer.amount").type());
        assertEquals(FieldType.timestampMillis(), s.resolve("at").type());
        assertEquals(FieldType.timestampMicros(), s.resolve("at_us").type());
        assertEquals(FieldType.date(), s.resolve("day").type());
        assertEquals(FieldType.uuid(), s.resolve("ref").type());
        assertEquals(FieldType.string(), s.resolve("status").type());
        assertEquals(FieldType.bytes(), s.resolve("tag").type());
        assertEquals(FieldType.decimal(12, 3), s.resolve("price").type());
        assertEquals(FieldType.list(FieldType.string()), s.resolve("tags").type());
        assertEquals(FieldType.map(FieldType.float64().nullable()), s.resolve("attrs").type());
        assertEquals(FieldType.map(FieldType.int64()), s.resolve("clock").type());
        assertEquals(FieldType.string().nullable(), s.resolve("note").type());
    }

    @Test
    void of_unionOfTwoTypes_isInvalidSchemaNamingPath() {
        Schema s = TestSchemas.parse("""
                {"type":"record","name":"r","fields":[{"name":"a","type":{"type":"record","name":"n","fields":[
                  {"name":"b","type":["null","int","string"]}]}}]}""");
        OnefoldException e = assertThrows(OnefoldException.class, () -> AvroRecordAccess.of(s));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
        assertTrue(e.getMessage().contains("field 'a.b'") && e.getMessage().contains("2 non-null branches"), e.getMessage());
    }

    @Test
    void of_recursiveRecord_isInvalidSchemaNamingPath() {
        Schema s = TestSchemas.parse("""
                {"type":"record","name":"Node","fields":[{"name":"v","type":"int"},{"name":"next","type":["null","Node"]}]}""");
        OnefoldException e = assertThrows(OnefoldException.class, () -> AvroRecordAccess.of(s));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
        assertTrue(e.getMessage().contains("field 'next'") && e.getMessage().contains("recursive"), e.getMessage());
    }

    @Test
    void of_nullField_isInvalidSchema() {
        Schema s = TestSchemas.parse("{\"type\":\"record\",\"name\":\"r\",\"fields\":[{\"name\":\"n\",\"type\":\"null\"}]}");
        OnefoldException e = assertThrows(OnefoldException.class, () -> AvroRecordAccess.of(s));
        assertTrue(e.getMessage().contains("field 'n'"), e.getMessage());
    }

    @Test
    void of_nonRecord_isInvalidSchema() {
        OnefoldException e = assertThrows(OnefoldException.class, () -> AvroRecordAccess.of(Schema.create(Schema.Type.LONG)));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
    }

    // ---- conversions ----

    @Test
    void fromRow_rebuildsEnumsFixedAndValidRecords() {
        for (int n = 0; n < 6; n++) {
            GenericRecord original = TestSchemas.wide("k" + n, n, n);
            Row row = ACCESS.toRow(original);
            GenericRecord rebuilt = ACCESS.fromRow(row);
            assertTrue(GenericData.get().validate(TestSchemas.WIDE, rebuilt), "valid for the schema: " + rebuilt);
            assertInstanceOf(GenericEnumSymbol.class, rebuilt.get("status"));
            assertInstanceOf(GenericFixed.class, rebuilt.get("tag"));
            assertEquals(original.get("status").toString(), rebuilt.get("status").toString());
            assertEquals(row, ACCESS.toRow(rebuilt));
            // Avro's own writer and reader take the rebuilt record and give back the same content
            assertEquals(row, ACCESS.toRow(avroRoundTrip(rebuilt)));
        }
    }

    private static GenericRecord avroRoundTrip(GenericRecord r) {
        var out = new java.io.ByteArrayOutputStream();
        var enc = org.apache.avro.io.EncoderFactory.get().binaryEncoder(out, null);
        try {
            new org.apache.avro.generic.GenericDatumWriter<GenericRecord>(r.getSchema()).write(r, enc);
            enc.flush();
            return new org.apache.avro.generic.GenericDatumReader<GenericRecord>(r.getSchema())
                    .read(null, org.apache.avro.io.DecoderFactory.get().binaryDecoder(out.toByteArray(), null));
        } catch (java.io.IOException e) {
            throw new java.io.UncheckedIOException(e);
        }
    }

    @Test
    void toRow_acceptsConvertedLogicalValues() {
        GenericRecord raw = TestSchemas.wide("k", 1, 4);
        GenericRecord converted = new GenericData.Record(TestSchemas.WIDE);
        for (Schema.Field f : TestSchemas.WIDE.getFields()) {
            converted.put(f.pos(), raw.get(f.pos()));
        }
        converted.put("at", Instant.ofEpochMilli((Long) raw.get("at")));
        converted.put("at_us", Instant.ofEpochSecond(-1, 999_995_000)); // -5 microseconds
        converted.put("day", LocalDate.ofEpochDay((Integer) raw.get("day")));
        converted.put("ref", UUID.fromString((String) raw.get("ref")));
        converted.put("price", new Conversions.DecimalConversion().fromFixed((GenericFixed) raw.get("price"),
                TestSchemas.WIDE.getField("price").schema(), TestSchemas.WIDE.getField("price").schema().getLogicalType()));
        Row a = ACCESS.toRow(raw);
        Row b = ACCESS.toRow(converted);
        assertEquals(a.with("at_us", -5L), b);
        assertEquals(new BigDecimal("-0.996"), b.get("price")); // 4 * 1001 - 5000 = -996 unscaled at scale 3
    }

    @Test
    void toRow_wrongNestedValue_namesFieldPath() {
        GenericRecord r = TestSchemas.wide("k", 1, 1);
        ((GenericRecord) ((GenericRecord) r.get("outer")).get("inner")).put("code", "not an int");
        OnefoldException e = assertThrows(OnefoldException.class, () -> ACCESS.toRow(r));
        assertEquals(OnefoldException.Kind.INVALID_RECORD, e.kind());
        assertTrue(e.getMessage().contains("field 'outer.inner.code'") && e.getMessage().contains("\"int\""), e.getMessage());
    }

    @Test
    void toRow_nullInRequiredField_namesFieldPath() {
        GenericRecord r = TestSchemas.wide("k", 1, 1);
        r.put("tags", java.util.Arrays.asList("a", null));
        OnefoldException e = assertThrows(OnefoldException.class, () -> ACCESS.toRow(r));
        assertTrue(e.getMessage().contains("field 'tags[]'") && e.getMessage().contains("not nullable"), e.getMessage());
    }

    @Test
    void toRow_unknownEnumSymbolAndWrongFixedSize_areRejected() {
        GenericRecord r = TestSchemas.wide("k", 1, 1);
        r.put("status", new GenericData.EnumSymbol(TestSchemas.WIDE.getField("status").schema(), "Z"));
        assertTrue(assertThrows(OnefoldException.class, () -> ACCESS.toRow(r)).getMessage().contains("field 'status'"));
        GenericRecord f = TestSchemas.wide("k", 1, 1);
        f.put("tag", new GenericData.Fixed(TestSchemas.WIDE.getField("tag").schema(), new byte[3]));
        OnefoldException e = assertThrows(OnefoldException.class, () -> ACCESS.toRow(f));
        assertTrue(e.getMessage().contains("field 'tag'") && e.getMessage().contains("size 4"), e.getMessage());
    }

    @Test
    void toRow_recordOfAnotherSchema_isRejectedWithFingerprints() {
        Schema other = TestSchemas.parse("{\"type\":\"record\",\"name\":\"t.Wide\",\"fields\":[{\"name\":\"id\",\"type\":\"string\"}]}");
        GenericRecord r = new GenericData.Record(other);
        r.put("id", "x");
        OnefoldException e = assertThrows(OnefoldException.class, () -> ACCESS.toRow(r));
        assertTrue(e.getMessage().contains(AvroPayloadCodec.writerIdOf(other)), e.getMessage());
    }

    // ---- logical types as key and order values ----

    /**
     * The batch engine sorts Avro logical values by their meaning. Reference orders: Java's own comparisons of
     * Instant, LocalDate and BigDecimal, and for uuid the text form's order (common practice: uuids are compared as
     * 128-bit unsigned numbers, which is the order of their lower-case hex text).
     */
    @Test
    void dedupe_ordersByLogicalTypesAsTheirMeaning() {
        Random random = new Random(7);
        List<GenericRecord> records = new ArrayList<>();
        for (int i = 0; i < 200; i++) {
            GenericRecord r = TestSchemas.wide("k" + i, 1, random.nextInt(1000) - 500);
            r.put("at_us", random.nextLong() / 1000);
            r.put("day", random.nextInt(200_000) - 100_000);
            r.put("ref", new UUID(random.nextLong(), random.nextLong()).toString());
            records.add(r);
        }
        // decimals are read back with Avro's own DecimalConversion, independent of the adapter's mapping
        Conversions.DecimalConversion decimals = new Conversions.DecimalConversion();
        Schema price = TestSchemas.WIDE.getField("price").schema();
        Schema amount = TestSchemas.OUTER.getField("amount").schema();
        checkOrder(records, "at_us", r -> Instant.EPOCH.plus((Long) r.get("at_us"), java.time.temporal.ChronoUnit.MICROS));
        checkOrder(records, "day", r -> LocalDate.ofEpochDay((Integer) r.get("day")));
        checkOrder(records, "ref", r -> r.get("ref").toString());
        checkOrder(records, "price", r -> decimals.fromFixed((GenericFixed) r.get("price"), price, price.getLogicalType()));
        checkOrder(records, "outer.amount", r -> decimals.fromBytes(
                ((ByteBuffer) ((GenericRecord) r.get("outer")).get("amount")).duplicate(), amount, amount.getLogicalType()));
    }

    @SuppressWarnings({"unchecked", "rawtypes"})
    private static void checkOrder(List<GenericRecord> records, String orderField, Function<GenericRecord, Comparable> meaning) {
        DatasetSpec spec = DatasetSpec.builder().key("id").orderBy(orderField).lastWriter("seq").build();
        BatchEngine<GenericRecord> engine = AvroDataset.of(TestSchemas.WIDE, spec).engine().build();
        List<GenericRecord> out = engine.dedupe(records).survivors();
        assertEquals(records.size(), out.size());
        List<GenericRecord> expected = new ArrayList<>(records);
        Comparator<GenericRecord> byMeaning = Comparator.comparing(meaning);
        expected.sort(byMeaning.thenComparing(r -> r.get("id").toString()));
        assertEquals(expected.stream().map(r -> r.get("id").toString()).toList(),
                out.stream().map(r -> r.get("id").toString()).toList(), "order by " + orderField);
    }

    // ---- ingest validation and field-wise merge ----

    @Test
    void dedupe_nonConformingRecords_areRejectedWithPathAndCountsAddUp() {
        List<GenericRecord> batch = new ArrayList<>();
        for (int i = 0; i < 10; i++) {
            batch.add(TestSchemas.wide("k" + (i % 4), i, i));
        }
        GenericRecord bad = TestSchemas.wide("k9", 1, 1);
        bad.put("clock", Map.of("w", "not a long"));
        batch.add(bad);
        DatasetSpec spec = DatasetSpec.builder().key("id").lastWriter("seq").build();
        BatchResult<GenericRecord> r = AvroDataset.of(TestSchemas.WIDE, spec).engine().build().dedupe(batch);
        assertEquals(11, r.report().in());
        assertEquals(r.report().in(), r.report().accepted() + r.report().rejected());
        assertEquals(1, r.rejections().size());
        assertEquals(10, r.rejections().get(0).position());
        assertTrue(r.rejections().get(0).reason().contains("field 'clock{}'"), r.rejections().get(0).reason());
        assertEquals(4, r.survivors().size());
    }

    @Test
    void dedupe_fieldWiseMergedRecordsAreValidForTheSchema() {
        DatasetSpec spec = DatasetSpec.fromJson("""
                {"key": ["id"], "merge": {"policy": "field-wise", "version": "seq",
                  "fields": {"tags": "union", "attrs": "union", "note": "latest-non-null", "day": "max", "clock": "union"}}}""",
                "spec");
        AvroDataset dataset = AvroDataset.of(TestSchemas.WIDE, spec);
        List<GenericRecord> batch = new ArrayList<>();
        for (int i = 0; i < 12; i++) {
            batch.add(TestSchemas.wide("k" + (i % 3), i, i));
        }
        BatchResult<GenericRecord> r = dataset.engine().build().dedupe(batch);
        assertEquals(3, r.survivors().size());
        AvroPayloadCodec codec = dataset.codec(SchemaStore.inMemory(), DecodeLimits.DEFAULT);
        for (GenericRecord merged : r.survivors()) {
            assertTrue(GenericData.get().validate(TestSchemas.WIDE, merged), "merged record fits the schema: " + merged);
            Row row = dataset.access().toRow(merged);
            assertEquals(row, codec.decode(codec.writerId(), codec.encode(row)));
        }
        // k0 saw n = 0, 3, 6, 9: union of tags holds every delivered tag, note keeps the latest non-null (9)
        GenericRecord k0 = r.survivors().stream().filter(g -> g.get("id").toString().equals("k0")).findFirst().orElseThrow();
        assertEquals(Kind.LIST, dataset.access().schema().resolve("tags").type().kind());
        assertTrue(((List<?>) k0.get("tags")).stream().map(Object::toString).toList().containsAll(List.of("x0", "x3", "x6", "x9", "y")));
        assertEquals("note 9", k0.get("note").toString());
    }
}
