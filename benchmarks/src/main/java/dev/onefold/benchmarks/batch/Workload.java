package dev.onefold.benchmarks.batch;

import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.List;
import java.util.NoSuchElementException;
import java.util.TreeMap;

/**
 * The generated batch every peer of questions 1 and 6 works on: {@code n} readings of about 60 bytes over
 * {@code k = ceil(n / 1.2)} unique keys, so 20% of the records are extra versions. Every fifth key gets one extra
 * version, which is newer (40%), older, i.e. a late arrival (40%), or concurrent under the vector clock (20%,
 * newer by {@code seq}). Records are delivered in a scrambled order.
 *
 * <p>Record {@code j} of the delivery is a pure function of {@code (j, n)}: nothing is held in memory, so a
 * spill benchmark can stream batches larger than the heap, and the winner of each key is known analytically
 * ({@link #expectedLastWriterSeq}), which lets a benchmark check its output without a second implementation.
 *
 * <p>Layout of one record (about 60 bytes of values): {@code device} 8-char string, {@code reading_no} int,
 * {@code seq} long, {@code recorded_at} timestamp, {@code temp} double, {@code status} short nullable string,
 * {@code clock} two writer counters. Immutable and thread-safe; generation costs O(1) per record.
 */
public final class Workload {
    /** The schema of the generated rows. */
    public static final RowSchema SCHEMA = RowSchema.builder("reading")
            .field("device", FieldType.string())
            .field("reading_no", FieldType.int32())
            .field("seq", FieldType.int64())
            .field("recorded_at", FieldType.timestampMillis())
            .field("temp", FieldType.float64())
            .field("status", FieldType.string().nullable())
            .field("clock", FieldType.map(FieldType.int64()))
            .build();

    /** Readings per device: the key's second field runs 0..7. */
    static final int READINGS_PER_DEVICE = 8;
    private static final long START_MILLIS = 1_709_164_800_000L; // 2024-02-29T00:00Z
    private static final long SPAN_MILLIS = 30L * 24 * 3_600_000;
    private static final String[] STATUS = {"ok", "warn", "fault", null};
    /** A prime that divides no size we use (it is neither 2 nor 5), so {@code j * STRIDE mod n} is a bijection. */
    private static final long STRIDE = 1_000_003L;

    private final int records;
    private final int keys;
    private final int extras;

    private Workload(int records) {
        if (records < 12 || records % STRIDE == 0) {
            throw new IllegalArgumentException("records must be at least 12 and not a multiple of " + STRIDE + ": " + records);
        }
        this.records = records;
        this.keys = (int) Math.ceil(records / 1.2);
        this.extras = records - keys;
        if ((long) (extras - 1) * 5 >= keys) {
            throw new IllegalStateException("extra versions do not fit every fifth key for " + records + " records");
        }
    }

    public static Workload of(int records) {
        return new Workload(records);
    }

    public int records() {
        return records;
    }

    /** Number of unique keys, which is the number of survivors for every policy (there are no tombstones). */
    public int keys() {
        return keys;
    }

    /** Whether key {@code k} has an extra version. */
    boolean hasExtra(int k) {
        return k % 5 == 0 && k / 5 < extras;
    }

    /** The delivered record at position {@code j}. */
    public Reading reading(int j) {
        int i = (int) ((j * STRIDE) % records);
        return i < keys ? version(i, false) : version((i - keys) * 5, true);
    }

    /** How an extra version relates to the first one. */
    enum Relation { NEWER, OLDER, CONCURRENT }

    static Relation relation(int k) {
        int r = (int) Math.floorMod(mix(k, 7), 10L);
        return r < 4 ? Relation.NEWER : r < 8 ? Relation.OLDER : Relation.CONCURRENT;
    }

    /** The first version of key {@code k}, or its extra version ({@link #hasExtra} must hold). */
    Reading version(int k, boolean extra) {
        long seq = 10 + Math.floorMod(mix(k, 1), 1000L);
        long at = START_MILLIS + Math.floorMod(mix(k, 2), SPAN_MILLIS);
        long w1 = 2 + Math.floorMod(mix(k, 3), 1000L);
        long w2 = 2 + Math.floorMod(mix(k, 4), 1000L);
        int salt = extra ? 11 : 5;
        if (extra) {
            long step = 1 + Math.floorMod(mix(k, 6), 5L);
            switch (relation(k)) {
                case NEWER -> {
                    seq += step;
                    w1 += step;
                }
                case OLDER -> {
                    seq -= step;
                    w1 -= 1;
                }
                case CONCURRENT -> {
                    // neither clock covers the other; the extra one has the greater counter sum, so pick chooses it
                    seq += step;
                    w1 += 2;
                    w2 -= 1;
                }
            }
            at += Math.floorMod(mix(k, 8), 5_000L) - 2_500;
        }
        double temp = (Math.floorMod(mix(k, salt), 801L) - 400) / 10.0;
        String status = STATUS[(int) Math.floorMod(mix(k, salt + 1), 4L)];
        TreeMap<String, Long> clock = new TreeMap<>();
        clock.put("w1", w1);
        clock.put("w2", w2);
        return new Reading(device(k), k % READINGS_PER_DEVICE, seq, at, temp, status, clock);
    }

    static String device(int k) {
        String digits = Integer.toString(k / READINGS_PER_DEVICE);
        return "d" + "0000000".substring(Math.min(7, digits.length())) + digits;
    }

    /** The key index of a device and reading number. */
    public static int keyIndex(String device, int readingNo) {
        return Integer.parseInt(device, 1, device.length(), 10) * READINGS_PER_DEVICE + readingNo;
    }

    /** The {@code seq} of key {@code k}'s last-writer survivor. */
    public long expectedLastWriterSeq(int k) {
        long first = version(k, false).seq();
        return hasExtra(k) ? Math.max(first, version(k, true).seq()) : first;
    }

    /** The record as onefold's row. */
    public static Row row(Reading r) {
        return Row.of(SCHEMA, r.device(), r.readingNo(), r.seq(), r.recordedAt(), r.temp(), r.status(), r.clock());
    }

    /** All readings in delivery order, held in memory. */
    public List<Reading> readings() {
        List<Reading> out = new ArrayList<>(records);
        for (int j = 0; j < records; j++) {
            out.add(reading(j));
        }
        return out;
    }

    /** All rows in delivery order, held in memory. */
    public List<Row> rows() {
        List<Row> out = new ArrayList<>(records);
        for (int j = 0; j < records; j++) {
            out.add(row(reading(j)));
        }
        return out;
    }

    /** The rows in delivery order, generated as they are read (nothing is held). */
    public Iterator<Row> streamRows() {
        return new Iterator<>() {
            int j;

            @Override
            public boolean hasNext() {
                return j < records;
            }

            @Override
            public Row next() {
                if (j >= records) {
                    throw new NoSuchElementException();
                }
                return row(reading(j++));
            }
        };
    }

    /** A SplitMix64-style mix of a key index and a field salt (common practice for cheap, well-spread values). */
    private static long mix(long k, long salt) {
        long z = k * 0x9E3779B97F4A7C15L + salt * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
        z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
        return z ^ (z >>> 31);
    }
}
