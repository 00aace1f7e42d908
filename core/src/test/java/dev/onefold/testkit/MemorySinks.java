package dev.onefold.testkit;

import dev.onefold.record.Row;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/** In-memory sinks over {@link Items}: one correct, three broken in the ways teams' sinks break. */
final class MemorySinks {
    private MemorySinks() {}

    /** Keeps the highest version per key, tombstones included, and hides deleted keys when read. */
    static class Upserting implements Sink<Row> {
        final Map<String, Row> table = new HashMap<>();

        @Override
        public void apply(Step.Delivery<Row> delivery) {
            delivery.records().forEach(this::upsert);
        }

        void upsert(Row row) {
            table.merge(Items.id(row), row, (old, neu) -> Items.version(neu) > Items.version(old) ? neu : old);
        }

        @Override
        public Collection<Row> readState() {
            return table.values().stream().filter(r -> !Items.deleted(r)).toList();
        }
    }

    /** Broken: whatever arrives last wins, whatever its version. */
    static final class IgnoringVersions implements Sink<Row> {
        private final Map<String, Row> table = new LinkedHashMap<>();

        @Override
        public void apply(Step.Delivery<Row> delivery) {
            delivery.records().forEach(r -> table.put(Items.id(r), r));
        }

        @Override
        public Collection<Row> readState() {
            return table.values().stream().filter(r -> !Items.deleted(r)).toList();
        }
    }

    /** Broken: inserts every delivered record instead of replacing the key's row; hides rows flagged deleted. */
    static final class Appending implements Sink<Row> {
        private final List<Row> table = new ArrayList<>();

        @Override
        public void apply(Step.Delivery<Row> delivery) {
            table.addAll(delivery.records());
        }

        @Override
        public Collection<Row> readState() {
            return table.stream().filter(r -> !Items.deleted(r)).toList();
        }
    }

    /** Broken: acknowledges a delivery but makes it durable only when the next one arrives; a restart loses it. */
    static final class LosingBatchOnRestart extends Upserting {
        private List<Row> unflushed = List.of();

        @Override
        public void apply(Step.Delivery<Row> delivery) {
            unflushed.forEach(this::upsert);
            unflushed = delivery.records();
        }

        @Override
        public Collection<Row> readState() {
            unflushed.forEach(this::upsert);
            unflushed = List.of();
            return super.readState();
        }

        @Override
        public void restart() {
            unflushed = List.of();
        }
    }
}
