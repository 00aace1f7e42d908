package dev.onefold.testkit;

import dev.onefold.DatasetSpec;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

/** Generated test data for the kit's own tests: rows with a key, a version unique per row, a value, a delete flag. */
final class Items {
    static final RowSchema SCHEMA = RowSchema.builder("item")
            .field("id", FieldType.string())
            .field("version", FieldType.int64())
            .field("amount", FieldType.int64())
            .field("deleted", FieldType.bool().nullable())
            .build();

    static final DatasetSpec SPEC = DatasetSpec.builder().key("id").orderBy("amount").lastWriter("version")
            .tombstone("deleted").build();

    private Items() {}

    /** 1 to maxRecords rows over a pool of keys; versions are distinct, about one row in ten deletes its key. */
    static List<Row> generate(Random random, int maxRecords, int keys) {
        int n = 1 + random.nextInt(maxRecords);
        List<Row> rows = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            rows.add(Row.of(SCHEMA, "k" + random.nextInt(keys), (long) i, (long) random.nextInt(1000),
                    random.nextInt(10) == 0 ? Boolean.TRUE : null));
        }
        return rows;
    }

    static String id(Row row) {
        return (String) row.get("id");
    }

    static long version(Row row) {
        return (Long) row.get("version");
    }

    static boolean deleted(Row row) {
        return Boolean.TRUE.equals(row.get("deleted"));
    }
}
