package dev.onefold.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.sql.Connection;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.ResultSetMetaData;
import java.sql.SQLException;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.NoSuchElementException;
import java.util.Objects;
import java.util.Spliterator;
import java.util.Spliterators;
import java.util.stream.Stream;
import java.util.stream.StreamSupport;

/**
 * Digests of what a SQL query returns, for reconciling a database table against an archive or another store.
 * Each result row is turned into a {@link Row} by a user-supplied {@link RowMapper}; a row the mapper refuses
 * (it throws {@link OnefoldException} of kind INVALID_RECORD) becomes a rejection that keeps the row's column
 * values, its position being the 0-based result row number.
 *
 * <p>The query runs once to compute the digests and once more per drill-down, so it must return the same rows
 * each time: run it in a transaction with snapshot or repeatable-read isolation, or against a table nothing
 * writes to meanwhile. The connection stays the caller's; it is never closed here. Use {@link RecordDigests.Mode#STORE}
 * for a table that holds one visible record per key (duplicate rows then show as differences) and
 * {@link RecordDigests.Mode#DELIVERIES} for a table of raw deliveries.
 *
 * <p>Stateless and thread-safe; cost as {@link RecordDigests} plus the query.
 */
public final class JdbcDigests {
    private JdbcDigests() {}

    /** Maps the result set's current row to a Row; must not move the cursor. */
    @FunctionalInterface
    public interface RowMapper {
        Row map(ResultSet current) throws SQLException;
    }

    /**
     * A source over a query's rows; call {@code build()} on the result (after any settings) to read them.
     *
     * @throws OnefoldException (IO) from {@code build()} when the query fails, naming it
     */
    public static RecordDigests.Builder<?> query(String name, DatasetSpec spec, RowSchema schema, Connection connection,
            String sql, RowMapper mapper, RecordDigests.Mode mode) {
        Objects.requireNonNull(connection, "connection");
        Objects.requireNonNull(sql, "sql");
        Objects.requireNonNull(mapper, "mapper");
        return RecordDigests.builder(name, spec, new ResultAccess(schema, sql), () -> open(connection, sql, mapper), mode);
    }

    /** One result row: its number and either its Row or why the mapper refused it, with its column values. */
    private record ResultRow(long number, Row row, OnefoldException refusal, Map<String, Object> columns) {}

    private static final class ResultAccess implements RecordAccess<ResultRow> {
        private final RecordAccess<Row> rows;
        private final String sql;

        ResultAccess(RowSchema schema, String sql) {
            this.rows = RecordAccess.rows(schema);
            this.sql = sql;
        }

        @Override
        public RowSchema schema() {
            return rows.schema();
        }

        @Override
        public Row toRow(ResultRow record) {
            if (record.refusal() != null) {
                throw OnefoldException.record("result row " + record.number() + " of query [" + sql + "]: "
                        + record.refusal().getMessage());
            }
            return rows.toRow(record.row());
        }

        @Override
        public ResultRow fromRow(Row row) {
            return new ResultRow(-1, row, null, null);
        }
    }

    private static Stream<ResultRow> open(Connection connection, String sql, RowMapper mapper) {
        PreparedStatement statement = null;
        try {
            statement = connection.prepareStatement(sql, ResultSet.TYPE_FORWARD_ONLY, ResultSet.CONCUR_READ_ONLY);
            statement.setFetchSize(1000);
            ResultSet rs = statement.executeQuery();
            PreparedStatement owned = statement;
            Iterator<ResultRow> it = new ResultIterator(rs, sql, mapper);
            return StreamSupport.stream(Spliterators.spliteratorUnknownSize(it, Spliterator.ORDERED | Spliterator.NONNULL), false)
                    .onClose(() -> {
                        try {
                            owned.close(); // also closes its result set
                        } catch (SQLException e) {
                            throw io("cannot close query [" + sql + "]", e);
                        }
                    });
        } catch (SQLException e) {
            OnefoldException failure = io("query [" + sql + "] failed", e);
            if (statement != null) {
                try {
                    statement.close();
                } catch (SQLException closing) {
                    failure.addSuppressed(closing);
                }
            }
            throw failure;
        }
    }

    private static OnefoldException io(String what, SQLException e) {
        return new OnefoldException(OnefoldException.Kind.IO, what + ": " + e.getMessage(), e);
    }

    private static final class ResultIterator implements Iterator<ResultRow> {
        private final ResultSet rs;
        private final String sql;
        private final RowMapper mapper;
        private long number;
        private Boolean ready;

        ResultIterator(ResultSet rs, String sql, RowMapper mapper) {
            this.rs = rs;
            this.sql = sql;
            this.mapper = mapper;
        }

        @Override
        public boolean hasNext() {
            if (ready == null) {
                try {
                    ready = rs.next();
                } catch (SQLException e) {
                    throw io("reading result row " + number + " of query [" + sql + "]", e);
                }
            }
            return ready;
        }

        @Override
        public ResultRow next() {
            if (!hasNext()) {
                throw new NoSuchElementException();
            }
            ready = null;
            long at = number++;
            try {
                try {
                    return new ResultRow(at, mapper.map(rs), null, null);
                } catch (OnefoldException e) {
                    if (e.kind() != OnefoldException.Kind.INVALID_RECORD) {
                        throw e;
                    }
                    return new ResultRow(at, null, e, columns(rs));
                }
            } catch (SQLException e) {
                throw io("mapping result row " + at + " of query [" + sql + "]", e);
            }
        }

        private static Map<String, Object> columns(ResultSet rs) throws SQLException {
            ResultSetMetaData meta = rs.getMetaData();
            Map<String, Object> out = new LinkedHashMap<>();
            for (int i = 1; i <= meta.getColumnCount(); i++) {
                out.put(meta.getColumnLabel(i), rs.getObject(i));
            }
            return out;
        }
    }
}
