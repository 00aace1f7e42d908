package dev.onefold.testkit.jqwik;

import dev.onefold.testkit.Schedule;
import dev.onefold.testkit.ScheduleSettings;
import java.util.List;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.Combinators;

/**
 * jqwik arbitraries for the test kit, for teams whose tests use jqwik: schedule settings and whole delivery
 * {@link Schedule}s, built from jqwik's own values so that jqwik shrinks a failure towards fewer records, one
 * partition, no duplicates, no reordering, small batches and no crashes. Feed each schedule to
 * {@link dev.onefold.testkit.SinkCheck#verify}.
 *
 * <p>jqwik is an optional dependency of onefold core: only code that uses this package needs it on the class
 * path, which a team's test scope provides. Stateless and thread-safe; generating a schedule costs what
 * {@link Schedule#generate} costs.
 */
public final class SinkArbitraries {
    private SinkArbitraries() {}

    /** Settings from calm to hostile: 1-4 partitions, duplicate rate 0-0.5, reorder 0-8, batches 1-16, 0-3 crashes. */
    public static Arbitrary<ScheduleSettings> settings() {
        return Combinators.combine(
                Arbitraries.integers().between(1, 4),
                Arbitraries.doubles().between(0.0, 0.5).ofScale(2),
                Arbitraries.integers().between(0, 8),
                Arbitraries.integers().between(1, 16),
                Arbitraries.integers().between(0, 3)).as(ScheduleSettings::new);
    }

    /** Schedules of records drawn from {@code records} (empty lists are skipped) under {@code settings}. */
    public static <R> Arbitrary<Schedule<R>> schedules(Arbitrary<List<R>> records, Arbitrary<ScheduleSettings> settings) {
        return Combinators.combine(records.filter(list -> !list.isEmpty()), settings, Arbitraries.longs())
                .as(Schedule::<R>generate);
    }

    /** Schedules of records drawn from {@code records} under {@link #settings()}. */
    public static <R> Arbitrary<Schedule<R>> schedules(Arbitrary<List<R>> records) {
        return schedules(records, settings());
    }

    /** Schedules that all deliver the same records, under {@link #settings()}. */
    public static <R> Arbitrary<Schedule<R>> schedules(List<R> records) {
        return schedules(Arbitraries.just(List.copyOf(records)));
    }
}
