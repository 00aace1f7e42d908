package dev.onefold.benchmarks.spill;

import dev.onefold.benchmarks.batch.Workload;
import dev.onefold.record.Row;

/**
 * Checks a last-writer output of a {@link Workload} as it streams by, without holding it: order strictly
 * ascending by {@code (recorded_at, device, reading_no)} (so each key appears once), each {@code seq} the known
 * winner of its key, and as many records as keys. Not thread-safe; O(1) memory.
 */
final class OrderCheck {
    private final Workload workload;
    private long count;
    private long lastAt = Long.MIN_VALUE;
    private String lastDevice = "";
    private int lastReading = -1;

    OrderCheck(Workload workload) {
        this.workload = workload;
    }

    void accept(Row row) {
        String device = (String) row.get("device");
        int reading = (Integer) row.get("reading_no");
        long at = (Long) row.get("recorded_at");
        int c = Long.compare(at, lastAt);
        if (c == 0) {
            c = device.compareTo(lastDevice);
        }
        if (c == 0) {
            c = Integer.compare(reading, lastReading);
        }
        if (count > 0 && c <= 0) {
            throw new IllegalStateException("output not strictly ordered at record " + count + ": " + row);
        }
        long seq = (Long) row.get("seq");
        long expected = workload.expectedLastWriterSeq(Workload.keyIndex(device, reading));
        if (seq != expected) {
            throw new IllegalStateException("key " + device + "/" + reading + " kept seq " + seq + ", expected " + expected);
        }
        lastAt = at;
        lastDevice = device;
        lastReading = reading;
        count++;
    }

    void requireComplete() {
        if (count != workload.keys()) {
            throw new IllegalStateException("output has " + count + " records for " + workload.keys() + " keys");
        }
    }
}
