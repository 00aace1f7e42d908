package dev.onefold.examples.sinks;

import dev.onefold.DatasetSpec;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.testkit.JdbcTableSink;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.sql.Types;
import java.util.OptionalLong;

/**
 * The example store: a fictional parcel-tracking service keeps the latest status of each parcel in one SQL
 * table, fed from an at-least-once log of status events. Each event carries the parcel's id, a version its
 * producer bumps on every change, the status, an optional weight, and a delete flag when the parcel record is
 * withdrawn. The writers in this package are four ways to maintain that table, one of them correct.
 *
 * <p>Uses only {@code java.sql}; any driver that speaks plain SQL works (the tests use H2). Stateless and
 * thread-safe; each helper costs one statement.
 */
public final class ParcelTable {
    public static final RowSchema SCHEMA = RowSchema.builder("parcel_status")
            .field("parcel_id", FieldType.string())
            .field("version", FieldType.int64())
            .field("status", FieldType.string())
            .field("weight_grams", FieldType.int64().nullable())
            .field("deleted", FieldType.bool().nullable())
            .build();

    /** One row per parcel; the highest version wins; a winning delete removes the parcel. */
    public static final DatasetSpec SPEC = DatasetSpec.builder().key("parcel_id").lastWriter("version")
            .tombstone("deleted").build();

    /** The visible state: withdrawn parcels keep their row (so older events cannot revive them) but are hidden. */
    public static final String STATE_QUERY = "SELECT * FROM parcel WHERE deleted IS NULL OR deleted = FALSE";

    private ParcelTable() {}

    /**
     * Creates the table in an empty database and opens a sink over it with the given writer.
     *
     * @param uniqueKey whether parcel_id is the primary key (an append-only table has none)
     */
    public static JdbcTableSink open(JdbcTableSink.Connector connector, JdbcTableSink.Writer writer, boolean uniqueKey)
            throws SQLException {
        JdbcTableSink sink = JdbcTableSink.open(connector, SCHEMA, STATE_QUERY, writer);
        try (Statement st = sink.connection().createStatement()) {
            st.execute("CREATE TABLE parcel (parcel_id VARCHAR(64) NOT NULL" + (uniqueKey ? " PRIMARY KEY" : "")
                    + ", version BIGINT NOT NULL, status VARCHAR(32) NOT NULL, weight_grams BIGINT, deleted BOOLEAN)");
        } catch (SQLException e) {
            sink.close();
            throw e;
        }
        return sink;
    }

    /** The stored version of a parcel, or empty when the table has no row for it. */
    static OptionalLong storedVersion(Connection c, String parcelId) throws SQLException {
        try (PreparedStatement ps = c.prepareStatement("SELECT version FROM parcel WHERE parcel_id = ?")) {
            ps.setString(1, parcelId);
            try (ResultSet rs = ps.executeQuery()) {
                return rs.next() ? OptionalLong.of(rs.getLong(1)) : OptionalLong.empty();
            }
        }
    }

    static void insert(Connection c, Row event) throws SQLException {
        try (PreparedStatement ps = c.prepareStatement(
                "INSERT INTO parcel (version, status, weight_grams, deleted, parcel_id) VALUES (?, ?, ?, ?, ?)")) {
            bind(ps, event);
            ps.executeUpdate();
        }
    }

    /** Overwrites the parcel's row with the event; returns how many rows changed. */
    static int overwrite(Connection c, Row event) throws SQLException {
        try (PreparedStatement ps = c.prepareStatement(
                "UPDATE parcel SET version = ?, status = ?, weight_grams = ?, deleted = ? WHERE parcel_id = ?")) {
            bind(ps, event);
            return ps.executeUpdate();
        }
    }

    /** Binds version, status, weight, deleted, parcel id: the column order both statements above share. */
    private static void bind(PreparedStatement ps, Row event) throws SQLException {
        ps.setLong(1, (Long) event.get("version"));
        ps.setString(2, (String) event.get("status"));
        ps.setObject(3, event.get("weight_grams"), Types.BIGINT);
        ps.setObject(4, event.get("deleted"), Types.BOOLEAN);
        ps.setString(5, (String) event.get("parcel_id"));
    }
}
