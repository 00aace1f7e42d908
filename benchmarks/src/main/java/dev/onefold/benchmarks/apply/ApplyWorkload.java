package dev.onefold.benchmarks.apply;

import dev.onefold.DatasetSpec;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.NoSuchElementException;

/**
 * The generated data of benchmark question 2: an event history of {@link #PER_HOUR} records per UTC hour (so a
 * bigger archive holds more hours, as a growing archive does), and a 50,000-record batch that touches the 3 most
 * recent hours (two stored, one new) and 40 older, late hours. Deterministic: the same sizes give the same rows.
 *
 * <p>Batch contents: 40,000 records for the recent hours and 10,000 for the late ones; in each touched hour a
 * fifth are new versions of stored keys (version 2, same timestamp, so each key keeps its partition) and the rest
 * new keys; every tenth record is delivered twice (at-least-once delivery), which replaces a record rather than
 * adding one, so the batch stays at exactly 50,000 records. Thread-safe (immutable).
 */
public final class ApplyWorkload {
    /** Records per hourly partition in the history (~60 bytes each as a row). */
    public static final int PER_HOUR = 5_000;
    /** Records in the batch. */
    public static final int BATCH = 50_000;
    static final int RECENT_HOURS = 3;
    static final int LATE_HOURS = 40;
    static final int RECENT_RECORDS = 40_000;
    /** Hours before the newest stored hour that the first late hour lies; late hours are every other hour back. */
    static final int LATE_START = 4;
    /** 2024-01-01T00:00Z in epoch millis. */
    static final long EPOCH = 1_704_067_200_000L;
    static final long HOUR = 3_600_000L;

    public static final RowSchema SCHEMA = RowSchema.builder("event")
            .field("id", FieldType.int64())
            .field("seq", FieldType.int64())
            .field("ts", FieldType.timestampMillis())
            .field("payload", FieldType.string())
            .build();

    private final int hours;
    private final int perHour;

    /** A workload over {@code historyRecords} stored records (a multiple of {@link #PER_HOUR}, at least 85 hours). */
    public ApplyWorkload(long historyRecords) {
        this(historyRecords, PER_HOUR);
    }

    /** The same with {@code perHour} records per hour (small ones for tests). */
    ApplyWorkload(long historyRecords, int perHour) {
        if (perHour < 1 || historyRecords % perHour != 0 || historyRecords / perHour < LATE_START + 2 * LATE_HOURS + 1) {
            throw new IllegalArgumentException("history must be a multiple of " + perHour + " records covering at least "
                    + (LATE_START + 2 * LATE_HOURS + 1) + " hours, got " + historyRecords);
        }
        this.hours = (int) (historyRecords / perHour);
        this.perHour = perHour;
    }

    /** Last-writer on {@code seq}, ordered by {@code ts}, hourly partitions whose value a key keeps for life. */
    public static DatasetSpec spec(boolean stablePartitions) {
        return DatasetSpec.builder().key("id").orderBy("ts").lastWriter("seq")
                .partition(new DatasetSpec.TimeBucket("ts", DatasetSpec.TimeUnit.HOUR, stablePartitions)).build();
    }

    public int hours() {
        return hours;
    }

    public long historyRecords() {
        return (long) hours * perHour;
    }

    /** The stored history of hours {@code [fromHour, toHour)}, hour by hour. */
    public Iterator<Row> history(int fromHour, int toHour) {
        return new Iterator<>() {
            int hour = fromHour;
            int i;

            @Override
            public boolean hasNext() {
                return hour < toHour;
            }

            @Override
            public Row next() {
                if (!hasNext()) {
                    throw new NoSuchElementException();
                }
                Row r = stored(hour, i, 1);
                if (++i == perHour) {
                    i = 0;
                    hour++;
                }
                return r;
            }
        };
    }

    /** The hours the batch touches: the 3 recent ones first (the newest is not stored yet), then the late ones. */
    public List<Integer> touchedHours() {
        List<Integer> out = new ArrayList<>();
        for (int h = hours - RECENT_HOURS + 1; h <= hours; h++) {
            out.add(h);
        }
        for (int j = 0; j < LATE_HOURS; j++) {
            out.add(hours - 1 - LATE_START - 2 * j);
        }
        return out;
    }

    /** The 50,000-record batch. */
    public List<Row> batch() {
        List<Row> out = new ArrayList<>(BATCH);
        List<Integer> touched = touchedHours();
        for (int t = 0; t < touched.size(); t++) {
            int hour = touched.get(t);
            int count = t < RECENT_HOURS ? share(RECENT_RECORDS, RECENT_HOURS, t)
                    : share(BATCH - RECENT_RECORDS, LATE_HOURS, t - RECENT_HOURS);
            boolean storedHour = hour < hours;
            for (int i = 0; i < count; i++) {
                Row r;
                if (out.size() % 10 == 9) {
                    r = out.get(out.size() - 1);
                } else if (storedHour && i % 5 == 0) {
                    r = stored(hour, (i * 7) % perHour, 2);
                } else {
                    r = fresh(hour, i);
                }
                out.add(r);
            }
        }
        return out;
    }

    private static int share(int total, int parts, int index) {
        return total / parts + (index < total % parts ? 1 : 0);
    }

    /** Record {@code i} of a stored hour at version {@code seq}; keys are scrambled so key order is not time order. */
    private Row stored(int hour, int i, long seq) {
        long n = (long) hour * perHour + i;
        return row(scramble(n), seq, EPOCH + hour * HOUR + i * (HOUR / perHour), n);
    }

    /** A key the history does not hold, in {@code hour} (at most {@link #BATCH} per hour, so none collide). */
    private static Row fresh(int hour, int i) {
        long n = (1L << 40) + (long) hour * BATCH + i;
        return row(scramble(n), 1, EPOCH + hour * HOUR + (i * 7919L) % HOUR, n);
    }

    private static Row row(long id, long seq, long ts, long n) {
        return Row.of(SCHEMA, id, seq, ts, "payload-" + n + "-v" + seq + "-0123456789abcdef");
    }

    /** A bijection on longs (the SplitMix64 finalizer, whose steps are each invertible), so keys never collide. */
    private static long scramble(long n) {
        long z = n + 0x9E3779B97F4A7C15L;
        z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
        return z ^ (z >>> 31);
    }
}
