package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.record.FieldType;
import dev.onefold.record.RowSchema;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** The JSON spec format is a public contract: these pin its keys, values and error messages. */
class DatasetSpecTest {

    static final String ISSUE_EXAMPLE = """
            {
              "key":       ["container_id", "reading_no"],
              "order":     ["recorded_at", "-priority"],
              "partition": {"field": "recorded_at", "unit": "hour"},
              "merge":     {"policy": "last-writer", "version": "seq"},
              "tombstone": "deleted"
            }""";

    @Test
    void fromJson_readsTheDocumentedExample() {
        DatasetSpec s = DatasetSpec.fromJson(ISSUE_EXAMPLE, "spec.json");
        assertEquals(List.of("container_id", "reading_no"), s.key());
        assertEquals(List.of(new DatasetSpec.OrderField("recorded_at", false), new DatasetSpec.OrderField("priority", true)),
                s.order());
        assertEquals(new DatasetSpec.TimeBucket("recorded_at", DatasetSpec.TimeUnit.HOUR, false), s.partition());
        assertEquals(new DatasetSpec.LastWriter("seq"), s.merge());
        assertEquals("deleted", s.tombstone());
        assertEquals(s, DatasetSpec.fromJson(s.toJson(), "round trip"));
        assertEquals(s, DatasetSpec.builder().key("container_id", "reading_no").orderBy("recorded_at").orderBy("-priority")
                .partitionByTime("recorded_at", DatasetSpec.TimeUnit.HOUR).lastWriter("seq").tombstone("deleted").build(),
                "the builder and the JSON form mean the same");
    }

    @Test
    void fromJson_readsEveryPolicyAndRule() {
        DatasetSpec vc = DatasetSpec.fromJson("""
                {"key": "id", "merge": {"policy": "vector-clock", "clock": "vv"}}""", "s");
        assertEquals(new DatasetSpec.VectorClock("vv", DatasetSpec.Concurrent.PICK), vc.merge(), "pick is the default");
        DatasetSpec fw = DatasetSpec.fromJson("""
                {"key": ["id"], "partition": {"fields": ["region", "kind"]},
                 "merge": {"policy": "field-wise", "version": "v", "fields": {"a": "latest", "b": "latest-non-null",
                   "c": "first", "d": "max", "e": "min", "f": "union", "g": "sum"}},
                 "checks": [{"aggregate": "sum", "field": "g"}]}""", "s");
        DatasetSpec.FieldWise m = (DatasetSpec.FieldWise) fw.merge();
        assertEquals(7, m.fields().size());
        assertEquals(DatasetSpec.FieldRule.LATEST_NON_NULL, m.fields().get("b"));
        assertEquals(new DatasetSpec.ByValues(List.of("region", "kind"), false), fw.partition());
        assertEquals(fw, DatasetSpec.fromJson(fw.toJson(), "round trip"));
    }

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
            "{\"key\": [], \"merge\": {\"policy\": \"last-writer\", \"version\": \"v\"}}|key: must name at least one field",
            "{\"key\": [\"id\"]}|merge: a merge policy is required",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"newest\"}}|unknown policy \"newest\"",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"field-wise\", \"version\": \"v\", \"fields\": {\"x\": \"avg\"}}}|merge.fields.x: unknown rule \"avg\"",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"last-writer\"}}|merge.version: is required",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"vector-clock\", \"clock\": \"c\", \"concurrent\": \"all\"}}|merge.concurrent: unknown value \"all\"",
            "{\"key\": [\"id\"], \"partition\": {\"field\": \"t\", \"unit\": \"week\"}, \"merge\": {\"policy\": \"last-writer\", \"version\": \"v\"}}|partition.unit: unknown unit \"week\"",
            "{\"key\": [\"id\"], \"colour\": 1, \"merge\": {\"policy\": \"last-writer\", \"version\": \"v\"}}|unknown entry \"colour\"",
            "{\"key\": [\"id\", \"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"v\"}}|listed twice",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": 3}}|merge.version: must be a string, got the number 3",
            "{\"key\": [\"id\"]|invalid JSON at line 1, column 15: unexpected end of input",
    })
    void fromJson_rejectsWithPreciseMessage(String json, String expected) {
        OnefoldException e = assertThrows(OnefoldException.class, () -> DatasetSpec.fromJson(json, "bad.json"));
        assertEquals(OnefoldException.Kind.INVALID_SPEC, e.kind());
        assertTrue(e.getMessage().contains(expected), e.getMessage());
        assertTrue(e.getMessage().startsWith("bad.json"), "names the file: " + e.getMessage());
    }

    static final RowSchema SCHEMA = RowSchema.builder("r")
            .field("id", FieldType.string())
            .field("v", FieldType.string())
            .field("tags", FieldType.list(FieldType.string()))
            .field("clock", FieldType.map(FieldType.float64()))
            .field("nested", FieldType.record(RowSchema.builder("inner").field("x", FieldType.int32()).build()))
            .build();

    @ParameterizedTest
    @CsvSource(delimiter = '|', value = {
            "{\"key\": [\"nope\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"id\"}}|record r has no field 'nope'",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"v\"}}|version field 'v' must be int or long, is string",
            "{\"key\": [\"tags\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"nested.x\"}}|key field 'tags' is list<string>, which has no order",
            "{\"key\": [\"id\"], \"order\": [\"tags\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"nested.x\"}}|order field 'tags' is list<string>, which cannot be ordered",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"vector-clock\", \"clock\": \"clock\"}}|clock field 'clock' must be a map of long counters",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"nested.y\"}}|record inner has no field 'y'",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"field-wise\", \"version\": \"nested.x\", \"fields\": {\"v\": \"sum\"}}}|rule sum on 'v' needs int, long, float, double or decimal",
            "{\"key\": [\"id\"], \"merge\": {\"policy\": \"field-wise\", \"version\": \"nested.x\", \"fields\": {\"id\": \"max\"}}}|'id' is a key field",
    })
    void bind_rejectsSpecThatDoesNotFitSchema(String json, String expected) {
        DatasetSpec spec = DatasetSpec.fromJson(json, "s.json");
        OnefoldException e = assertThrows(OnefoldException.class, () -> BatchEngine.forRows(spec, SCHEMA));
        assertEquals(OnefoldException.Kind.INVALID_SPEC, e.kind());
        assertTrue(e.getMessage().contains(expected), e.getMessage());
    }

    @Test
    void bind_nestedFieldPathsWork() {
        DatasetSpec spec = DatasetSpec.builder().key("id").orderBy("nested.x").fieldWise("nested.x", Map.of()).build();
        assertEquals(spec, BatchEngine.forRows(spec, SCHEMA).spec());
    }
}
