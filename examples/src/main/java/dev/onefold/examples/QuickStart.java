package dev.onefold.examples;

import dev.onefold.BatchEngine;
import dev.onefold.BatchResult;
import dev.onefold.DatasetSpec;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.List;

/**
 * The README's Java quick start as a program that checks its own result: three gateways relay readings of a
 * fictional reefer container, with a retry duplicate and a late, older version; onefold keeps one reading per
 * (container, reading number), the highest sequence number, in time order.
 */
public final class QuickStart {
    private QuickStart() {}

    public static void main(String[] args) {
        RowSchema reading = RowSchema.builder("reading")
                .field("container_id", FieldType.string())
                .field("reading_no", FieldType.int32())
                .field("seq", FieldType.int64())
                .field("recorded_at", FieldType.timestampMillis())
                .field("celsius", FieldType.float64())
                .build();
        DatasetSpec spec = DatasetSpec.fromJson("""
                {"key": ["container_id", "reading_no"], "order": ["recorded_at"],
                 "merge": {"policy": "last-writer", "version": "seq"}}""", "quick start spec");
        BatchEngine<Row> engine = BatchEngine.forRows(spec, reading);

        Row first = Row.of(reading, "MSKU-1001", 1, 1L, 1_735_689_600_000L, -18.2);
        Row retry = Row.of(reading, "MSKU-1001", 1, 1L, 1_735_689_600_000L, -18.2);
        Row corrected = Row.of(reading, "MSKU-1001", 1, 2L, 1_735_689_600_000L, -18.4);
        Row next = Row.of(reading, "MSKU-1001", 2, 1L, 1_735_689_660_000L, -18.1);
        BatchResult<Row> result = engine.dedupe(List.of(next, corrected, first, retry));

        result.survivors().forEach(System.out::println);
        System.out.println(result.report().toJson());
        if (!result.survivors().equals(List.of(corrected, next)) || result.report().duplicates() != 1) {
            throw new IllegalStateException("quick start produced an unexpected result: " + result);
        }
    }
}
