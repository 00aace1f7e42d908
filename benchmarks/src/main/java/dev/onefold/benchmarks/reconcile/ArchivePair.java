package dev.onefold.benchmarks.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.archive.Archive;
import dev.onefold.reconcile.Reconciliation;
import dev.onefold.reconcile.ReconciliationReport;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;

/**
 * Two archives of the same generated records, built independently (different batch sizes, each batch applied in
 * a different order), then ten differences applied to the second one as one more version: 4 changed fields, 3
 * deletes (missing on the right) and 3 new keys (missing on the left), each in a random hour.
 *
 * <p>Records: key {@code id} = "k" + i, one version each, {@code ts} spread evenly over {@code hours} hourly
 * partitions in ascending i (so each batch touches a run of recent hours, as a feed would), a sum check on
 * {@code amount}. Not thread-safe; built once per benchmark trial.
 */
final class ArchivePair {
    static final long START = 1_709_164_800_000L; // 2024-02-29T00:00Z (java.time)
    static final long HOUR = 3_600_000L;
    static final int CHANGED = 4;
    static final int DELETED = 3;
    static final int ADDED = 3;
    static final int DIFFERENCES = CHANGED + DELETED + ADDED;

    static final RowSchema SCHEMA = RowSchema.builder("scan")
            .field("id", FieldType.string())
            .field("seq", FieldType.int64())
            .field("ts", FieldType.timestampMillis())
            .field("amount", FieldType.int64())
            .field("deleted", FieldType.bool().nullable())
            .build();

    static final DatasetSpec SPEC = DatasetSpec.fromJson("""
            {"key": ["id"], "order": ["ts"], "partition": {"field": "ts", "unit": "hour", "stable": true},
             "merge": {"policy": "last-writer", "version": "seq"}, "tombstone": "deleted",
             "checks": [{"aggregate": "sum", "field": "amount"}]}""", "reconcile benchmark spec");

    final int records;
    final int hours;
    final Archive<Row> left;
    final Archive<Row> right;
    final long leftVersion;
    final long rightAgreeingVersion;
    final long rightDifferingVersion;

    private ArchivePair(int records, int hours, Archive<Row> left, Archive<Row> right, long leftVersion, long rightAgreeing,
            long rightDiffering) {
        this.records = records;
        this.hours = hours;
        this.left = left;
        this.right = right;
        this.leftVersion = leftVersion;
        this.rightAgreeingVersion = rightAgreeing;
        this.rightDifferingVersion = rightDiffering;
    }

    static Row record(int i, int records, int hours) {
        long ts = START + (long) ((double) i / records * hours * HOUR);
        return Row.of(SCHEMA, "k" + i, 1L, ts, (i * 2_654_435_761L) % 100_000, null);
    }

    /** Builds both archives under {@code dir}/left and {@code dir}/right. */
    static ArchivePair build(Path dir, int records, int hours, int leftBatch, int rightBatch) {
        Archive<Row> left = open(dir.resolve("left"));
        Archive<Row> right = open(dir.resolve("right"));
        applyInBatches(left, records, hours, leftBatch, false);
        applyInBatches(right, records, hours, rightBatch, true);
        long agreeing = right.snapshot().version();
        right.apply(differences(records, hours));
        return new ArchivePair(records, hours, left, right, left.snapshot().version(), agreeing, right.snapshot().version());
    }

    private static Archive<Row> open(Path dir) {
        return Archive.builder(SPEC, RecordAccess.rows(SCHEMA)).directory(dir).spillDirectory(dir.getParent()).open();
    }

    private static void applyInBatches(Archive<Row> archive, int records, int hours, int batch, boolean reversed) {
        for (int from = 0; from < records; from += batch) {
            List<Row> rows = new ArrayList<>(Math.min(batch, records - from));
            for (int i = from; i < Math.min(records, from + batch); i++) {
                rows.add(record(i, records, hours));
            }
            if (reversed) {
                Collections.reverse(rows);
            }
            archive.apply(rows);
        }
    }

    /** The ten faults, at fixed pseudo-random keys. */
    static List<Row> differences(int records, int hours) {
        Random random = new Random(5);
        List<Row> out = new ArrayList<>();
        List<Integer> picked = new ArrayList<>();
        while (picked.size() < CHANGED + DELETED) {
            int i = random.nextInt(records);
            if (!picked.contains(i)) {
                picked.add(i);
            }
        }
        for (int n = 0; n < picked.size(); n++) {
            Row r = record(picked.get(n), records, hours);
            out.add(n < CHANGED ? r.with("seq", 2L).with("amount", (Long) r.get("amount") + 1)
                    : r.with("seq", 2L).with("deleted", Boolean.TRUE));
        }
        for (int n = 0; n < ADDED; n++) {
            out.add(Row.of(SCHEMA, "extra" + n, 1L, START + random.nextInt(hours) * HOUR + n, 7L, null));
        }
        return out;
    }

    /** Compares the left archive with the right one before the differences: digests only. */
    ReconciliationReport compareAgreeing() {
        return Reconciliation.defaults().compare(left.snapshot(leftVersion).digestSource("left"),
                right.snapshot(rightAgreeingVersion).digestSource("right"));
    }

    /** Compares the left archive with the right one after the differences, drilling down to the ten keys. */
    ReconciliationReport locateDifferences() {
        return Reconciliation.defaults().compare(left.snapshot(leftVersion).digestSource("left"),
                right.snapshot(rightDifferingVersion).digestSource("right"));
    }

    /** Throws unless the report agrees and covers every record, so a wrong answer never gets a timing. */
    ReconciliationReport requireAgreement(ReconciliationReport r) {
        if (!r.agrees() || r.leftTotal().keys() != records || r.rightTotal().keys() != records) {
            throw new IllegalStateException("expected agreement over " + records + " keys: " + r.summary());
        }
        return r;
    }

    /** Throws unless the report finds exactly the ten differences, by kind. */
    ReconciliationReport requireTheDifferences(ReconciliationReport r) {
        long changed = 0;
        long missingRight = 0;
        long missingLeft = 0;
        for (ReconciliationReport.PartitionResult p : r.partitions()) {
            if (p.drillDown() != null) {
                changed += p.drillDown().contentDiffersCount();
                missingRight += p.drillDown().missingRightCount();
                missingLeft += p.drillDown().missingLeftCount();
            }
        }
        if (changed != CHANGED || missingRight != DELETED || missingLeft != ADDED) {
            throw new IllegalStateException("expected " + CHANGED + " changed, " + DELETED + " missing right, " + ADDED
                    + " missing left: " + r.summary());
        }
        return r;
    }
}
