package dev.onefold.avro;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.BatchEngine;
import dev.onefold.DatasetSpec;
import dev.onefold.record.Row;
import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/**
 * The core's convergence promise re-run with Avro generic records: the result depends only on the set of
 * records delivered, never on their order, repetition or (where survivors carry the whole state) batching;
 * and payloads written under schema version 1 merge with version 2 records as if all were version 2.
 * Deliveries are adversarial: shuffled, duplicated, replayed and split into random batches.
 */
class AvroConvergenceProperties {
    static final Schema SCHEMA = TestSchemas.parse("""
            {"type": "record", "name": "Conv", "namespace": "t", "fields": [
              {"name": "id", "type": "string"}, {"name": "seq", "type": "long"},
              {"name": "clock", "type": {"type": "map", "values": "long"}},
              {"name": "at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
              {"name": "amount", "type": {"type": "bytes", "logicalType": "decimal", "precision": 9, "scale": 2}},
              {"name": "tags", "type": {"type": "array", "items": "string"}},
              {"name": "attrs", "type": {"type": "map", "values": "string"}},
              {"name": "note", "type": ["null", "string"], "default": null},
              {"name": "deleted", "type": ["null", "boolean"], "default": null}]}""");
    private static final AvroRecordAccess ACCESS = AvroRecordAccess.of(SCHEMA);

    static final String LAST_WRITER = "{\"key\": [\"id\"], \"order\": [\"at\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}, \"tombstone\": \"deleted\"}";
    static final String KEEP_ALL = "{\"key\": [\"id\"], \"merge\": {\"policy\": \"vector-clock\", \"clock\": \"clock\", \"concurrent\": \"keep-all\"}}";
    static final String PICK = "{\"key\": [\"id\"], \"merge\": {\"policy\": \"vector-clock\", \"clock\": \"clock\", \"concurrent\": \"pick\"}}";
    static final String FIELD_WISE = "{\"key\": [\"id\"], \"merge\": {\"policy\": \"field-wise\", \"version\": \"seq\", "
            + "\"fields\": {\"tags\": \"union\", \"attrs\": \"union\", \"note\": \"latest-non-null\", \"amount\": \"sum\", \"at\": \"max\"}}}";

    /** Distinct records over a few keys, versions and clocks. */
    static List<GenericRecord> records(Random random, int n) {
        Map<String, GenericRecord> distinct = new LinkedHashMap<>();
        for (int i = 0; i < n; i++) {
            GenericRecord r = new GenericData.Record(SCHEMA);
            r.put("id", "k" + random.nextInt(5));
            r.put("seq", (long) random.nextInt(6));
            Map<String, Long> clock = new LinkedHashMap<>();
            for (int w = 0; w < 3; w++) {
                if (random.nextBoolean()) {
                    clock.put("w" + w, (long) random.nextInt(4));
                }
            }
            r.put("clock", clock);
            r.put("at", 1_709_164_800_000L + random.nextInt(5) * 3_600_000L);
            r.put("amount", ByteBuffer.wrap(BigDecimal.valueOf(random.nextInt(20_000) - 10_000, 2).unscaledValue().toByteArray()));
            r.put("tags", List.of("t" + random.nextInt(4)));
            r.put("attrs", Map.of("a" + random.nextInt(3), "v" + random.nextInt(3)));
            r.put("note", random.nextInt(3) == 0 ? null : "n" + random.nextInt(3));
            r.put("deleted", random.nextInt(8) == 0 ? Boolean.TRUE : null);
            distinct.putIfAbsent(ACCESS.toRow(r).toString(), r);
        }
        return new ArrayList<>(distinct.values());
    }

    /** The records shuffled, some delivered two or three times. */
    static List<GenericRecord> deliveries(Random random, List<GenericRecord> records) {
        List<GenericRecord> out = new ArrayList<>();
        for (GenericRecord r : records) {
            int times = 1 + (random.nextInt(3) == 0 ? 1 + random.nextInt(2) : 0);
            for (int i = 0; i < times; i++) {
                out.add(r);
            }
        }
        Collections.shuffle(out, random);
        return out;
    }

    private static final Map<String, BatchEngine<GenericRecord>> ENGINES = new java.util.concurrent.ConcurrentHashMap<>();

    private static BatchEngine<GenericRecord> engine(String spec) {
        return ENGINES.computeIfAbsent(spec,
                s -> AvroDataset.of(SCHEMA, DatasetSpec.fromJson(s, "spec")).engine().parallel(false).build());
    }

    private static List<Row> dedupe(String spec, List<GenericRecord> batch) {
        return engine(spec).dedupe(batch).survivors().stream().map(ACCESS::toRow).toList();
    }

    @Provide
    Arbitrary<String> policies() {
        return Arbitraries.of(LAST_WRITER, KEEP_ALL, PICK, FIELD_WISE);
    }

    @Property(tries = 600)
    void everyPolicy_dependsOnlyOnTheSetDelivered(@ForAll("policies") String spec, @ForAll long seed) {
        Random random = new Random(seed);
        List<GenericRecord> records = records(random, 1 + random.nextInt(25));
        assertEquals(dedupe(spec, records), dedupe(spec, deliveries(random, records)));
    }

    /** Applying batches one after another (each on the survivors so far) equals applying them together. */
    private static void batchingIndependent(String spec, long seed) {
        Random random = new Random(seed);
        List<GenericRecord> records = records(random, 1 + random.nextInt(25));
        List<GenericRecord> delivered = deliveries(random, records);
        List<GenericRecord> state = new ArrayList<>();
        int from = 0;
        while (from < delivered.size()) {
            int to = Math.min(delivered.size(), from + 1 + random.nextInt(8));
            List<GenericRecord> next = new ArrayList<>(state);
            next.addAll(delivered.subList(from, to));
            state = new ArrayList<>(engine(spec).dedupe(next).survivors());
            from = to;
        }
        assertEquals(dedupe(spec, records), state.stream().map(ACCESS::toRow).toList());
    }

    @Property(tries = 200)
    void lastWriterWithoutTombstones_isIndependentOfBatching(@ForAll long seed) {
        batchingIndependent(LAST_WRITER.replace(", \"tombstone\": \"deleted\"", ""), seed);
    }

    @Property(tries = 200)
    void vectorClockKeepAll_isIndependentOfBatching(@ForAll long seed) {
        batchingIndependent(KEEP_ALL, seed);
    }

    /** Version 1 payloads and version 2 records merge as if every record had been written under version 2. */
    @Property(tries = 200)
    void evolution_v1PayloadsMergeWithV2RecordsAsAllV2(@ForAll long seed) {
        Random random = new Random(seed);
        AvroPayloadCodec v1 = AvroPayloadCodec.of(Evolution.V1);
        AvroPayloadCodec v2 = AvroPayloadCodec.of(Evolution.V2, SchemaStore.inMemory(Evolution.V1), DecodeLimits.DEFAULT);
        List<byte[]> payloads = new ArrayList<>();
        List<GenericRecord> allAsV2 = new ArrayList<>();
        int n = 1 + random.nextInt(30);
        for (int i = 0; i < n; i++) {
            String id = "k" + random.nextInt(6);
            long seq = random.nextInt(10);
            if (random.nextBoolean()) {
                GenericRecord old = Evolution.v1(id, seq, random.nextInt());
                payloads.add(v1.encodeRecord(old));
                allAsV2.add(Evolution.v1AsV2(old));
            } else {
                GenericRecord cur = Evolution.v2(id, seq, random.nextLong(), "a" + random.nextInt(3));
                payloads.add(v2.encodeRecord(cur));
                allAsV2.add(cur);
            }
        }
        Collections.shuffle(payloads, random);
        List<Row> fromPayloads = BatchEngine.builder(Evolution.SPEC, v2.payloadAccess()).parallel(false).build().dedupe(payloads)
                .survivors().stream().map(p -> v2.decode(v2.writerId(), p)).toList();
        List<Row> fromRecords = AvroDataset.of(Evolution.V2, Evolution.SPEC).engine().parallel(false).build().dedupe(allAsV2)
                .survivors().stream().map(v2.access()::toRow).toList();
        assertEquals(fromRecords, fromPayloads);
    }
}
