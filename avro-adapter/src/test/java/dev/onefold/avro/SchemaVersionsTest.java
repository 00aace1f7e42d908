package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import java.util.List;
import org.apache.avro.Schema;
import org.junit.jupiter.api.Test;

class SchemaVersionsTest {

    private static String refused(SchemaVersions versions, Schema next) {
        OnefoldException e = assertThrows(OnefoldException.class, () -> versions.register(next));
        assertEquals(OnefoldException.Kind.INVALID_SCHEMA, e.kind());
        assertTrue(e.getMessage().contains("needs a new dataset"), "the remedy is named: " + e.getMessage());
        return e.getMessage();
    }

    @Test
    void register_compatibleChange_isAccepted() {
        // added field with default, removed field, int promoted to long: all resolvable (Avro specification,
        // Schema Resolution)
        SchemaVersions v = SchemaVersions.first(Evolution.V1, Evolution.SPEC).register(Evolution.V2);
        assertEquals(List.of(Evolution.V1, Evolution.V2), v.versions());
        assertEquals(Evolution.V2, v.latest());
        byte[] old = AvroPayloadCodec.of(Evolution.V1).encodeRecord(Evolution.v1("k", 1, 2));
        AvroPayloadCodec codec = v.codec(DecodeLimits.DEFAULT);
        assertEquals(codec.access().toRow(Evolution.v1AsV2(Evolution.v1("k", 1, 2))),
                codec.decode(AvroPayloadCodec.writerIdOf(Evolution.V1), old));
    }

    @Test
    void register_addedFieldWithoutDefault_isRefusedWithAvrosReason() {
        Schema next = TestSchemas.parse(Evolution.V2.toString().replace(",\"default\":\"none\"", ""));
        String m = refused(SchemaVersions.first(Evolution.V1, Evolution.SPEC), next);
        assertTrue(m.contains("cannot read version 1") && m.contains("reader field missing default value") && m.contains("added"), m);
    }

    @Test
    void register_mustReadEveryEarlierVersion() {
        SchemaVersions v = SchemaVersions.first(Evolution.V1, Evolution.SPEC).register(Evolution.V2);
        // v3 restores "count" to int: it reads v1 but not v2 (long does not narrow to int)
        Schema v3 = TestSchemas.parse(Evolution.V2.toString().replace("{\"name\":\"count\",\"type\":\"long\"}",
                "{\"name\":\"count\",\"type\":\"int\"}"));
        String m = refused(v, v3);
        assertTrue(m.contains("cannot read version 2") && !m.contains("cannot read version 1"), m);
    }

    @Test
    void register_keyTypeChange_isRefusedEvenWhenAvroCanResolveIt() {
        DatasetSpec spec = DatasetSpec.fromJson(
                "{\"key\": [\"count\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}", "spec");
        // int -> long is a legal Avro promotion, but a key's encoded bytes change with its type
        String m = refused(SchemaVersions.first(Evolution.V1, spec), Evolution.V2);
        assertTrue(m.contains("field 'count' has a role in the spec and changes type from int in version 1 to long"), m);
        assertTrue(!m.contains("cannot read"), m);
    }

    @Test
    void register_enumKeyDroppingSymbol_isRefused() {
        Schema v1 = TestSchemas.parse("""
                {"type":"record","name":"r","fields":[{"name":"k","type":{"type":"enum","name":"K","symbols":["A","B"]}},
                 {"name":"seq","type":"long"}]}""");
        Schema v2 = TestSchemas.parse("""
                {"type":"record","name":"r","fields":[{"name":"k","type":{"type":"enum","name":"K","symbols":["A"],"default":"A"}},
                 {"name":"seq","type":"long"}]}""");
        DatasetSpec spec = DatasetSpec.fromJson("{\"key\": [\"k\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}",
                "spec");
        String m = refused(SchemaVersions.first(v1, spec), v2);
        assertTrue(m.contains("enum field 'k'") && m.contains("drops symbols [B]"), m);
    }

    @Test
    void register_embeddedSpecChangingKey_isRefused_butNewChecksAreAccepted() {
        Schema v1 = AvroDataset.withEmbeddedSpec(Evolution.V1, Evolution.SPEC);
        SchemaVersions v = SchemaVersions.first(v1, null);
        DatasetSpec otherKey = DatasetSpec.fromJson(
                "{\"key\": [\"id\", \"seq\"], \"order\": [\"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}",
                "spec");
        String m = refused(v, AvroDataset.withEmbeddedSpec(Evolution.V2, otherKey));
        assertTrue(m.contains("the spec changes key: version 1 says [\"id\"], the new version says [\"id\",\"seq\"]"), m);
        DatasetSpec withCheck = DatasetSpec.fromJson("""
                {"key": ["id"], "order": ["id"], "merge": {"policy": "last-writer", "version": "seq"},
                 "checks": [{"aggregate": "sum", "field": "count"}]}""", "spec");
        SchemaVersions next = v.register(AvroDataset.withEmbeddedSpec(Evolution.V2, withCheck));
        assertEquals(withCheck, next.spec());
    }

    @Test
    void of_listsVersionsInOrder_andStoreFindsEach() {
        SchemaVersions v = SchemaVersions.of(List.of(Evolution.V1, Evolution.V2), Evolution.SPEC);
        assertEquals(Evolution.V1, v.store().find(AvroPayloadCodec.fingerprint(Evolution.V1)));
        assertEquals(Evolution.V2, v.store().find(AvroPayloadCodec.fingerprint(Evolution.V2)));
        assertEquals(null, v.store().find(42L));
        assertEquals(Evolution.SPEC, v.dataset().spec());
    }
}
