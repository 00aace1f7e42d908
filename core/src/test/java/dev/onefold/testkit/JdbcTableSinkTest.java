package dev.onefold.testkit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.OnefoldException;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.SQLException;
import java.sql.Statement;
import java.time.Instant;
import java.time.LocalDate;
import java.util.List;
import java.util.UUID;
import java.util.concurrent.atomic.AtomicInteger;
import org.junit.jupiter.api.Test;

/** The JDBC helper against H2, a general-purpose reference database (type names from the H2 data-type docs, from memory). */
class JdbcTableSinkTest {
    private static final AtomicInteger DATABASES = new AtomicInteger();

    private static final RowSchema EVERY_KIND = RowSchema.builder("every_kind")
            .field("flag", FieldType.bool())
            .field("small", FieldType.int32())
            .field("big", FieldType.int64())
            .field("ratio", FieldType.float32())
            .field("measure", FieldType.float64())
            .field("label", FieldType.string().nullable())
            .field("payload", FieldType.bytes())
            .field("price", FieldType.decimal(10, 2))
            .field("on_day", FieldType.date())
            .field("seen_at", FieldType.timestampMillis())
            .field("seen_at_micros", FieldType.timestampMicros())
            .field("counted_at", FieldType.timestampMillis())
            .field("token", FieldType.uuid())
            .build();

    @Test
    void readRows_mapsEveryPlainKindByColumnNameIgnoringCase() throws SQLException {
        try (Connection c = connect(newDatabase())) {
            execute(c, "CREATE TABLE t (FLAG BOOLEAN, small INTEGER, big BIGINT, ratio REAL, measure DOUBLE PRECISION, "
                    + "label VARCHAR(20), payload VARBINARY(8), price NUMERIC(10, 2), on_day DATE, "
                    + "seen_at TIMESTAMP WITH TIME ZONE, seen_at_micros TIMESTAMP WITH TIME ZONE, counted_at BIGINT, token UUID)");
            execute(c, "INSERT INTO t VALUES (TRUE, 7, 9000000000, 1.5, 2.25, NULL, X'0102', 12.30, DATE '2024-02-29', "
                    + "TIMESTAMP WITH TIME ZONE '2024-02-29 13:45:10.123456+02:00', "
                    + "TIMESTAMP WITH TIME ZONE '2024-02-29 13:45:10.123456+02:00', 1709214310123, "
                    + "'123e4567-e89b-12d3-a456-426614174000')");
            // Expected instants come from java.time's ISO-8601 parser, independent of the driver's mapping.
            Instant seen = Instant.parse("2024-02-29T11:45:10.123456Z");
            Row expected = Row.of(EVERY_KIND, true, 7, 9_000_000_000L, 1.5f, 2.25, null, new byte[] {1, 2},
                    new BigDecimal("12.30"), (int) LocalDate.parse("2024-02-29").toEpochDay(), seen.toEpochMilli(),
                    seen.getEpochSecond() * 1_000_000L + seen.getNano() / 1000, 1709214310123L,
                    UUID.fromString("123e4567-e89b-12d3-a456-426614174000"));
            assertEquals(List.of(expected), JdbcTableSink.readRows(c, EVERY_KIND, "SELECT * FROM t"));
        }
    }

    @Test
    void readRows_fieldWithoutColumn_throwsUsageNamingIt() throws SQLException {
        try (Connection c = connect(newDatabase())) {
            execute(c, "CREATE TABLE t (id VARCHAR(10))");
            OnefoldException e = assertThrows(OnefoldException.class,
                    () -> JdbcTableSink.readRows(c, Items.SCHEMA, "SELECT * FROM t"));
            assertEquals(OnefoldException.Kind.USAGE, e.kind());
            assertTrue(e.getMessage().contains("'version'"), e.getMessage());
        }
    }

    @Test
    void open_listField_throwsUsage() {
        RowSchema withList = RowSchema.builder("x").field("tags", FieldType.list(FieldType.string())).build();
        OnefoldException e = assertThrows(OnefoldException.class,
                () -> JdbcTableSink.open(() -> connect(newDatabase()), withList, "SELECT 1", (c, d) -> { }));
        assertTrue(e.getMessage().contains("'tags'"), e.getMessage());
    }

    @Test
    void restart_rollsBackUncommittedWorkAndKeepsCommittedWork() throws Exception {
        String url = newDatabase();
        JdbcTableSink.Writer commitsOnlyKeyA = (c, d) -> {
            c.setAutoCommit(false);
            for (Row r : d.records()) {
                execute(c, "INSERT INTO item VALUES ('" + Items.id(r) + "', " + Items.version(r) + ", 0, NULL)");
                if (Items.id(r).equals("a")) {
                    c.commit();
                }
            }
        };
        JdbcTableSink sink = JdbcTableSink.open(() -> connect(url), Items.SCHEMA, "SELECT * FROM item", commitsOnlyKeyA);
        try {
            execute(sink.connection(), "CREATE TABLE item (id VARCHAR(10), version BIGINT, amount BIGINT, deleted BOOLEAN)");
            Row a = Row.of(Items.SCHEMA, "a", 1L, 0L, null);
            Row b = Row.of(Items.SCHEMA, "b", 2L, 0L, null);
            sink.apply(new Step.Delivery<>(List.of(new LogEntry<>(0, 0, a), new LogEntry<>(0, 1, b))));
            assertEquals(2, sink.readState().size(), "the writer's own connection sees its uncommitted row");
            sink.restart();
            assertEquals(List.of(a), sink.readState());
        } finally {
            sink.close();
        }
    }

    // ---- helpers

    private static String newDatabase() {
        return "jdbc:h2:mem:kit" + DATABASES.incrementAndGet();
    }

    private static Connection connect(String url) throws SQLException {
        return DriverManager.getConnection(url);
    }

    private static void execute(Connection c, String sql) throws SQLException {
        try (Statement st = c.createStatement()) {
            st.execute(sql);
        }
    }
}
