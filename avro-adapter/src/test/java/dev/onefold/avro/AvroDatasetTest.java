package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.avro.Schema;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class AvroDatasetTest {
    private static final String SPEC_JSON = """
            {"key": ["id"], "order": ["at", "-outer.inner.code"], "merge": {"policy": "last-writer", "version": "seq"},
             "tombstone": "deleted"}""";
    private static final DatasetSpec SPEC = DatasetSpec.fromJson(SPEC_JSON, "spec");

    private static Schema embedded(String specJson) {
        return AvroDataset.withEmbeddedSpec(TestSchemas.WIDE, DatasetSpec.fromJson(specJson, "spec"));
    }

    // ---- spec inside the schema ----

    @Test
    void of_specEmbeddedInSchema_isUsed() {
        Schema s = embedded(SPEC_JSON);
        assertTrue(s.toString().contains("\"" + AvroDataset.SPEC_ATTRIBUTE + "\":{\"key\":[\"id\"]"), s.toString());
        assertEquals(SPEC, AvroDataset.of(s).spec());
    }

    @Test
    void read_avscWithEmbeddedSpec_andSeparateSpecFile(@TempDir Path dir) throws Exception {
        Path avsc = dir.resolve("wide.avsc");
        Files.writeString(avsc, embedded(SPEC_JSON).toString());
        Path specFile = dir.resolve("wide.spec.json");
        Files.writeString(specFile, SPEC_JSON);
        assertEquals(SPEC, AvroDataset.read(avsc, null).spec());
        assertEquals(SPEC, AvroDataset.read(avsc, specFile).spec());
        Path bare = dir.resolve("bare.avsc");
        Files.writeString(bare, TestSchemas.WIDE.toString());
        assertEquals(SPEC, AvroDataset.read(bare, specFile).spec());
    }

    @Test
    void of_embeddedAndFileDisagree_listsEveryDifference() {
        Schema s = embedded(SPEC_JSON);
        DatasetSpec other = DatasetSpec.fromJson("""
                {"key": ["id", "seq"], "order": ["at", "-outer.inner.code"],
                 "merge": {"policy": "last-writer", "version": "day"}}""", "file");
        OnefoldException e = assertThrows(OnefoldException.class, () -> AvroDataset.of(s, other));
        assertEquals(OnefoldException.Kind.INVALID_SPEC, e.kind());
        String m = e.getMessage();
        assertTrue(m.contains("key: schema says [\"id\"], spec file says [\"id\",\"seq\"]"), m);
        assertTrue(m.contains("merge.version: schema says \"seq\", spec file says \"day\""), m);
        assertTrue(m.contains("tombstone: schema says \"deleted\", spec file has none"), m);
        assertTrue(!m.contains("order"), "equal entries are not listed: " + m);
    }

    @Test
    void of_noSpecAnywhere_isInvalidSpec() {
        OnefoldException e = assertThrows(OnefoldException.class, () -> AvroDataset.of(TestSchemas.WIDE));
        assertEquals(OnefoldException.Kind.INVALID_SPEC, e.kind());
        assertTrue(e.getMessage().contains("\"onefold\""), e.getMessage());
    }

    @Test
    void embeddedSpec_invalidAttribute_namesSchemaAndEntry() {
        Schema s = TestSchemas.parse("""
                {"type":"record","name":"r","fields":[{"name":"k","type":"long"}],
                 "onefold": {"key": ["k"], "merge": {"policy": "newest"}}}""");
        OnefoldException e = assertThrows(OnefoldException.class, () -> AvroDataset.embeddedSpec(s));
        assertTrue(e.getMessage().contains("schema r attribute \"onefold\"") && e.getMessage().contains("newest"), e.getMessage());
    }

    // ---- spec checked against the schema, messages naming Avro paths and types ----

    private static String problem(String specJson) {
        OnefoldException e = assertThrows(OnefoldException.class,
                () -> AvroDataset.of(TestSchemas.WIDE, DatasetSpec.fromJson(specJson, "spec")));
        assertEquals(OnefoldException.Kind.INVALID_SPEC, e.kind());
        return e.getMessage();
    }

    @Test
    void of_missingNestedField_namesAvroRecordAndPath() {
        String m = problem("{\"key\": [\"outer.inner.port\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}");
        assertTrue(m.contains("field path 'outer.inner.port': Avro record t.Inner has no field 'port' (it has [name, code])"), m);
    }

    @Test
    void of_nullableKey_namesUnionUnlessAllowed() {
        String m = problem("{\"key\": [\"note\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}");
        assertTrue(m.contains("key field 'note' is the Avro union [\"null\",\"string\"]"), m);
        AvroDataset.of(TestSchemas.WIDE, DatasetSpec.fromJson(
                "{\"key\": [\"note\"], \"allow_null_key\": true, \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}",
                "spec"));
    }

    @Test
    void of_versionOfWrongType_namesAvroType() {
        assertTrue(problem("{\"key\": [\"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"at\"}}")
                .contains("version field 'at' is the Avro type {\"type\":\"long\",\"logicalType\":\"timestamp-millis\"}"));
        assertTrue(problem("{\"key\": [\"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"outer.inner.code\"}}")
                .contains("version field 'outer.inner.code'"));
    }

    @Test
    void of_clockNotMapOfLong_namesAvroType() {
        String m = problem("{\"key\": [\"id\"], \"merge\": {\"policy\": \"vector-clock\", \"clock\": \"attrs\"}}");
        assertTrue(m.contains("clock field 'attrs' is the Avro type {\"type\":\"map\",\"values\":[\"null\",\"double\"]}"), m);
        AvroDataset.of(TestSchemas.WIDE, DatasetSpec.fromJson(
                "{\"key\": [\"id\"], \"merge\": {\"policy\": \"vector-clock\", \"clock\": \"clock\"}}", "spec"));
    }

    @Test
    void of_orderOnCollection_namesAvroType() {
        String m = problem("{\"key\": [\"id\"], \"order\": [\"tags\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}");
        assertTrue(m.contains("order field 'tags' is the Avro array"), m);
    }

    @Test
    void of_coreChecksStillApply() {
        // a partition on a string is not a time bucket: core's binding reports it
        String m = problem("""
                {"key": ["id"], "partition": {"field": "id", "unit": "day"}, "merge": {"policy": "last-writer", "version": "seq"}}""");
        assertTrue(m.contains("partition field 'id'"), m);
    }
}
