package dev.onefold.examples.consumer;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

/**
 * The fictional scenario of the consumer-service example: Lanternfish Couriers scans parcels at its depots
 * (Harbour Row, Mill Lane, Quarry Gate) and publishes every scan to a log topic; the tracking service keeps one
 * row per parcel with its latest scan. A scan travels as one line of text:
 * {@code parcel_id|seq|scanned_at|depot|status|withdrawn}, where {@code seq} is the scanner's logical version of
 * the parcel, {@code scanned_at} epoch milliseconds, and {@code withdrawn} ({@code true}/{@code false}) deletes
 * the parcel from tracking.
 *
 * <p>Stateless and thread-safe.
 */
public final class ParcelScans {
    private ParcelScans() {}

    public static final RowSchema SCHEMA = RowSchema.builder("parcel_scan")
            .field("parcel_id", FieldType.string())
            .field("seq", FieldType.int64())
            .field("scanned_at", FieldType.timestampMillis())
            .field("depot", FieldType.string())
            .field("status", FieldType.string())
            .field("withdrawn", FieldType.bool())
            .build();

    /** One row per parcel, the highest scanner sequence wins, ordered by scan time. */
    public static final DatasetSpec SPEC = DatasetSpec.fromJson("""
            {"key": ["parcel_id"], "order": ["scanned_at"],
             "merge": {"policy": "last-writer", "version": "seq"}, "tombstone": "withdrawn"}""", "parcel spec");

    private static final String[] DEPOTS = {"Harbour Row", "Mill Lane", "Quarry Gate"};
    private static final String[] STATUSES = {"received", "sorted", "loaded", "out-for-delivery", "delivered"};

    /** Reads and writes the text form; a malformed line is an invalid record naming the field at fault. */
    public static final RecordAccess<String> TEXT = new RecordAccess<>() {
        @Override
        public RowSchema schema() {
            return SCHEMA;
        }

        @Override
        public Row toRow(String line) {
            String[] f = line.split("\\|", -1);
            if (f.length != 6) {
                throw OnefoldException.record("parcel scan '" + line + "' has " + f.length + " fields, expected 6");
            }
            if (!f[5].equals("true") && !f[5].equals("false")) {
                throw OnefoldException.record("parcel scan '" + line + "': field 'withdrawn' is not true or false");
            }
            return Row.of(SCHEMA, f[0], number(f[1], "seq", line), number(f[2], "scanned_at", line), f[3], f[4],
                    Boolean.parseBoolean(f[5]));
        }

        @Override
        public String fromRow(Row row) {
            return format((String) row.get(0), (Long) row.get(1), (Long) row.get(2), (String) row.get(3),
                    (String) row.get(4), (Boolean) row.get(5));
        }
    };

    private static long number(String text, String field, String line) {
        try {
            return Long.parseLong(text);
        } catch (NumberFormatException e) {
            throw OnefoldException.record("parcel scan '" + line + "': field '" + field + "' is not a number: " + text);
        }
    }

    static String format(String parcel, long seq, long scannedAt, String depot, String status, boolean withdrawn) {
        return parcel + "|" + seq + "|" + scannedAt + "|" + depot + "|" + status + "|" + withdrawn;
    }

    /**
     * A day of scans for {@code parcels} parcels: each parcel moves through the statuses with increasing
     * sequence numbers, some parcels are withdrawn, and scanners sometimes resend a scan with a corrected depot
     * under the same sequence number (a conflict). The list is in scan order; producers shuffle and repeat it.
     */
    public static List<String> day(int parcels, long seed) {
        Random rnd = new Random(seed);
        long start = 1_767_225_600_000L; // 2026-01-01T00:00Z
        List<String> scans = new ArrayList<>();
        for (int p = 0; p < parcels; p++) {
            String id = String.format("LF-%05d", 10_000 + p * 7);
            long at = start + rnd.nextInt(3_600_000);
            int steps = 1 + rnd.nextInt(STATUSES.length);
            for (int s = 0; s < steps; s++) {
                at += 60_000L + rnd.nextInt(1_800_000);
                int depot = rnd.nextInt(DEPOTS.length);
                scans.add(format(id, s + 1, at, DEPOTS[depot], STATUSES[s], false));
                if (rnd.nextInt(12) == 0) {
                    String corrected = DEPOTS[(depot + 1 + rnd.nextInt(DEPOTS.length - 1)) % DEPOTS.length];
                    scans.add(format(id, s + 1, at, corrected, STATUSES[s], false));
                }
            }
            if (rnd.nextInt(10) == 0) {
                scans.add(format(id, steps + 1, at + 60_000L, "Harbour Row", "withdrawn", true));
            }
        }
        scans.sort(java.util.Comparator.comparingLong(line -> Long.parseLong(line.split("\\|")[2])));
        return scans;
    }
}
