package dev.onefold.examples.sinks;

import dev.onefold.record.Row;
import dev.onefold.testkit.JdbcTableSink;
import dev.onefold.testkit.Step;
import java.sql.Connection;
import java.sql.SQLException;

/**
 * Deliberately broken: inserts every event as a new row (into a table without a unique key), so a duplicate or
 * a newer version leaves several rows for one parcel. The test kit catches it as a key with extra records.
 *
 * <p>Stateless and thread-safe; one statement per event.
 */
public final class AppendingWriter implements JdbcTableSink.Writer {

    @Override
    public void write(Connection c, Step.Delivery<Row> delivery) throws SQLException {
        for (Row event : delivery.records()) {
            ParcelTable.insert(c, event);
        }
    }
}
