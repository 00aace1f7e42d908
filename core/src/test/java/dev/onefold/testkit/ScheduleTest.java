package dev.onefold.testkit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.OnefoldException;
import dev.onefold.testkit.jqwik.SinkArbitraries;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.stream.IntStream;
import java.util.stream.LongStream;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.constraints.IntRange;
import org.junit.jupiter.api.Test;

/**
 * Schedules contain what they claim. Each claim is recomputed here from the steps alone, independently of the
 * generator's bookkeeping; the records are the integers 0..n-1 so each is its own identity.
 */
class ScheduleTest {

    // ---- claims, checked over random settings and seeds

    @Property
    void generate_deliversEveryRecordAtLeastOnce(@ForAll @IntRange(min = 1, max = 150) int n,
            @ForAll("settings") ScheduleSettings settings, @ForAll long seed) {
        Schedule<Integer> s = Schedule.generate(numbers(n), settings, seed);
        Set<Integer> seen = new HashSet<>();
        deliveries(s).forEach(d -> seen.addAll(d.records()));
        assertEquals(new HashSet<>(numbers(n)), seen);
    }

    @Property
    void generate_countsOfDuplicatesAndReplaysAddUp(@ForAll @IntRange(min = 1, max = 150) int n,
            @ForAll("settings") ScheduleSettings settings, @ForAll long seed) {
        Schedule<Integer> s = Schedule.generate(numbers(n), settings, seed);
        Map<String, Integer> recordAt = new HashMap<>();
        int delivered = 0;
        for (Step.Delivery<Integer> d : deliveries(s)) {
            for (LogEntry<Integer> e : d.entries()) {
                delivered++;
                Integer before = recordAt.putIfAbsent(e.partition() + "@" + e.offset(), e.record());
                assertTrue(before == null || before.equals(e.record()), "one record per log position: " + e);
            }
        }
        int logEntries = recordAt.size();
        assertEquals(n + s.duplicatesAdded(), logEntries, "log holds each record once plus the copies claimed");
        assertEquals(logEntries + s.replayedEntries(), delivered, "deliveries beyond the log are the replays claimed");
        int restarts = (int) s.steps().stream().filter(st -> st instanceof Step.Restart).count();
        assertEquals(settings.crashes(), restarts);
        Map<Integer, Integer> partitionSizes = new HashMap<>();
        recordAt.keySet().forEach(k -> partitionSizes.merge(Integer.parseInt(k.substring(0, k.indexOf('@'))), 1, Integer::sum));
        partitionSizes.forEach((p, size) -> IntStream.range(0, size).forEach(o ->
                assertTrue(recordAt.containsKey(p + "@" + o), "offsets of partition " + p + " are contiguous")));
        assertTrue(partitionSizes.keySet().stream().allMatch(p -> p < settings.partitions()));
    }

    @Property
    void generate_respectsReorderBoundWithinEachPass(@ForAll @IntRange(min = 1, max = 150) int n,
            @ForAll("settings") ScheduleSettings settings, @ForAll long seed) {
        Schedule<Integer> s = Schedule.generate(numbers(n), settings, seed);
        Map<Integer, Long> highestSoFar = new HashMap<>();
        for (Step<Integer> step : s.steps()) {
            if (step instanceof Step.Restart) {
                highestSoFar.clear();
                continue;
            }
            for (LogEntry<Integer> e : ((Step.Delivery<Integer>) step).entries()) {
                long highest = highestSoFar.getOrDefault(e.partition(), e.offset());
                assertTrue(highest - e.offset() <= settings.reorderBound(), () -> "offset " + e + " delivered after offset "
                        + highest + ", beyond reorder bound " + settings.reorderBound());
                highestSoFar.put(e.partition(), Math.max(highest, e.offset()));
            }
        }
    }

    @Property
    void generate_batchSizesWithinLimit(@ForAll @IntRange(min = 1, max = 150) int n,
            @ForAll("settings") ScheduleSettings settings, @ForAll long seed) {
        for (Step.Delivery<Integer> d : deliveries(Schedule.generate(numbers(n), settings, seed))) {
            assertTrue(d.entries().size() >= 1 && d.entries().size() <= settings.maxBatchSize());
        }
    }

    @Property
    void generate_replaysStartAtOrBeforeCommittedOffsetAndRunToTheEnd(@ForAll @IntRange(min = 1, max = 150) int n,
            @ForAll("settings") ScheduleSettings settings, @ForAll long seed) {
        Schedule<Integer> s = Schedule.generate(numbers(n), settings, seed);
        Map<Integer, Set<Long>> everDelivered = new HashMap<>();
        Map<Integer, Long> partitionSize = new HashMap<>();
        for (Step.Delivery<Integer> d : deliveries(s)) {
            d.entries().forEach(e -> partitionSize.merge(e.partition(), e.offset() + 1, Math::max));
        }
        List<Step<Integer>> steps = s.steps();
        for (int i = 0; i < steps.size(); i++) {
            if (steps.get(i) instanceof Step.Delivery<Integer> d) {
                d.entries().forEach(e -> everDelivered.computeIfAbsent(e.partition(), p -> new HashSet<>()).add(e.offset()));
                continue;
            }
            Step.Restart<Integer> restart = (Step.Restart<Integer>) steps.get(i);
            Map<Integer, Set<Long>> nextPass = new HashMap<>();
            boolean passEnds = false;
            for (int j = i + 1; j < steps.size() && !passEnds; j++) {
                if (steps.get(j) instanceof Step.Delivery<Integer> d) {
                    d.entries().forEach(e -> nextPass.computeIfAbsent(e.partition(), p -> new HashSet<>()).add(e.offset()));
                } else {
                    passEnds = true;
                }
            }
            for (Map.Entry<Integer, Long> rewind : restart.rewoundTo().entrySet()) {
                int p = rewind.getKey();
                long committed = 0;
                while (everDelivered.getOrDefault(p, Set.of()).contains(committed)) {
                    committed++;
                }
                assertTrue(rewind.getValue() <= committed, "partition " + p + " replays from " + rewind.getValue()
                        + ", after its committed offset " + committed);
                Set<Long> replayed = nextPass.getOrDefault(p, Set.of());
                assertTrue(replayed.stream().allMatch(o -> o >= rewind.getValue()), "replay starts at the rewound offset");
                if (!passEnds) {
                    for (long o = rewind.getValue(); o < partitionSize.getOrDefault(p, 0L); o++) {
                        assertTrue(replayed.contains(o), "final replay of partition " + p + " misses offset " + o);
                    }
                }
            }
        }
    }

    @Property(tries = 200)
    void generate_sameSeedSameSchedule(@ForAll @IntRange(min = 1, max = 100) int n,
            @ForAll("settings") ScheduleSettings settings, @ForAll long seed) {
        assertEquals(Schedule.generate(numbers(n), settings, seed).steps(), Schedule.generate(numbers(n), settings, seed).steps());
    }

    @Provide
    Arbitrary<ScheduleSettings> settings() {
        return SinkArbitraries.settings();
    }

    // ---- settings at their extremes

    @Test
    void generate_calmSettingsDeliverTheLogInOrderOnce() {
        Schedule<Integer> s = Schedule.generate(numbers(50), new ScheduleSettings(1, 0, 0, 1, 0), 7);
        assertEquals(50, s.steps().size());
        assertEquals(0, s.duplicatesAdded());
        assertEquals(0, s.replayedEntries());
        List<Long> offsets = new ArrayList<>();
        deliveries(s).forEach(d -> d.entries().forEach(e -> offsets.add(e.offset())));
        assertEquals(LongStream.range(0, 50).boxed().toList(), offsets);
    }

    @Test
    void generate_duplicateRateOneWritesEveryRecordTwice() {
        Schedule<Integer> s = Schedule.generate(numbers(40), ScheduleSettings.defaults().withDuplicateRate(1), 3);
        assertEquals(40, s.duplicatesAdded());
    }

    @Test
    void generate_severalPartitionsAreAllUsed() {
        Set<Integer> used = new HashSet<>();
        deliveries(Schedule.generate(numbers(100), ScheduleSettings.defaults().withPartitions(4), 11))
                .forEach(d -> d.entries().forEach(e -> used.add(e.partition())));
        assertEquals(Set.of(0, 1, 2, 3), used);
    }

    @Test
    void generate_emptyRecords_throwsUsage() {
        OnefoldException e = assertThrows(OnefoldException.class,
                () -> Schedule.generate(List.of(), ScheduleSettings.defaults(), 1));
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
    }

    @Test
    void settings_outOfRange_throwUsageNamingTheValue() {
        OnefoldException e = assertThrows(OnefoldException.class, () -> ScheduleSettings.defaults().withDuplicateRate(1.5));
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
        assertTrue(e.getMessage().contains("duplicateRate") && e.getMessage().contains("1.5"), e.getMessage());
        assertThrows(OnefoldException.class, () -> ScheduleSettings.defaults().withPartitions(0));
        assertThrows(OnefoldException.class, () -> ScheduleSettings.defaults().withReorderBound(-1));
        assertThrows(OnefoldException.class, () -> ScheduleSettings.defaults().withMaxBatchSize(0));
        assertThrows(OnefoldException.class, () -> ScheduleSettings.defaults().withCrashes(-1));
    }

    // ---- helpers

    static List<Integer> numbers(int n) {
        return IntStream.range(0, n).boxed().toList();
    }

    static <R> List<Step.Delivery<R>> deliveries(Schedule<R> s) {
        List<Step.Delivery<R>> out = new ArrayList<>();
        for (Step<R> step : s.steps()) {
            if (step instanceof Step.Delivery<R> d) {
                out.add(d);
            }
        }
        return out;
    }
}
