package dev.onefold.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.record.Row;
import dev.onefold.testing.Fixtures;
import java.util.List;

/** Specs and sources for reconciliation tests: the core fixture schema, partitioned by value, with checks. */
final class ReconcileFixtures {
    private ReconcileFixtures() {}

    /** A policy's fixture spec, partitioned by {@code part}, checking sum(amount), min(temp), max(seq). */
    static DatasetSpec spec(Fixtures.PolicyCase policy) {
        DatasetSpec base = Fixtures.spec(policy);
        DatasetSpec.Builder b = DatasetSpec.builder().key(base.key().toArray(String[]::new)).merge(base.merge())
                .tombstone(base.tombstone()).partitionByValues("part")
                .check(DatasetSpec.Aggregate.SUM, "amount")
                .check(DatasetSpec.Aggregate.MIN, "temp")
                .check(DatasetSpec.Aggregate.MAX, "seq");
        base.order().forEach(o -> b.orderBy(o.descending() ? "-" + o.path() : o.path()));
        return b.build();
    }

    static RecordDigests<Row> source(String name, DatasetSpec spec, List<Row> rows, RecordDigests.Mode mode) {
        return RecordDigests.ofRows(name, spec, Fixtures.SCHEMA, rows::stream, mode).memoryBudgetBytes(1 << 20).build();
    }
}
