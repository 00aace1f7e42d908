package dev.onefold.examples.sinks;

import dev.onefold.record.Row;
import dev.onefold.testkit.JdbcTableSink;
import dev.onefold.testkit.Step;
import java.sql.Connection;
import java.sql.SQLException;

/**
 * Deliberately broken: upserts every event without looking at its version, so whichever event arrives last
 * wins. Correct only when the log delivers each parcel's events once and in order, which at-least-once delivery
 * never promises; the test kit catches it with a reordered or replayed schedule.
 *
 * <p>Stateless and thread-safe; one or two statements per event.
 */
public final class IgnoresVersionsWriter implements JdbcTableSink.Writer {

    @Override
    public void write(Connection c, Step.Delivery<Row> delivery) throws SQLException {
        for (Row event : delivery.records()) {
            if (ParcelTable.overwrite(c, event) == 0) {
                ParcelTable.insert(c, event);
            }
        }
    }
}
