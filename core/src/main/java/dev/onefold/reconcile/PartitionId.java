package dev.onefold.reconcile;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

/**
 * Names one partition of a dataset by its partition values, as {@code BoundDataset.partition(row)} renders them:
 * one value for a time bucket ({@code 2024-02-29T13}), one per field for value partitions (null for a null
 * value), none for an unpartitioned dataset ({@link #WHOLE}). Ordered value by value, null first, then shorter
 * first, so reports list partitions in a fixed order.
 *
 * <p>Immutable and thread-safe.
 */
public record PartitionId(List<String> values) implements Comparable<PartitionId> {

    /** The single partition of an unpartitioned dataset. */
    public static final PartitionId WHOLE = new PartitionId(List.of());

    public PartitionId {
        values = Collections.unmodifiableList(new ArrayList<>(values));
    }

    @Override
    public int compareTo(PartitionId o) {
        int n = Math.min(values.size(), o.values.size());
        for (int i = 0; i < n; i++) {
            String a = values.get(i);
            String b = o.values.get(i);
            if (a == null || b == null) {
                if (a != b) {
                    return a == null ? -1 : 1;
                }
                continue;
            }
            int c = a.compareTo(b);
            if (c != 0) {
                return c;
            }
        }
        return Integer.compare(values.size(), o.values.size());
    }

    /** The values joined by {@code /}, or {@code (whole dataset)}; for human summaries. */
    @Override
    public String toString() {
        if (values.isEmpty()) {
            return "(whole dataset)";
        }
        List<String> shown = new ArrayList<>(values.size());
        for (String v : values) {
            shown.add(v == null ? "null" : v);
        }
        return String.join("/", shown);
    }
}
