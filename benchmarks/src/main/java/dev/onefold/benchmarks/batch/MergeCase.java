package dev.onefold.benchmarks.batch;

import dev.onefold.DatasetSpec;
import dev.onefold.DatasetSpec.FieldRule;
import java.util.Locale;
import java.util.Map;

/**
 * The merge policies question 1 measures, each with the dataset spec onefold runs it under. All share the key
 * {@code (device, reading_no)} and the order {@code recorded_at} (then the key). Immutable.
 */
public enum MergeCase {
    /** Greatest {@code seq} wins. */
    LAST_WRITER,
    /** Clock dominance over writers {@code w1, w2}; concurrent versions resolved by {@code pick}. */
    VECTOR_CLOCK,
    /** {@code temp}: max; {@code status}: latest non-null; every other field: latest by {@code seq}. */
    FIELD_WISE;

    /** The JMH parameter value, for example {@code last-writer}. */
    public String paramName() {
        return name().toLowerCase(Locale.ROOT).replace('_', '-');
    }

    public static MergeCase fromParam(String name) {
        for (MergeCase c : values()) {
            if (c.paramName().equals(name)) {
                return c;
            }
        }
        throw new IllegalArgumentException("unknown policy parameter '" + name + "' (known: last-writer, vector-clock, "
                + "field-wise)");
    }

    public DatasetSpec spec() {
        DatasetSpec.Builder b = DatasetSpec.builder().key("device", "reading_no").orderBy("recorded_at");
        return switch (this) {
            case LAST_WRITER -> b.lastWriter("seq").build();
            case VECTOR_CLOCK -> b.vectorClock("clock", DatasetSpec.Concurrent.PICK).build();
            case FIELD_WISE -> b.fieldWise("seq", Map.of("temp", FieldRule.MAX, "status", FieldRule.LATEST_NON_NULL)).build();
        };
    }
}
