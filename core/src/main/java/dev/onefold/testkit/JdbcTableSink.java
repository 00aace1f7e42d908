package dev.onefold.testkit;

import dev.onefold.OnefoldException;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.sql.Connection;
import java.sql.ResultSet;
import java.sql.ResultSetMetaData;
import java.sql.SQLException;
import java.sql.Statement;
import java.sql.Types;
import java.time.LocalDate;
import java.time.OffsetDateTime;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Objects;
import java.util.UUID;

/**
 * A ready {@link Sink} for a team's JDBC writer: the team supplies how to connect, its writer (the code under
 * test, which gets the connection and one delivery) and the query that reads the visible state back; this class
 * turns result rows into {@link Row}s of the dataset's schema and simulates crashes. Uses only
 * {@code java.sql}, so any driver works.
 *
 * <p>A restart opens a new connection first, then rolls back whatever the old one had not committed and closes
 * it: uncommitted work is lost as in a real crash, while an in-memory database that vanishes with its last
 * connection survives. Result columns map to schema fields by name, ignoring case; each field must have a column.
 * Supported field kinds: boolean, int, long, float, double, string, bytes, decimal, uuid, date (a DATE column),
 * and timestamps (a numeric column of epoch units or a TIMESTAMP WITH TIME ZONE column).
 *
 * <p>Not thread-safe, like the {@link Sink} contract allows. Reading the state costs one query.
 */
public final class JdbcTableSink implements Sink<Row> {

    /** Opens a connection to the store under test; called at open and on every restart. */
    @FunctionalInterface
    public interface Connector {
        Connection connect() throws SQLException;
    }

    /** The team's code under test: writes one delivery through the connection (and commits, if it should). */
    @FunctionalInterface
    public interface Writer {
        void write(Connection connection, Step.Delivery<Row> delivery) throws SQLException;
    }

    private final Connector connector;
    private final RowSchema schema;
    private final String stateQuery;
    private final Writer writer;
    private Connection connection;

    private JdbcTableSink(Connector connector, RowSchema schema, String stateQuery, Writer writer, Connection connection) {
        this.connector = connector;
        this.schema = schema;
        this.stateQuery = stateQuery;
        this.writer = writer;
        this.connection = connection;
    }

    /**
     * Connects and returns the sink; the table must already exist (create it in the {@link SinkFactory}).
     *
     * @param stateQuery selects the visible records, one result row per record, for example
     *                   {@code SELECT * FROM parcel WHERE deleted IS NOT TRUE}
     * @throws OnefoldException (USAGE) when the schema has a field kind this helper cannot read
     */
    public static JdbcTableSink open(Connector connector, RowSchema schema, String stateQuery, Writer writer)
            throws SQLException {
        Objects.requireNonNull(stateQuery, "stateQuery");
        Objects.requireNonNull(writer, "writer");
        requirePlainColumns(schema);
        return new JdbcTableSink(connector, schema, stateQuery, writer, connector.connect());
    }

    /** The connection in use now (it changes on restart); for setup and for assertions in tests. */
    public Connection connection() {
        return connection;
    }

    @Override
    public void apply(Step.Delivery<Row> delivery) throws SQLException {
        writer.write(connection, delivery);
    }

    @Override
    public List<Row> readState() throws SQLException {
        return readRows(connection, schema, stateQuery);
    }

    @Override
    public void restart() throws SQLException {
        Connection fresh = connector.connect();
        Connection crashed = connection;
        connection = fresh;
        try (crashed) {
            if (!crashed.getAutoCommit()) {
                crashed.rollback();
            }
        }
    }

    @Override
    public void close() throws SQLException {
        connection.close();
    }

    /**
     * Runs a query and reads each result row as a {@link Row} of the schema, matching columns to fields by name.
     *
     * @throws OnefoldException (USAGE) when a field has no column or is a list, map or record; (INVALID_RECORD) when a value does not fit
     *     its field, naming the field
     */
    public static List<Row> readRows(Connection connection, RowSchema schema, String query) throws SQLException {
        requirePlainColumns(schema);
        try (Statement st = connection.createStatement(); ResultSet rs = st.executeQuery(query)) {
            ResultSetMetaData meta = rs.getMetaData();
            Map<String, Integer> columns = new HashMap<>();
            for (int c = 1; c <= meta.getColumnCount(); c++) {
                columns.put(meta.getColumnLabel(c).toLowerCase(Locale.ROOT), c);
            }
            int[] columnOf = new int[schema.size()];
            for (int i = 0; i < schema.size(); i++) {
                Integer c = columns.get(schema.field(i).name().toLowerCase(Locale.ROOT));
                if (c == null) {
                    throw OnefoldException.usage("JDBC sink: the state query has no column for field '"
                            + schema.field(i).name() + "' (columns: " + columns.keySet() + "): " + query);
                }
                columnOf[i] = c;
            }
            List<Row> out = new ArrayList<>();
            Object[] values = new Object[schema.size()];
            while (rs.next()) {
                for (int i = 0; i < values.length; i++) {
                    values[i] = read(rs, columnOf[i], meta.getColumnType(columnOf[i]), schema.field(i).type());
                }
                out.add(Row.of(schema, values));
            }
            return out;
        }
    }

    private static void requirePlainColumns(RowSchema schema) {
        for (RowSchema.Field f : schema.fields()) {
            FieldType.Kind k = f.type().kind();
            if (k == FieldType.Kind.LIST || k == FieldType.Kind.MAP || k == FieldType.Kind.RECORD) {
                throw OnefoldException.usage("JDBC sink: field '" + f.name() + "' of " + schema.name() + " is " + f.type()
                        + ", which has no plain column type; read such state with your own Sink");
            }
        }
    }

    private static Object read(ResultSet rs, int column, int sqlType, FieldType type) throws SQLException {
        Object value = switch (type.kind()) {
            case BOOLEAN -> rs.getBoolean(column);
            case INT -> rs.getInt(column);
            case LONG -> rs.getLong(column);
            case FLOAT -> rs.getFloat(column);
            case DOUBLE -> rs.getDouble(column);
            case STRING -> rs.getString(column);
            case BYTES -> rs.getBytes(column);
            case DECIMAL -> rs.getBigDecimal(column);
            case UUID -> readUuid(rs.getObject(column));
            case DATE -> {
                LocalDate d = rs.getObject(column, LocalDate.class);
                yield d == null ? null : Math.toIntExact(d.toEpochDay());
            }
            case TIMESTAMP_MILLIS, TIMESTAMP_MICROS -> {
                if (sqlType != Types.TIMESTAMP_WITH_TIMEZONE) {
                    yield rs.getLong(column);
                }
                OffsetDateTime t = rs.getObject(column, OffsetDateTime.class);
                yield t == null ? null : type.kind() == FieldType.Kind.TIMESTAMP_MILLIS ? t.toInstant().toEpochMilli()
                        : Math.addExact(Math.multiplyExact(t.toEpochSecond(), 1_000_000L), t.getNano() / 1000);
            }
            case LIST, MAP, RECORD -> throw new AssertionError("refused by requirePlainColumns: " + type);
        };
        return rs.wasNull() ? null : value;
    }

    private static UUID readUuid(Object value) {
        return value == null || value instanceof UUID ? (UUID) value : UUID.fromString(value.toString());
    }
}
