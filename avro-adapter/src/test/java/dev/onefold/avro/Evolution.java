package dev.onefold.avro;

import dev.onefold.DatasetSpec;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/** Three versions of one dataset's schema used by the evolution tests, and records of each. */
final class Evolution {
    private Evolution() {}

    static final DatasetSpec SPEC = DatasetSpec.fromJson(
            "{\"key\": [\"id\"], \"order\": [\"id\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}", "spec");

    /** Version 1. */
    static final Schema V1 = TestSchemas.parse("""
            {"type": "record", "name": "Item", "namespace": "t", "fields": [
              {"name": "id", "type": "string"}, {"name": "seq", "type": "long"},
              {"name": "count", "type": "int"}, {"name": "old", "type": "string"},
              {"name": "note", "type": ["null", "string"], "default": null}]}""");

    /** Version 2: drops "old", widens "count" from int to long, adds "added" with a default. */
    static final Schema V2 = TestSchemas.parse("""
            {"type": "record", "name": "Item", "namespace": "t", "fields": [
              {"name": "id", "type": "string"}, {"name": "seq", "type": "long"},
              {"name": "count", "type": "long"},
              {"name": "note", "type": ["null", "string"], "default": null},
              {"name": "added", "type": "string", "default": "none"}]}""");

    static GenericRecord v1(String id, long seq, int count) {
        GenericRecord r = new GenericData.Record(V1);
        r.put("id", id);
        r.put("seq", seq);
        r.put("count", count);
        r.put("old", "old-" + id);
        r.put("note", seq % 2 == 0 ? null : "n" + seq);
        return r;
    }

    static GenericRecord v2(String id, long seq, long count, String added) {
        GenericRecord r = new GenericData.Record(V2);
        r.put("id", id);
        r.put("seq", seq);
        r.put("count", count);
        r.put("note", seq % 2 == 0 ? null : "n" + seq);
        r.put("added", added);
        return r;
    }

    /** A v1 record as version 2 reads it (Avro specification, Schema Resolution: defaults, promotion, skip). */
    static GenericRecord v1AsV2(GenericRecord v1) {
        return v2(v1.get("id").toString(), (Long) v1.get("seq"), (Integer) v1.get("count"), "none");
    }
}
