package dev.onefold.benchmarks.batch;

import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.duckdb.DuckDBAppender;
import org.duckdb.DuckDBConnection;

/**
 * The peer "an embedded SQL engine" for question 1: DuckDB's JDBC driver in process, in memory, with its
 * default settings (all cores, its own memory limit). Loading goes through DuckDB's appender, its bulk path,
 * and is measured apart from the query. The clock is two columns {@code w1, w2}: the SQL is told the writer
 * set up front.
 *
 * <p>Queries, each ordered by {@code recorded_at, device, reading_no}:
 * <ul>
 *   <li>last-writer: {@code row_number() over (partition by key order by seq desc) = 1};</li>
 *   <li>vector-clock: rows no other row of the key dominates (an anti-join), then {@code row_number()} by counter
 *       sum;</li>
 *   <li>field-wise: one {@code group by} with {@code max(temp)}, {@code arg_max(status, seq) filter (status is not
 *       null)} and {@code arg_max(..., seq)} for the rest.</li>
 * </ul>
 * Not thread-safe: one instance owns one connection. Close it.
 */
public final class DuckDbDedupe implements AutoCloseable {
    static final String TABLE = "readings";
    private static final String COLUMNS = "device, reading_no, seq, recorded_at, temp, status, w1, w2";
    private static final String ORDER = " order by recorded_at, device, reading_no";

    private final DuckDBConnection connection;

    public DuckDbDedupe() throws SQLException {
        Connection c = DriverManager.getConnection("jdbc:duckdb:");
        this.connection = c.unwrap(DuckDBConnection.class);
    }

    /** Drops and recreates the table, then appends every reading. */
    public void load(List<Reading> batch) throws SQLException {
        try (Statement s = connection.createStatement()) {
            s.execute("drop table if exists " + TABLE);
            s.execute("create table " + TABLE + " (device varchar not null, reading_no integer not null, "
                    + "seq bigint not null, recorded_at bigint not null, temp double not null, status varchar, "
                    + "w1 bigint not null, w2 bigint not null)");
        }
        try (DuckDBAppender a = connection.createAppender(DuckDBConnection.DEFAULT_SCHEMA, TABLE)) {
            for (Reading r : batch) {
                a.beginRow();
                a.append(r.device());
                a.append(r.readingNo());
                a.append(r.seq());
                a.append(r.recordedAt());
                a.append(r.temp());
                if (r.status() == null) {
                    a.appendNull();
                } else {
                    a.append(r.status());
                }
                a.append(r.counter("w1"));
                a.append(r.counter("w2"));
                a.endRow();
            }
        }
    }

    /** Rows in the table. */
    public long count() throws SQLException {
        try (Statement s = connection.createStatement(); ResultSet rs = s.executeQuery("select count(*) from " + TABLE)) {
            rs.next();
            return rs.getLong(1);
        }
    }

    static String query(MergeCase policy) {
        return switch (policy) {
            case LAST_WRITER -> "select " + COLUMNS + " from (select *, row_number() over (partition by device, reading_no"
                    + " order by seq desc) as rn from " + TABLE + ") where rn = 1" + ORDER;
            case VECTOR_CLOCK -> "select " + COLUMNS + " from (select *, row_number() over (partition by device, reading_no"
                    + " order by w1 + w2 desc) as rn from " + TABLE + " a where not exists (select 1 from " + TABLE
                    + " b where b.device = a.device and b.reading_no = a.reading_no and b.w1 >= a.w1 and b.w2 >= a.w2"
                    + " and (b.w1 > a.w1 or b.w2 > a.w2))) where rn = 1" + ORDER;
            case FIELD_WISE -> "select " + COLUMNS + " from (select device, reading_no, max(seq) as seq,"
                    + " arg_max(recorded_at, seq) as recorded_at, max(temp) as temp,"
                    + " arg_max(status, seq) filter (where status is not null) as status,"
                    + " arg_max(w1, seq) as w1, arg_max(w2, seq) as w2 from " + TABLE
                    + " group by device, reading_no)" + ORDER;
        };
    }

    /** Runs the policy's query over the loaded table and reads every output row, in order, into a reading. */
    public List<Reading> dedupe(MergeCase policy) throws SQLException {
        List<Reading> out = new ArrayList<>();
        try (Statement s = connection.createStatement(); ResultSet rs = s.executeQuery(query(policy))) {
            while (rs.next()) {
                out.add(new Reading(rs.getString(1), rs.getInt(2), rs.getLong(3), rs.getLong(4), rs.getDouble(5),
                        rs.getString(6), Map.of("w1", rs.getLong(7), "w2", rs.getLong(8))));
            }
        }
        return out;
    }

    @Override
    public void close() throws SQLException {
        connection.close();
    }
}
