package dev.onefold.testing;

import dev.onefold.DatasetSpec;
import dev.onefold.DatasetSpec.FieldRule;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;

/**
 * Generated data for core tests: one schema that exercises every merge rule, specs for each policy, and jqwik
 * arbitraries for records and adversarial deliveries. Records draw keys from a small space so keys collide.
 */
public final class Fixtures {
    private Fixtures() {}

    public static final RowSchema SCHEMA = RowSchema.builder("event")
            .field("k", FieldType.string())
            .field("part", FieldType.int32())
            .field("seq", FieldType.int64())
            .field("at", FieldType.timestampMillis())
            .field("temp", FieldType.float64().nullable())
            .field("note", FieldType.string().nullable())
            .field("tags", FieldType.list(FieldType.string()).nullable())
            .field("amount", FieldType.int64().nullable())
            .field("clock", FieldType.map(FieldType.int64()))
            .field("deleted", FieldType.bool().nullable())
            .build();

    /** The policies under test, by name. */
    public enum PolicyCase { LAST_WRITER, VECTOR_PICK, VECTOR_KEEP_ALL, FIELD_WISE }

    public static DatasetSpec spec(PolicyCase p) {
        DatasetSpec.Builder b = DatasetSpec.builder().key("k").orderBy("at").orderBy("-temp").tombstone("deleted");
        return switch (p) {
            case LAST_WRITER -> b.lastWriter("seq").build();
            case VECTOR_PICK -> b.vectorClock("clock", DatasetSpec.Concurrent.PICK).build();
            case VECTOR_KEEP_ALL -> b.vectorClock("clock", DatasetSpec.Concurrent.KEEP_ALL).build();
            case FIELD_WISE -> b.fieldWise("seq", Map.of(
                    "temp", FieldRule.MAX,
                    "note", FieldRule.LATEST_NON_NULL,
                    "tags", FieldRule.UNION,
                    "amount", FieldRule.SUM,
                    "part", FieldRule.FIRST,
                    "at", FieldRule.MIN)).build();
        };
    }

    public static Arbitrary<Row> rows(int keySpace) {
        Arbitrary<String> keys = Arbitraries.integers().between(0, keySpace - 1).map(i -> "k" + i);
        Arbitrary<Long> seq = Arbitraries.longs().between(0, 6);
        Arbitrary<Long> at = Arbitraries.longs().between(0, 5).map(i -> 1_700_000_000_000L + i * 3_600_000L);
        Arbitrary<Double> temp = Arbitraries.of(-1.5, 0.0, 2.25, 7.0).injectNull(0.2);
        Arbitrary<String> note = Arbitraries.of("a", "b", "c\u0000d", "é").injectNull(0.3);
        Arbitrary<List<String>> tags = Arbitraries.of("x", "y", "z").list().ofMaxSize(2).injectNull(0.2);
        Arbitrary<Long> amount = Arbitraries.longs().between(-3, 3).injectNull(0.2);
        Arbitrary<Map<String, Long>> clock = Arbitraries.maps(Arbitraries.of("w1", "w2", "w3"),
                Arbitraries.longs().between(0, 3)).ofMaxSize(3);
        Arbitrary<Boolean> deleted = Arbitraries.integers().between(0, 6).map(i -> i == 0 ? Boolean.TRUE : i < 3 ? null : Boolean.FALSE);
        return Combinators.combine(keys, seq, at, temp, note, tags, amount, clock)
                .flatAs((k, s, t, tp, n, tg, a, c) -> deleted.map(d -> Row.of(SCHEMA, k, (int) (t % 3), s, t, tp, n, tg, a, c, d)));
    }

    /** A record multiset and a way to deliver it: shuffled, with duplicates, in batches. */
    public record Delivery(List<Row> records, List<List<Row>> batches) {}

    /** Delivers the records in a shuffled order, each at least once, some up to three times, in random batches. */
    public static Arbitrary<Delivery> deliveries(Arbitrary<List<Row>> records) {
        return Combinators.combine(records, Arbitraries.longs()).as((rs, seed) -> deliver(rs, new Random(seed)));
    }

    public static Delivery deliver(List<Row> records, Random random) {
        List<Row> stream = new ArrayList<>();
        for (Row r : records) {
            int copies = 1 + (random.nextInt(4) == 0 ? 1 + random.nextInt(2) : 0);
            for (int i = 0; i < copies; i++) {
                stream.add(r);
            }
        }
        Collections.shuffle(stream, random);
        List<List<Row>> batches = new ArrayList<>();
        int i = 0;
        while (i < stream.size()) {
            int n = 1 + random.nextInt(Math.max(1, stream.size() / 2));
            batches.add(List.copyOf(stream.subList(i, Math.min(stream.size(), i + n))));
            i += n;
        }
        return new Delivery(List.copyOf(records), batches);
    }

    /** A clock as a sorted map, for building vector-clock records by hand. */
    public static Map<String, Long> clock(Object... writerCounter) {
        TreeMap<String, Long> m = new TreeMap<>();
        for (int i = 0; i < writerCounter.length; i += 2) {
            m.put((String) writerCounter[i], ((Number) writerCounter[i + 1]).longValue());
        }
        return m;
    }
}
