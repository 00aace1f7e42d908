package dev.onefold.testkit;

import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.record.Row;
import dev.onefold.testkit.jqwik.SinkArbitraries;
import java.util.List;
import java.util.Optional;
import java.util.Random;
import net.jqwik.api.Arbitraries;
import net.jqwik.api.Arbitrary;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.Provide;
import net.jqwik.api.Shrinkable;
import org.junit.jupiter.api.Test;

/** The jqwik side of the kit: generated schedules feed a correct sink, and jqwik's shrinking reaches small failures. */
class SinkArbitrariesTest {
    private static final SinkCheck<Row> CORRECT = SinkCheck.forRows(Items.SPEC, Items.SCHEMA, MemorySinks.Upserting::new);
    private static final SinkCheck<Row> APPENDING = SinkCheck.forRows(Items.SPEC, Items.SCHEMA, MemorySinks.Appending::new);

    @Property(tries = 300)
    void verify_correctSinkConvergesOnGeneratedSchedules(@ForAll("schedules") Schedule<Row> schedule) {
        CORRECT.verify(schedule);
    }

    @Provide
    Arbitrary<Schedule<Row>> schedules() {
        return SinkArbitraries.schedules(rows());
    }

    /**
     * Shrinks a failing schedule for the appending sink the way jqwik does (take the first smaller candidate
     * that still fails, repeat) and checks it ends small: an appending sink fails once any record is delivered
     * twice, so very few records and no more than one partition are needed.
     */
    @Test
    void schedules_failureShrinksToFewRecordsAndOnePartition() {
        Arbitrary<Schedule<Row>> arbitrary = SinkArbitraries.schedules(rows());
        Random random = new Random(42);
        Shrinkable<Schedule<Row>> current = null;
        while (current == null) {
            Shrinkable<Schedule<Row>> candidate = arbitrary.generator(1000).next(random);
            if (fails(candidate)) {
                current = candidate;
            }
        }
        for (int step = 0; step < 2000; step++) {
            Optional<Shrinkable<Schedule<Row>>> smaller = current.shrink().filter(SinkArbitrariesTest::fails).findFirst();
            if (smaller.isEmpty()) {
                break;
            }
            current = smaller.get();
        }
        Schedule<Row> smallest = current.value();
        assertTrue(smallest.records().size() <= 2 && smallest.settings().partitions() == 1, smallest.summary());
    }

    private static boolean fails(Shrinkable<Schedule<Row>> s) {
        return APPENDING.run(s.value()).isPresent();
    }

    private static Arbitrary<List<Row>> rows() {
        return Arbitraries.longs().map(seed -> Items.generate(new Random(seed), 30, 5));
    }
}
