package dev.onefold.examples.consumer;

import dev.onefold.OnefoldException;
import dev.onefold.gate.Decision;
import dev.onefold.gate.StoredStateLookup;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.List;

/**
 * The tracking service's SQL table, one row per parcel, written through JDBC: an emit upserts the parcel's row
 * with its visible scan (or marks it withdrawn) and the gate's merge-state bytes, so the same table serves as the
 * gate's stored-state lookup in exact mode. Rejected scans go to a second table with their reason.
 *
 * <p>Each method opens its own connection, so the consumer thread (lookups) and the writer thread (upserts)
 * never share one; one more connection stays open from construction to {@link #close()} so an embedded database
 * is not closed and reopened between calls. Thread-safe; cost: one statement per row, one transaction per batch.
 */
public final class ParcelTable implements StoredStateLookup, AutoCloseable {
    private final String url;
    private final Connection keepOpen;

    public ParcelTable(String jdbcUrl) {
        this.url = jdbcUrl;
        try {
            this.keepOpen = DriverManager.getConnection(url);
        } catch (SQLException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "parcel table (" + url + "): cannot open: "
                    + e.getMessage(), e);
        }
        run(c -> {
            try (Statement s = c.createStatement()) {
                s.execute("CREATE TABLE IF NOT EXISTS parcel (key_bytes VARBINARY(256) PRIMARY KEY, "
                        + "scan VARCHAR(400), withdrawn BOOLEAN NOT NULL, merge_state VARBINARY(4096) NOT NULL)");
                s.execute("CREATE TABLE IF NOT EXISTS rejected_scan (source VARCHAR(100), log_offset BIGINT, "
                        + "reason VARCHAR(1000), scan VARCHAR(1000), PRIMARY KEY (source, log_offset))");
            }
            return null;
        }, "create tables");
    }

    private interface Work<T> {
        T in(Connection c) throws SQLException;
    }

    private <T> T run(Work<T> work, String what) {
        try (Connection c = DriverManager.getConnection(url)) {
            return work.in(c);
        } catch (SQLException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "parcel table (" + url + "): " + what + " failed: "
                    + e.getMessage(), e);
        }
    }

    /** Applies a batch of decisions in one transaction, in order: emits upsert, rejections are kept. */
    public void apply(List<Decision<String>> batch) {
        run(c -> {
            c.setAutoCommit(false);
            try (PreparedStatement up = c.prepareStatement(
                    "MERGE INTO parcel (key_bytes, scan, withdrawn, merge_state) KEY (key_bytes) VALUES (?, ?, ?, ?)");
                    PreparedStatement rej = c.prepareStatement(
                            "MERGE INTO rejected_scan (source, log_offset, reason, scan) KEY (source, log_offset) "
                                    + "VALUES (?, ?, ?, ?)")) {
                for (Decision<String> d : batch) {
                    if (d.isEmit()) {
                        up.setBytes(1, d.keyBytes());
                        up.setString(2, d.deleted() ? null : d.visible().get(0));
                        up.setBoolean(3, d.deleted());
                        up.setBytes(4, d.stateBytes());
                        up.executeUpdate();
                    } else if (d.rejection() != null) {
                        rej.setString(1, d.partition());
                        rej.setLong(2, d.offset());
                        rej.setString(3, d.rejection().reason());
                        rej.setString(4, d.record());
                        rej.executeUpdate();
                    }
                }
            }
            c.commit();
            return null;
        }, "apply a batch of " + batch.size());
    }

    @Override
    public byte[] storedState(byte[] key) {
        return run(c -> {
            try (PreparedStatement q = c.prepareStatement("SELECT merge_state FROM parcel WHERE key_bytes = ?")) {
                q.setBytes(1, key);
                try (ResultSet r = q.executeQuery()) {
                    return r.next() ? r.getBytes(1) : null;
                }
            }
        }, "look up a merge state");
    }

    /** The scans of parcels currently tracked (not withdrawn). */
    public List<String> trackedScans() {
        return strings("SELECT scan FROM parcel WHERE NOT withdrawn ORDER BY key_bytes");
    }

    /** The rejected scans with their reasons, as {@code reason: scan}. */
    public List<String> rejectedScans() {
        return strings("SELECT reason || ': ' || scan FROM rejected_scan ORDER BY source, log_offset");
    }

    private List<String> strings(String sql) {
        return run(c -> {
            List<String> out = new ArrayList<>();
            try (Statement s = c.createStatement(); ResultSet r = s.executeQuery(sql)) {
                while (r.next()) {
                    out.add(r.getString(1));
                }
            }
            return out;
        }, "query");
    }

    @Override
    public void close() {
        try {
            keepOpen.close();
        } catch (SQLException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "parcel table (" + url + "): close failed: "
                    + e.getMessage(), e);
        }
    }
}
