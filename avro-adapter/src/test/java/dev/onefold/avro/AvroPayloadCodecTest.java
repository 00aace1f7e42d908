package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.BatchEngine;
import dev.onefold.BatchResult;
import dev.onefold.OnefoldException;
import dev.onefold.record.Row;
import java.io.ByteArrayOutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class AvroPayloadCodecTest {
    private static final AvroPayloadCodec V1 = AvroPayloadCodec.of(Evolution.V1);
    private static final AvroPayloadCodec V2 = AvroPayloadCodec.of(Evolution.V2, SchemaStore.inMemory(Evolution.V1),
            DecodeLimits.DEFAULT);

    // ---- round trip and schema resolution ----

    @Test
    void decode_ownPayload_roundTrips() {
        for (int n = 0; n < 20; n++) {
            AvroPayloadCodec codec = AvroPayloadCodec.of(TestSchemas.WIDE);
            Row row = codec.access().toRow(TestSchemas.wide("k" + n, n, n));
            assertEquals(row, codec.decode(codec.writerId(), codec.encode(row)));
        }
    }

    @Test
    void decode_v1PayloadAsV2_appliesDefaultsPromotionAndRemoval() {
        for (int n = 0; n < 10; n++) {
            GenericRecord old = Evolution.v1("k" + n, n, -n * 1000);
            byte[] payload = V1.encodeRecord(old);
            Row read = V2.decode(V1.writerId(), payload);
            assertEquals(V2.access().toRow(Evolution.v1AsV2(old)), read);
            assertEquals((long) (-n * 1000), read.get("count"));
            assertEquals("none", read.get("added"));
        }
    }

    @Test
    void dedupe_v1PayloadsThenV2Records_mergeAsOneDataset() {
        List<byte[]> payloads = new ArrayList<>();
        for (int n = 0; n < 30; n++) {
            payloads.add(V1.encodeRecord(Evolution.v1("k" + (n % 10), n, n)));
        }
        for (int n = 25; n < 40; n++) {
            payloads.add(V2.encodeRecord(Evolution.v2("k" + (n % 10), n, n * 10L, "v2")));
        }
        BatchEngine<byte[]> engine = BatchEngine.builder(Evolution.SPEC, V2.payloadAccess()).build();
        BatchResult<byte[]> r = engine.dedupe(payloads);
        assertEquals(10, r.survivors().size());
        for (byte[] survivor : r.survivors()) {
            Row row = V2.decode(V2.writerId(), survivor);
            int k = Integer.parseInt(row.get("id").toString().substring(1));
            // the v2 deliveries with seq 30..39 are the newest version of every key
            long seq = 30 + k;
            assertEquals(seq, row.get("seq"));
            assertEquals(seq * 10, row.get("count"));
            assertEquals("v2", row.get("added"));
        }
    }

    // ---- resolution failures ----

    @Test
    void decode_unknownFingerprint_isInvalidSchemaNamingIt() {
        byte[] payload = V2.encodeRecord(Evolution.v2("k", 1, 1, "x"));
        OnefoldException e = assertThrows(OnefoldException.class, () -> V1.decode(V2.writerId(), payload));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
        assertTrue(e.getMessage().contains("unknown writer schema fingerprint " + V2.writerId()), e.getMessage());
    }

    @Test
    void decode_incompatibleWriter_isInvalidSchemaWithAvrosReasons() {
        // v1 cannot read v2: "count" long does not narrow to int, "old" has no default (Avro specification,
        // Schema Resolution)
        AvroPayloadCodec v1ReadingV2 = AvroPayloadCodec.of(Evolution.V1, SchemaStore.inMemory(Evolution.V2), DecodeLimits.DEFAULT);
        byte[] payload = V2.encodeRecord(Evolution.v2("k", 1, 1, "x"));
        OnefoldException e = assertThrows(OnefoldException.class, () -> v1ReadingV2.decode(V2.writerId(), payload));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
        assertTrue(e.getMessage().contains("cannot be resolved") && e.getMessage().contains("/fields/2/type")
                && e.getMessage().contains("old"), e.getMessage());
    }

    @Test
    void decode_writerIdDisagreesWithHeader_isCorrupt() {
        byte[] payload = V1.encodeRecord(Evolution.v1("k", 1, 1));
        OnefoldException e = assertThrows(OnefoldException.class, () -> V2.decode(V2.writerId(), payload));
        assertEquals(OnefoldException.Kind.CORRUPT, e.kind());
    }

    // ---- hostile input ----

    private static final Schema BLOB = TestSchemas.parse("""
            {"type":"record","name":"Blob","fields":[{"name":"s","type":"string"},{"name":"b","type":"bytes"},
             {"name":"n","type":{"type":"array","items":{"type":"record","name":"Empty","fields":[]}}},{"name":"e","type":{"type":"enum","name":"E","symbols":["X"]}},
             {"name":"u","type":["null","long"]}]}""");

    private static byte[] blob(byte[] body) {
        byte[] header = Arrays.copyOf(AvroPayloadCodec.of(BLOB).encodeRecord(blobRecord()), AvroPayloadCodec.HEADER_BYTES);
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        out.writeBytes(header);
        out.writeBytes(body);
        return out.toByteArray();
    }

    private static GenericRecord blobRecord() {
        GenericRecord r = new org.apache.avro.generic.GenericData.Record(BLOB);
        r.put("s", "");
        r.put("b", java.nio.ByteBuffer.allocate(0));
        r.put("n", List.of());
        r.put("e", new org.apache.avro.generic.GenericData.EnumSymbol(BLOB.getField("e").schema(), "X"));
        return r;
    }

    private static String corrupt(DecodeLimits limits, int... body) {
        byte[] bytes = new byte[body.length];
        for (int i = 0; i < body.length; i++) {
            bytes[i] = (byte) body[i];
        }
        AvroPayloadCodec codec = AvroPayloadCodec.of(BLOB, SchemaStore.inMemory(), limits);
        OnefoldException e = assertThrows(OnefoldException.class, () -> codec.decode(codec.writerId(), blob(bytes)));
        assertEquals(OnefoldException.Kind.CORRUPT, e.kind(), e.getMessage());
        return e.getMessage();
    }

    @Test
    void decode_validBlob_passes() {
        AvroPayloadCodec codec = AvroPayloadCodec.of(BLOB);
        // s="", b=empty, n=[] , e=0, u=null (Avro specification, Binary Encoding)
        Row r = codec.decode(codec.writerId(), blob(new byte[] {0, 0, 0, 0, 0}));
        assertEquals("", r.get("s"));
    }

    @Test
    void decode_stringClaimingTwoGigabytes_isCorruptNotOutOfMemory() {
        // zig-zag varint of 2^31 - 1 = fe ff ff ff 0f (Avro specification, Binary Encoding: zig-zag, base-128)
        String m = corrupt(DecodeLimits.DEFAULT, 0xfe, 0xff, 0xff, 0xff, 0x0f);
        assertTrue(m.contains("field 's'") && m.contains("exceeds the limit"), m);
    }

    @Test
    void decode_stringLongerThanPayload_isCorrupt() {
        String m = corrupt(DecodeLimits.DEFAULT, 0x20, 'a', 'b');
        assertTrue(m.contains("field 's'") && m.contains("16 bytes but 2 remain"), m);
    }

    @Test
    void decode_bytesOverLimit_isCorrupt() {
        String m = corrupt(new DecodeLimits(100, 3, 100, 64), 0, 0x08, 1, 2, 3, 4, 0, 0, 0);
        assertTrue(m.contains("field 'b'") && m.contains("bytes value of 4 bytes exceeds the limit of 3"), m);
    }

    @Test
    void decode_collectionOfEmptyItemsOverItemLimit_isCorrupt() {
        // a block of 2^40 empty records takes no bytes per item: only a count limit stops it
        String m = corrupt(DecodeLimits.DEFAULT, 0, 0, 0x80, 0x80, 0x80, 0x80, 0x80, 0x40, 0, 0, 0);
        assertTrue(m.contains("field 'n[]'") && m.contains("collection items exceed the limit of 1000000"), m);
    }

    @Test
    void decode_badEnumIndexUnionBranchAndTrailingBytes_areCorrupt() {
        assertTrue(corrupt(DecodeLimits.DEFAULT, 0, 0, 0, 0x02, 0).contains("enum index 1"));
        assertTrue(corrupt(DecodeLimits.DEFAULT, 0, 0, 0, 0, 0x04).contains("union branch 2"));
        assertTrue(corrupt(DecodeLimits.DEFAULT, 0, 0, 0, 0, 0, 7).contains("1 bytes after the end"));
        assertTrue(corrupt(DecodeLimits.DEFAULT, 0, 0, 0, 0, 0x02).contains("truncated"));
    }

    @Test
    void payloadAccess_hostilePayloads_areRejectedAndCountsAddUp() {
        AvroPayloadCodec codec = AvroPayloadCodec.of(BLOB, SchemaStore.inMemory(), DecodeLimits.DEFAULT);
        List<byte[]> batch = List.of(
                codec.encodeRecord(blobRecord()),
                blob(new byte[] {(byte) 0xfe, (byte) 0xff, (byte) 0xff, (byte) 0xff, 0x0f}),
                new byte[] {1, 2, 3},
                V1.encodeRecord(Evolution.v1("k", 1, 1)));
        List<String> reasons = new ArrayList<>();
        long n = 0;
        for (byte[] p : batch) {
            try {
                assertEquals("", codec.payloadAccess().toRow(p).get("s"));
                n++;
            } catch (OnefoldException e) {
                assertEquals(OnefoldException.Kind.INVALID_RECORD, e.kind());
                reasons.add(e.getMessage());
            }
        }
        assertEquals(batch.size(), n + reasons.size());
        assertEquals(1, n);
        assertTrue(reasons.get(0).contains("exceeds the limit"), reasons.get(0));
        assertTrue(reasons.get(1).contains("shorter than the 10-byte"), reasons.get(1));
        assertTrue(reasons.get(2).contains("unknown writer schema fingerprint"), reasons.get(2));
    }

    @Test
    void dedupe_payloadsOverLimits_areRejectedByTheEngine() {
        List<byte[]> batch = new ArrayList<>();
        for (int n = 0; n < 5; n++) {
            batch.add(V2.encodeRecord(Evolution.v2("k" + n, n, n, "x".repeat(n * 10))));
        }
        AvroPayloadCodec strict = AvroPayloadCodec.of(Evolution.V2, SchemaStore.inMemory(), new DecodeLimits(25, 25, 10, 64));
        BatchResult<byte[]> r = BatchEngine.builder(Evolution.SPEC, strict.payloadAccess()).build().dedupe(batch);
        assertEquals(5, r.report().in());
        assertEquals(3, r.report().accepted());
        assertEquals(2, r.rejections().size());
        assertEquals(List.of(3L, 4L), r.rejections().stream().map(dev.onefold.Rejection::position).toList());
        assertTrue(r.rejections().get(0).reason().contains("field 'added'"), r.rejections().get(0).reason());
    }

    // ---- schema stores ----

    @Test
    void directoryStore_findsWriterSchemasIncludingOnesAddedLater(@TempDir Path dir) throws Exception {
        AvroPayloadCodec v2 = AvroPayloadCodec.of(Evolution.V2, SchemaStore.directory(dir), DecodeLimits.DEFAULT);
        byte[] payload = V1.encodeRecord(Evolution.v1("k", 3, 4));
        OnefoldException e = assertThrows(OnefoldException.class, () -> v2.decode(V1.writerId(), payload));
        assertTrue(e.getMessage().contains("unknown writer schema fingerprint"), e.getMessage());
        Files.writeString(dir.resolve("item-v1.avsc"), Evolution.V1.toString());
        // make sure the directory's modification time moves even on coarse file-system clocks
        Files.setLastModifiedTime(dir, java.nio.file.attribute.FileTime.fromMillis(System.currentTimeMillis() + 5000));
        assertEquals(V2.access().toRow(Evolution.v1AsV2(Evolution.v1("k", 3, 4))), v2.decode(V1.writerId(), payload));
    }

    @Test
    void directoryStore_invalidFile_namesIt(@TempDir Path dir) throws Exception {
        Files.writeString(dir.resolve("broken.avsc"), "{\"type\": \"record\", \"name\": \"x\"");
        OnefoldException e = assertThrows(OnefoldException.class, () -> SchemaStore.directory(dir));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
        assertTrue(e.getMessage().contains("broken.avsc"), e.getMessage());
    }
}
