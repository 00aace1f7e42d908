package dev.onefold.testkit;

import dev.onefold.OnefoldException;

/**
 * How hostile a generated delivery {@link Schedule} is: how many source partitions the log has, how often a
 * producer retry writes a record twice, how far deliveries may stray from log order, how large a delivery may
 * be, and how many times the consumer crashes and replays from an earlier offset.
 *
 * <p>Invariants (checked when built, violations throw {@link OnefoldException} of kind USAGE naming the
 * value): {@code partitions >= 1}, {@code 0 <= duplicateRate <= 1}, {@code reorderBound >= 0},
 * {@code maxBatchSize >= 1}, {@code crashes >= 0}. Immutable and thread-safe; building costs nothing.
 *
 * @param partitions    number of source partitions; each log entry lands in a random one
 * @param duplicateRate chance that a record is written to the log a second time (a producer retry)
 * @param reorderBound  within one partition and one pass, an entry is never delivered after an entry whose
 *                      offset is more than this much greater (0 keeps log order)
 * @param maxBatchSize  deliveries hold between 1 and this many entries
 * @param crashes       simulated consumer crashes; after each the sink restarts and every partition is
 *                      replayed from a random offset at or before the last committed one
 */
public record ScheduleSettings(int partitions, double duplicateRate, int reorderBound, int maxBatchSize, int crashes) {

    public ScheduleSettings {
        if (partitions < 1) {
            throw OnefoldException.usage("schedule settings: partitions must be at least 1, got " + partitions);
        }
        if (!(duplicateRate >= 0 && duplicateRate <= 1)) {
            throw OnefoldException.usage("schedule settings: duplicateRate must be within [0, 1], got " + duplicateRate);
        }
        if (reorderBound < 0) {
            throw OnefoldException.usage("schedule settings: reorderBound must not be negative, got " + reorderBound);
        }
        if (maxBatchSize < 1) {
            throw OnefoldException.usage("schedule settings: maxBatchSize must be at least 1, got " + maxBatchSize);
        }
        if (crashes < 0) {
            throw OnefoldException.usage("schedule settings: crashes must not be negative, got " + crashes);
        }
    }

    /** A moderately hostile default: 3 partitions, 20% duplicates, reorder within 4, batches up to 8, 2 crashes. */
    public static ScheduleSettings defaults() {
        return new ScheduleSettings(3, 0.2, 4, 8, 2);
    }

    public ScheduleSettings withPartitions(int value) {
        return new ScheduleSettings(value, duplicateRate, reorderBound, maxBatchSize, crashes);
    }

    public ScheduleSettings withDuplicateRate(double value) {
        return new ScheduleSettings(partitions, value, reorderBound, maxBatchSize, crashes);
    }

    public ScheduleSettings withReorderBound(int value) {
        return new ScheduleSettings(partitions, duplicateRate, value, maxBatchSize, crashes);
    }

    public ScheduleSettings withMaxBatchSize(int value) {
        return new ScheduleSettings(partitions, duplicateRate, reorderBound, value, crashes);
    }

    public ScheduleSettings withCrashes(int value) {
        return new ScheduleSettings(partitions, duplicateRate, reorderBound, maxBatchSize, value);
    }
}
