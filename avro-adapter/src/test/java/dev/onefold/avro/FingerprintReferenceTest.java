package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.OnefoldException;
import java.util.HexFormat;
import java.util.List;
import org.apache.avro.Schema;
import org.apache.avro.SchemaNormalization;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.api.Test;

/**
 * Canonical forms, fingerprints and single-object bytes checked against published values (see
 * shared/REFERENCES.md section 1; each check names its source).
 */
class FingerprintReferenceTest {

    // ---- Parsing Canonical Form and CRC-64-AVRO ----

    /** Source: apache/avro share/test/data/schema-tests.txt, cases as numbered there (REFERENCES.md 1b). */
    @ParameterizedTest(name = "schema-tests.txt case {0}")
    @CsvSource(delimiter = '|', textBlock = """
            000 | "null"                                                                   | "null"                                                                 | 7195948357588979594
            004 | "int"                                                                    | "int"                                                                  | 8247732601305521295
            006 | "long"                                                                   | "long"                                                                 | -3434872931120570953
            014 | "string"                                                                 | "string"                                                               | -8142146995180207161
            019 | {"fields":[], "type":"record", "name":"foo"}                             | {"name":"foo","type":"record","fields":[]}                             | -4824392279771201922
            020 | {"fields":[], "type":"record", "name":"foo", "namespace":"x.y"}          | {"name":"x.y.foo","type":"record","fields":[]}                         | 5916914534497305771
            021 | {"fields":[], "type":"record", "name":"a.b.foo", "namespace":"x.y"}      | {"name":"a.b.foo","type":"record","fields":[]}                         | -4616218487480524110
            025 | {"fields":[{"type":{"type":"boolean"}, "name":"f1"}], "type":"record", "name":"foo"} | {"name":"foo","type":"record","fields":[{"name":"f1","type":"boolean"}]} | 7843277075252814651
            029 | {"name":"foo","type":"fixed","size":15}                                  | {"name":"foo","type":"fixed","size":15}                                | 1756455273707447556
            032 | { "values":"string", "type":"map"}                                      | {"type":"map","values":"string"}                                       | -8732877298790414990
            """)
    void fingerprint_matchesPublishedSchemaTests(String caseNo, String input, String canonical, long fingerprint) {
        Schema s = new Schema.Parser().parse(input);
        assertEquals(canonical, SchemaNormalization.toParsingForm(s), "canonical form, case " + caseNo);
        assertEquals(fingerprint, AvroPayloadCodec.fingerprint(s), "fingerprint, case " + caseNo);
        assertEquals(String.format("%016x", fingerprint), AvroPayloadCodec.writerIdOf(s), "writer id, case " + caseNo);
    }

    /** Source: schema-tests.txt cases 022-024 add doc and aliases to case 019 and keep its fingerprint (REFERENCES.md 1b). */
    @Test
    void fingerprint_ignoresDocAndAliases() {
        for (String input : List.of(
                "{\"fields\":[], \"type\":\"record\", \"name\":\"foo\", \"doc\":\"Useful info\"}",
                "{\"fields\":[], \"type\":\"record\", \"name\":\"foo\", \"aliases\":[\"foo\",\"bar\"]}",
                "{\"fields\":[], \"type\":\"record\", \"name\":\"foo\", \"doc\":\"foo\", \"aliases\":[\"foo\",\"bar\"]}")) {
            assertEquals(-4824392279771201922L, AvroPayloadCodec.fingerprint(new Schema.Parser().parse(input)), input);
        }
    }

    /** An embedded spec is a custom attribute, which the canonical form strips ([STRIP] rule, Avro specification). */
    @Test
    void fingerprint_ignoresEmbeddedSpec() {
        Schema bare = new Schema.Parser().parse(
                "{\"type\":\"record\",\"name\":\"r\",\"fields\":[{\"name\":\"k\",\"type\":\"long\"}]}");
        Schema withSpec = AvroDataset.withEmbeddedSpec(bare, dev.onefold.DatasetSpec.fromJson(
                "{\"key\":[\"k\"],\"merge\":{\"policy\":\"last-writer\",\"version\":\"k\"}}", "spec"));
        assertTrue(AvroDataset.embeddedSpec(withSpec).isPresent());
        assertEquals(AvroPayloadCodec.fingerprint(bare), AvroPayloadCodec.fingerprint(withSpec));
    }

    // ---- single-object encoding ----

    /** Source: apache/avro share/test/data/messageV1/test_schema.avsc (REFERENCES.md 1c). */
    static final Schema TEST_MESSAGE = new Schema.Parser().parse("""
            {"type": "record", "name": "TestMessage", "namespace": "org.apache.avro",
             "fields": [{"name": "id", "type": "long"}, {"name": "name", "type": "string"},
                        {"name": "tags", "type": {"type": "array", "items": "string"}}]}""");

    /** Source: apache/avro share/test/data/messageV1/test_message.bin, 38 bytes (REFERENCES.md 1c). */
    static final byte[] TEST_MESSAGE_BIN = HexFormat.of().parseHex(
            "c301" + "a92de1f8a242f53d" + "54" + "0842696c6c" + "04" + "12646f675f6c6f766572" + "12636174" + "5f6861746572" + "00");

    private static GenericRecord testMessageDatum() {
        // Source: messageV1/test_message.json {"id":42,"name":"Bill","tags":["dog_lover","cat_hater"]}
        GenericRecord r = new GenericData.Record(TEST_MESSAGE);
        r.put("id", 42L);
        r.put("name", "Bill");
        r.put("tags", List.of("dog_lover", "cat_hater"));
        return r;
    }

    @Test
    void encodeRecord_matchesInteropMessageByteForByte() {
        assertEquals(38, TEST_MESSAGE_BIN.length);
        byte[] encoded = AvroPayloadCodec.of(TEST_MESSAGE).encodeRecord(testMessageDatum());
        assertArrayEquals(TEST_MESSAGE_BIN, encoded);
    }

    @Test
    void writerId_isInteropFingerprint() {
        // Source: REFERENCES.md 1c (+calc): the CRC-64-AVRO of the canonical form is 0x3df542a2f8e12da9
        assertEquals("3df542a2f8e12da9", AvroPayloadCodec.of(TEST_MESSAGE).writerId());
    }

    @Test
    void decode_readsInteropMessage() {
        AvroPayloadCodec codec = AvroPayloadCodec.of(TEST_MESSAGE);
        var row = codec.decode("3df542a2f8e12da9", TEST_MESSAGE_BIN);
        assertEquals(42L, row.get("id"));
        assertEquals("Bill", row.get("name"));
        assertEquals(List.of("dog_lover", "cat_hater"), row.get("tags"));
        assertEquals(codec.access().toRow(testMessageDatum()), codec.access().toRow(codec.decodeRecord(TEST_MESSAGE_BIN)));
    }

    @Test
    void decode_withoutMarker_isCorrupt() {
        byte[] bad = TEST_MESSAGE_BIN.clone();
        bad[0] = (byte) 0xC2; // the specification's marker is C3 01 (Single-object encoding)
        OnefoldException e = assertThrows(OnefoldException.class,
                () -> AvroPayloadCodec.of(TEST_MESSAGE).decode("3df542a2f8e12da9", bad));
        assertEquals(OnefoldException.Kind.CORRUPT, e.kind());
        assertTrue(e.getMessage().contains("c2 01"), e.getMessage());
    }

    @Test
    void header_writesFingerprintLittleEndian() {
        // Source: schema-tests.txt case 019 fingerprint -4824392279771201922 (REFERENCES.md 1b); as an unsigned
        // number 0xbd0c50c84319be7e (+calc), so the header's 8 bytes are 7e be 19 43 c8 50 0c bd
        Schema r = new Schema.Parser().parse("{\"fields\":[], \"type\":\"record\", \"name\":\"foo\"}");
        byte[] payload = AvroPayloadCodec.of(r).encodeRecord(new GenericData.Record(r));
        assertArrayEquals(HexFormat.of().parseHex("c301" + "7ebe1943c8500cbd"), payload);
    }

    // ---- Avro binary encoding examples from the specification ----

    @Test
    void encode_bodyMatchesSpecificationRecordExample() {
        // Source: Avro specification, Binary Encoding: record {a: long = 27, b: string = "foo"} is 36 06 66 6f 6f
        Schema s = new Schema.Parser().parse("""
                {"type":"record","name":"test","fields":[{"name":"a","type":"long"},{"name":"b","type":"string"}]}""");
        GenericRecord r = new GenericData.Record(s);
        r.put("a", 27L);
        r.put("b", "foo");
        assertArrayEquals(HexFormat.of().parseHex("3606666f6f"), body(AvroPayloadCodec.of(s).encodeRecord(r)));
    }

    @Test
    void encode_bodyMatchesSpecificationUnionExample() {
        // Source: Avro specification, Binary Encoding: union ["null","string"]: null is 00, "a" is 02 02 61
        Schema s = new Schema.Parser().parse("""
                {"type":"record","name":"u","fields":[{"name":"v","type":["null","string"]}]}""");
        AvroPayloadCodec codec = AvroPayloadCodec.of(s);
        GenericRecord r = new GenericData.Record(s);
        assertArrayEquals(new byte[] {0x00}, body(codec.encodeRecord(r)));
        r.put("v", "a");
        assertArrayEquals(new byte[] {0x02, 0x02, 0x61}, body(codec.encodeRecord(r)));
    }

    private static byte[] body(byte[] payload) {
        return java.util.Arrays.copyOfRange(payload, AvroPayloadCodec.HEADER_BYTES, payload.length);
    }
}
