package dev.onefold.examples.sinks;

import dev.onefold.record.Row;
import dev.onefold.testkit.JdbcTableSink;
import dev.onefold.testkit.Step;
import java.sql.Connection;
import java.sql.SQLException;

/**
 * Deliberately broken: applies events with the correct version rule but, to save a round trip, commits each
 * delivery only when the next one arrives. {@code write} returns before the delivery is durable, the consumer
 * commits its offsets, and a crash rolls the open transaction back: one acknowledged batch is lost on restart.
 * The test kit catches it with a schedule that restarts after a delivery and does not replay it.
 *
 * <p>Stateless and thread-safe (the open transaction lives in the connection); costs like
 * {@link VersionedUpsertWriter}.
 */
public final class LazyCommitWriter implements JdbcTableSink.Writer {

    @Override
    public void write(Connection c, Step.Delivery<Row> delivery) throws SQLException {
        if (c.getAutoCommit()) {
            c.setAutoCommit(false);
        } else {
            c.commit();
        }
        for (Row event : delivery.records()) {
            VersionedUpsertWriter.upsertIfNewer(c, event);
        }
    }
}
