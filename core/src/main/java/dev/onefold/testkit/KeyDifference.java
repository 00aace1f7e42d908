package dev.onefold.testkit;

import java.util.List;

/**
 * One key whose state in the sink differs from the state onefold computes: the key's field values, the
 * records expected (empty when the key should be absent or deleted) and the records the sink read back (empty
 * when missing). Immutable when the records are.
 */
public record KeyDifference<R>(List<Object> key, List<R> expected, List<R> actual) {
    public KeyDifference {
        key = java.util.Collections.unmodifiableList(new java.util.ArrayList<>(key));
        expected = List.copyOf(expected);
        actual = List.copyOf(actual);
    }

    /** Whether the sink holds more records for this key than expected (for example appended instead of replaced). */
    public boolean hasExtraRecords() {
        return actual.size() > expected.size();
    }

    /** Whether the sink lacks the key or some of its records. */
    public boolean isMissing() {
        return actual.size() < expected.size();
    }
}
