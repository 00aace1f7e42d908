package dev.onefold.examples.sinks;

import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.record.Row;
import dev.onefold.testkit.Divergence;
import dev.onefold.testkit.KeyDifference;
import dev.onefold.testkit.ScheduleSettings;
import dev.onefold.testkit.SinkCheck;
import dev.onefold.testkit.SinkDivergedError;
import org.junit.jupiter.api.Test;

/**
 * Each deliberately broken writer is caught by the kit within a bounded number of seeded tries, and the report
 * shows the symptom of its bug.
 */
class BrokenSinksTest {
    /** Fixed seeds, so each writer is caught at the same try on every run; the bound leaves room to spare. */
    private static final int TRIES = 50;

    @Test
    void verifySeeds_writerIgnoringVersions_reportsAStaleParcel() {
        Divergence<Row> d = caught(ParcelEvents.check(new IgnoresVersionsWriter(), true));
        assertTrue(d.differences().stream().anyMatch(BrokenSinksTest::isStale), d.report());
    }

    @Test
    void verifySeeds_appendingWriter_reportsSeveralRowsForOneParcel() {
        Divergence<Row> d = caught(ParcelEvents.check(new AppendingWriter(), false));
        assertTrue(d.differences().stream().anyMatch(KeyDifference::hasExtraRecords), d.report());
    }

    @Test
    void verifySeeds_lazyCommitWriter_reportsAParcelLostAcrossARestart() {
        Divergence<Row> d = caught(ParcelEvents.check(new LazyCommitWriter(), true));
        assertTrue(d.involvesRestart(), d.report());
        assertTrue(d.differences().stream().allMatch(BrokenSinksTest::isStale), d.report());
    }

    /**
     * Whether the table shows an older state of the parcel than the winning event: missing where a row is
     * expected, an older version, or a row still visible where the winning event withdrew the parcel.
     */
    private static boolean isStale(KeyDifference<Row> k) {
        if (k.expected().isEmpty()) {
            return k.actual().size() == 1;
        }
        return k.actual().isEmpty()
                || k.actual().size() == 1 && (Long) k.actual().get(0).get("version") < (Long) k.expected().get(0).get("version");
    }

    @SuppressWarnings("unchecked")
    private static Divergence<Row> caught(SinkCheck<Row> check) {
        SinkDivergedError e = assertThrows(SinkDivergedError.class,
                () -> check.verifySeeds(ParcelEvents::generate, ScheduleSettings.defaults(), 0, TRIES));
        Divergence<Row> d = (Divergence<Row>) e.divergence();
        assertNull(d.error(), e.getMessage());
        assertTrue(!d.differences().isEmpty(), e.getMessage());
        return d;
    }
}
