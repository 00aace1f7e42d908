package dev.onefold.testkit;

import dev.onefold.OnefoldException;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.BitSet;
import java.util.Collections;
import java.util.Deque;
import java.util.List;
import java.util.Random;
import java.util.TreeMap;

/**
 * A seeded, reproducible at-least-once delivery of a set of records to a sink: the records are written to a
 * simulated log of several partitions (some twice, as producer retries do), then consumed in deliveries of
 * random size that interleave partitions, stray from log order within a bound, and after each simulated crash
 * replay every partition from a random offset at or before the last committed one.
 *
 * <h2>Invariants</h2>
 * Let S be {@code generate(records, settings, seed)}. Then: every record is delivered at least once; S holds
 * exactly {@code settings.crashes()} restarts; the entries delivered number {@code records.size() +
 * duplicatesAdded() + replayedEntries()}; within one partition between two restarts, an entry is never
 * delivered after one whose offset exceeds its own by more than {@code settings.reorderBound()}; every
 * delivery holds 1 to {@code settings.maxBatchSize()} entries; and the same arguments give the same S on any
 * JVM (the generator is {@link java.util.Random}, whose sequence its specification fixes).
 *
 * <h2>Commit model</h2>
 * An entry counts as committed once every entry before it in its partition has been delivered, as a consumer
 * that commits the contiguous delivered prefix does. The sink is expected to keep everything whose
 * {@link Sink#apply} call returned, so a replay never needs to go further back than the committed offset;
 * going back further (a random amount) models commits that lag behind.
 *
 * <p>Immutable when the records are; thread-safe. Generation costs O(n log n) for n log entries plus the
 * replayed entries.
 */
public final class Schedule<R> {
    private final long seed;
    private final ScheduleSettings settings;
    private final List<R> records;
    private final List<Step<R>> steps;
    private final int duplicatesAdded;
    private final int replayedEntries;

    private Schedule(long seed, ScheduleSettings settings, List<R> records, List<Step<R>> steps, int duplicatesAdded,
            int replayedEntries) {
        this.seed = seed;
        this.settings = settings;
        this.records = records;
        this.steps = steps;
        this.duplicatesAdded = duplicatesAdded;
        this.replayedEntries = replayedEntries;
    }

    /**
     * Generates the schedule for a seed.
     *
     * @param records the distinct records the producers write (each delivered at least once); not empty
     * @throws OnefoldException (USAGE) when records is empty or holds null
     */
    public static <R> Schedule<R> generate(List<? extends R> records, ScheduleSettings settings, long seed) {
        if (records.isEmpty()) {
            throw OnefoldException.usage("a schedule needs at least one record to deliver");
        }
        if (records.contains(null)) {
            throw OnefoldException.usage("record " + records.indexOf(null) + " of the schedule's records is null");
        }
        return new Generator<R>(List.copyOf(records), settings, seed).run();
    }

    public long seed() { return seed; }
    public ScheduleSettings settings() { return settings; }

    /** The distinct records written to the log, as given. */
    public List<R> records() { return records; }

    /** The deliveries and restarts in the order the sink sees them. */
    public List<Step<R>> steps() { return steps; }

    /** How many records the producers wrote to the log a second time. */
    public int duplicatesAdded() { return duplicatesAdded; }

    /** How many entries were delivered again because a crash rewound their partition. */
    public int replayedEntries() { return replayedEntries; }

    /** A one-line summary: seed, settings and counts. */
    public String summary() {
        return "seed " + seed + ", " + settings + ": " + records.size() + " records, " + duplicatesAdded
                + " written twice, " + replayedEntries + " replayed, " + steps.size() + " steps";
    }

    @Override
    public String toString() {
        return summary();
    }

    /** The generation state machine; used once. */
    private static final class Generator<R> {
        private final List<R> records;
        private final ScheduleSettings settings;
        private final long seed;
        private final Random random;
        private final List<List<R>> log = new ArrayList<>();
        private final List<BitSet> delivered = new ArrayList<>();
        private final List<Deque<Integer>> pending = new ArrayList<>();
        private final List<Step<R>> steps = new ArrayList<>();
        private int duplicatesAdded;
        private int replayedEntries;

        Generator(List<R> records, ScheduleSettings settings, long seed) {
            this.records = records;
            this.settings = settings;
            this.seed = seed;
            this.random = new Random(seed);
        }

        Schedule<R> run() {
            writeLog();
            int logSize = records.size() + duplicatesAdded;
            // Crash points are thresholds on the count of entries delivered so far; replays only raise that
            // count, so every threshold is eventually crossed and exactly `crashes` restarts happen.
            Deque<Integer> crashAt = new ArrayDeque<>();
            random.ints(settings.crashes(), 1, logSize + 1).sorted().forEach(crashAt::add);
            for (int p = 0; p < settings.partitions(); p++) {
                pending.add(passFrom(p, 0));
            }
            long deliveredSoFar = 0;
            while (!crashAt.isEmpty() || anyPending()) {
                if (anyPending()) {
                    Step.Delivery<R> d = deliverBatch();
                    steps.add(d);
                    deliveredSoFar += d.entries().size();
                }
                if (!crashAt.isEmpty() && (deliveredSoFar >= crashAt.peekFirst() || !anyPending())) {
                    crashAt.removeFirst();
                    crash();
                }
            }
            return new Schedule<>(seed, settings, records, Collections.unmodifiableList(steps), duplicatesAdded,
                    replayedEntries);
        }

        /** Producers write each record once, some twice; the log order is random; each entry picks a partition. */
        private void writeLog() {
            List<R> entries = new ArrayList<>(records);
            for (R r : records) {
                if (random.nextDouble() < settings.duplicateRate()) {
                    entries.add(r);
                    duplicatesAdded++;
                }
            }
            Collections.shuffle(entries, random);
            for (int p = 0; p < settings.partitions(); p++) {
                log.add(new ArrayList<>());
                delivered.add(new BitSet());
            }
            for (R r : entries) {
                log.get(random.nextInt(settings.partitions())).add(r);
            }
        }

        /**
         * The offsets from {@code start} to the end of a partition in a bounded shuffle: offset i sorts by
         * i + a random value in [0, bound], so offset j can only be overtaken by offsets i with j - i <= bound.
         */
        private Deque<Integer> passFrom(int partition, int start) {
            int size = log.get(partition).size();
            int bound = settings.reorderBound();
            long[] sortKeys = new long[size - start];
            for (int i = start; i < size; i++) {
                long jittered = i + (long) random.nextInt(bound + 1);
                sortKeys[i - start] = (jittered << 32) | i;
            }
            java.util.Arrays.sort(sortKeys);
            Deque<Integer> order = new ArrayDeque<>(sortKeys.length);
            for (long k : sortKeys) {
                order.add((int) k);
            }
            return order;
        }

        private boolean anyPending() {
            for (Deque<Integer> d : pending) {
                if (!d.isEmpty()) {
                    return true;
                }
            }
            return false;
        }

        private Step.Delivery<R> deliverBatch() {
            int size = 1 + random.nextInt(settings.maxBatchSize());
            List<LogEntry<R>> batch = new ArrayList<>(size);
            List<Integer> open = new ArrayList<>();
            while (batch.size() < size) {
                open.clear();
                for (int p = 0; p < pending.size(); p++) {
                    if (!pending.get(p).isEmpty()) {
                        open.add(p);
                    }
                }
                if (open.isEmpty()) {
                    break;
                }
                int p = open.get(random.nextInt(open.size()));
                int offset = pending.get(p).removeFirst();
                if (delivered.get(p).get(offset)) {
                    replayedEntries++;
                }
                delivered.get(p).set(offset);
                batch.add(new LogEntry<>(p, offset, log.get(p).get(offset)));
            }
            return new Step.Delivery<>(batch);
        }

        /** Every partition rewinds to a random offset at or before its committed (contiguous delivered) prefix. */
        private void crash() {
            TreeMap<Integer, Long> rewound = new TreeMap<>();
            for (int p = 0; p < settings.partitions(); p++) {
                int committed = delivered.get(p).nextClearBit(0);
                int from = random.nextInt(committed + 1);
                rewound.put(p, (long) from);
                pending.set(p, passFrom(p, from));
            }
            steps.add(new Step.Restart<>(rewound));
        }
    }
}
