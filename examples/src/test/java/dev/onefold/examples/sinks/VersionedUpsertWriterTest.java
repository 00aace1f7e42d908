package dev.onefold.examples.sinks;

import dev.onefold.record.Row;
import dev.onefold.testkit.Schedule;
import dev.onefold.testkit.ScheduleSettings;
import dev.onefold.testkit.SinkCheck;
import dev.onefold.testkit.jqwik.SinkArbitraries;
import java.util.Random;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import org.junit.jupiter.api.Test;

/** The correct parcel writer survives at-least-once delivery, checked both ways the kit offers. */
class VersionedUpsertWriterTest {
    private static final SinkCheck<Row> CHECK = ParcelEvents.check(new VersionedUpsertWriter(), true);

    /** The plain JUnit 5 way: a seeded loop. */
    @Test
    void write_convergesUnderSeededSchedules() {
        CHECK.verifySeeds(ParcelEvents::generate, ScheduleSettings.defaults(), 0, 100);
    }

    @Test
    void write_convergesUnderHostileSchedules() {
        CHECK.verifySeeds(ParcelEvents::generate, new ScheduleSettings(4, 0.5, 8, 16, 3), 1_000, 50);
    }

    /** The jqwik way: generated schedules, shrunk by jqwik on failure. */
    @Property(tries = 100)
    void write_convergesUnderGeneratedSchedules(@ForAll("schedules") Schedule<Row> schedule) {
        CHECK.verify(schedule);
    }

    @Provide
    Arbitrary<Schedule<Row>> schedules() {
        return SinkArbitraries.schedules(Arbitraries.longs().map(seed -> ParcelEvents.generate(new Random(seed))));
    }
}
