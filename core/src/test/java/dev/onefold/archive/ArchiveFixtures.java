package dev.onefold.archive;

import dev.onefold.BatchEngine;
import dev.onefold.DatasetSpec;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import java.util.stream.Stream;

/** Generated test data and archive set-ups shared by the archive tests. */
final class ArchiveFixtures {
    private ArchiveFixtures() {}

    /** 2024-02-29T00:00Z in epoch millis (java.time, REFERENCES.md section 7 table). */
    static final long DAY0 = 1_709_164_800_000L;
    static final long HOUR = 3_600_000L;
    static final Clock FIXED = Clock.fixed(Instant.ofEpochMilli(DAY0 + 100 * HOUR), ZoneOffset.UTC);

    static final RowSchema EVENT = RowSchema.builder("event")
            .field("id", FieldType.string())
            .field("seq", FieldType.int64())
            .field("ts", FieldType.timestampMillis())
            .field("val", FieldType.int64().nullable())
            .field("clock", FieldType.map(FieldType.int64()))
            .field("deleted", FieldType.bool().nullable())
            .build();

    enum Policy { LAST_WRITER, VECTOR_CLOCK, FIELD_WISE }

    static DatasetSpec spec(Policy policy, boolean stable) {
        String merge = switch (policy) {
            case LAST_WRITER -> "{\"policy\": \"last-writer\", \"version\": \"seq\"}";
            case VECTOR_CLOCK -> "{\"policy\": \"vector-clock\", \"clock\": \"clock\", \"concurrent\": \"keep-all\"}";
            case FIELD_WISE -> "{\"policy\": \"field-wise\", \"version\": \"seq\", \"fields\": {\"val\": \"max\"}}";
        };
        return DatasetSpec.fromJson("{\"key\": [\"id\"], \"order\": [\"ts\"], \"partition\": {\"field\": \"ts\", "
                + "\"unit\": \"hour\", \"stable\": " + stable + "}, \"merge\": " + merge + ", \"tombstone\": \"deleted\", "
                + "\"checks\": [{\"aggregate\": \"sum\", \"field\": \"val\"}]}", "test spec");
    }

    static Row event(String id, long seq, long ts, Long val, boolean deleted) {
        return event(id, seq, ts, val, Map.of("a", seq), deleted);
    }

    static Row event(String id, long seq, long ts, Long val, Map<String, Long> clock, boolean deleted) {
        return Row.of(EVENT, id, seq, ts, val, new TreeMap<>(clock), deleted ? Boolean.TRUE : null);
    }

    static Archive.Builder<Row> builder(DatasetSpec spec, Storage storage) {
        return Archive.builder(spec, RecordAccess.rows(EVENT)).storage(storage).clock(FIXED).chunkTargetBytes(4096)
                .parallelism(1);
    }

    /** Random events: ids from a small pool (so keys repeat), hours from a window (so keys move), some deletes. */
    static List<Row> randomEvents(Random r, int n, int ids, int hours) {
        List<Row> out = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            String id = "k" + r.nextInt(ids);
            long seq = r.nextInt(20);
            long ts = DAY0 + r.nextInt(hours) * HOUR + r.nextInt(1000);
            Map<String, Long> clock = Map.of("a", (long) r.nextInt(4), "b", (long) r.nextInt(4));
            out.add(event(id, seq, ts, r.nextInt(5) == 0 ? null : (long) r.nextInt(1000), clock, r.nextInt(8) == 0));
        }
        return out;
    }

    /** All visible rows of the latest snapshot, in read order. */
    static List<Row> rows(Archive<Row> archive) {
        try (Stream<Row> s = archive.snapshot().rows()) {
            return s.toList();
        }
    }

    /** The model: the batch engine's survivors of all records together. */
    static List<Row> model(DatasetSpec spec, List<Row> all) {
        return BatchEngine.forRows(spec, EVENT).dedupe(all).survivors();
    }
}
