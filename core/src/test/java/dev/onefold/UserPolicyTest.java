package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.MergePolicy;
import java.util.ArrayList;
import java.util.Collections;
import java.util.EnumSet;
import java.util.List;
import java.util.Random;
import java.util.Set;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import org.junit.jupiter.api.Test;

/** User merge policies plug in through the SPI and declare their laws. */
class UserPolicyTest {
    static final RowSchema SCHEMA = RowSchema.builder("gauge")
            .field("id", FieldType.string())
            .field("peak", FieldType.int64())
            .field("log", FieldType.string())
            .build();

    /** Keeps the highest peak: a max on a total order (ties on content), so all three laws hold. */
    static final MergePolicy HIGHEST_PEAK = new MergePolicy() {
        @Override
        public String name() {
            return "highest-peak";
        }

        @Override
        public Set<Law> laws() {
            return EnumSet.allOf(Law.class);
        }

        @Override
        public Row merge(Row a, Row b) {
            int c = Long.compare((Long) a.get("peak"), (Long) b.get("peak"));
            if (c == 0) {
                c = ((String) a.get("log")).compareTo((String) b.get("log"));
            }
            return c >= 0 ? a : b;
        }
    };

    /** Appends logs: associative but not commutative nor idempotent. */
    static final MergePolicy APPEND_LOG = new MergePolicy() {
        @Override
        public String name() {
            return "append-log";
        }

        @Override
        public Set<Law> laws() {
            return EnumSet.of(Law.ASSOCIATIVE);
        }

        @Override
        public Row merge(Row a, Row b) {
            return a.with("log", a.get("log") + "+" + b.get("log"));
        }
    };

    @Property(tries = 200)
    void dedupe_lawfulUserPolicyConverges(@ForAll long seed) {
        Random rnd = new Random(seed);
        List<Row> rows = new ArrayList<>();
        for (int i = 0; i < 30; i++) {
            rows.add(Row.of(SCHEMA, "g" + rnd.nextInt(4), (long) rnd.nextInt(5), "e" + rnd.nextInt(3)));
        }
        BatchEngine<Row> engine = BatchEngine.forRows(DatasetSpec.builder().key("id").custom(HIGHEST_PEAK).build(), SCHEMA);
        List<Row> shuffled = new ArrayList<>(rows);
        shuffled.addAll(rows.subList(0, 10));
        Collections.shuffle(shuffled, rnd);
        BatchResult<Row> a = engine.dedupe(rows);
        assertEquals(a.survivors(), engine.dedupe(shuffled).survivors());
        assertFalse(a.report().lawsMissing());
    }

    @Test
    void dedupe_unlawfulUserPolicyIsDeterministicAndFlagged() {
        BatchEngine<Row> engine = BatchEngine.forRows(DatasetSpec.builder().key("id").custom(APPEND_LOG).build(), SCHEMA);
        List<Row> rows = List.of(Row.of(SCHEMA, "g", 1L, "b"), Row.of(SCHEMA, "g", 1L, "a"), Row.of(SCHEMA, "g", 1L, "c"));
        BatchResult<Row> r = engine.dedupe(rows);
        assertTrue(r.report().lawsMissing(), "the report says convergence is not promised");
        // folded in ascending canonical bytes, never in arrival order
        assertEquals("a+b+c", r.survivors().get(0).get("log"));
        assertEquals(r.survivors(), engine.dedupe(List.of(rows.get(2), rows.get(0), rows.get(1))).survivors());
        assertEquals("{\"key\":[\"id\"],\"merge\":{\"policy\":\"append-log\"}}",
                DatasetSpec.builder().key("id").custom(APPEND_LOG).build().toJson());
    }
}
