package dev.onefold.reconcile;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.Rejection;
import dev.onefold.reconcile.ReconciliationReport.KeyDifference;
import dev.onefold.reconcile.ReconciliationReport.PartitionResult;
import dev.onefold.reconcile.ReconciliationReport.Verdict;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Random;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;

/**
 * A table in an embedded SQL engine (H2 Database Engine, com.h2database:h2 from Maven Central) loaded with the
 * same records as a delivery stream agrees with the stream's digests; changing, duplicating or spoiling one row
 * is detected and named.
 */
class JdbcDigestsTest {
    static final RowSchema SCHEMA = RowSchema.builder("reading")
            .field("container_id", FieldType.string())
            .field("reading_no", FieldType.int32())
            .field("seq", FieldType.int64())
            .field("day", FieldType.string())
            .field("amount", FieldType.decimal(12, 2))
            .build();

    static final DatasetSpec SPEC = DatasetSpec.fromJson("""
            {"key": ["container_id", "reading_no"], "partition": {"fields": ["day"]},
             "merge": {"policy": "last-writer", "version": "seq"},
             "checks": [{"aggregate": "sum", "field": "amount"}, {"aggregate": "max", "field": "seq"}]}""", "jdbc spec");

    private static final String QUERY = "select container_id, reading_no, seq, day_, amount from readings";

    private Connection db;
    private List<Row> deliveries;
    private List<Row> latest;

    @BeforeEach
    void load() throws SQLException {
        Random random = new Random(6);
        deliveries = new ArrayList<>();
        latest = new ArrayList<>();
        for (int c = 0; c < 30; c++) {
            for (int n = 0; n < 10; n++) {
                String day = "2024-03-0" + (1 + (c + n) % 4);
                Row last = null;
                for (long seq = 1; seq <= 1 + random.nextInt(3); seq++) {
                    last = Row.of(SCHEMA, "C" + c, n, seq, day, BigDecimal.valueOf(random.nextInt(100_000), 2));
                    deliveries.add(last);
                    if (random.nextInt(4) == 0) {
                        deliveries.add(last);
                    }
                }
                latest.add(last);
            }
        }
        Collections.shuffle(deliveries, random);
        db = DriverManager.getConnection("jdbc:h2:mem:");
        try (Statement s = db.createStatement()) {
            s.execute("create table readings (container_id varchar not null, reading_no int not null, seq bigint not null, "
                    + "day_ varchar, amount decimal(12, 2) not null)");
        }
        try (PreparedStatement p = db.prepareStatement("insert into readings values (?, ?, ?, ?, ?)")) {
            for (Row r : latest) {
                p.setString(1, (String) r.get("container_id"));
                p.setInt(2, (Integer) r.get("reading_no"));
                p.setLong(3, (Long) r.get("seq"));
                p.setString(4, (String) r.get("day"));
                p.setBigDecimal(5, (BigDecimal) r.get("amount"));
                p.addBatch();
            }
            p.executeBatch();
        }
    }

    @AfterEach
    void close() throws SQLException {
        db.close();
    }

    private RecordDigests<?> table() {
        return JdbcDigests.query("h2 readings", SPEC, SCHEMA, db, QUERY, rs -> {
            String day = rs.getString(4);
            if (day == null) {
                throw OnefoldException.record("day_ is null");
            }
            return Row.of(SCHEMA, rs.getString(1), rs.getInt(2), rs.getLong(3), day, rs.getBigDecimal(5));
        }, RecordDigests.Mode.STORE).build();
    }

    private RecordDigests<Row> log() {
        return RecordDigests.ofRows("log", SPEC, SCHEMA, deliveries::stream, RecordDigests.Mode.DELIVERIES).build();
    }

    @Test
    void compare_tableLoadedWithTheSameRecordsAgrees() throws SQLException {
        DigestSourceContract.verify(table(), SCHEMA);
        ReconciliationReport report = Reconciliation.defaults().compare(log(), table());
        assertEquals("agree", report.status(), report.summary());
        assertEquals(4, report.partitions().size());
        assertEquals(300, report.rightTotal().keys());
        // the sum check against the SQL engine's own sum of the table
        try (Statement s = db.createStatement(); var rs = s.executeQuery("select sum(amount), max(seq) from readings")) {
            rs.next();
            assertEquals(0, rs.getBigDecimal(1).compareTo(report.leftTotal().aggregates().get(0)));
            assertEquals(0, BigDecimal.valueOf(rs.getLong(2)).compareTo(report.leftTotal().aggregates().get(1)));
        }
    }

    @Test
    void compare_oneChangedRowIsNamedWithBothVersions() throws SQLException {
        try (Statement s = db.createStatement()) {
            assertEquals(1, s.executeUpdate("update readings set amount = amount + 1 where container_id = 'C7' and reading_no = 3"));
        }
        ReconciliationReport report = Reconciliation.defaults().compare(log(), table());
        assertEquals("disagree", report.status());
        List<PartitionResult> differing = report.partitions().stream().filter(p -> p.verdict() != Verdict.AGREE).toList();
        assertEquals(1, differing.size(), report.summary());
        assertEquals(Verdict.CONTENT_DIFFERS, differing.get(0).verdict());
        assertEquals("sketch", differing.get(0).drillDown().method());
        List<KeyDifference> keys = differing.get(0).drillDown().contentDiffers();
        assertEquals(1, keys.size());
        assertEquals(Map.of("container_id", "C7", "reading_no", 3), keys.get(0).key());
        Row before = latest.stream().filter(r -> r.get("container_id").equals("C7") && r.get("reading_no").equals(3))
                .findFirst().orElseThrow();
        assertEquals(List.of(before), keys.get(0).left());
        assertEquals(List.of(before.with("amount", ((BigDecimal) before.get("amount")).add(BigDecimal.ONE))),
                keys.get(0).right());
        assertTrue(report.summary().contains("\"container_id\":\"C7\""), report.summary());
    }

    @Test
    void compare_duplicatedRowInTheTableIsAStoreDifference() throws SQLException {
        try (Statement s = db.createStatement()) {
            s.execute("insert into readings select * from readings where container_id = 'C2' and reading_no = 5");
        }
        ReconciliationReport report = Reconciliation.defaults().compare(log(), table());
        PartitionResult p = report.partitions().stream().filter(x -> x.verdict() != Verdict.AGREE).findFirst().orElseThrow();
        assertEquals(Verdict.COUNT_DIFFERS, p.verdict());
        assertEquals(p.left().keys(), p.right().keys());
        assertEquals(p.left().records() + 1, p.right().records());
        KeyDifference k = p.drillDown().contentDiffers().get(0);
        assertEquals(Map.of("container_id", "C2", "reading_no", 5), k.key());
        assertEquals(1, k.left().size());
        assertEquals(List.of(k.left().get(0), k.left().get(0)), k.right());
    }

    @Test
    void build_rowTheMapperRefusesIsKeptAsARejection() throws SQLException {
        try (Statement s = db.createStatement()) {
            s.execute("insert into readings values ('C99', 1, 1, null, 1.00)");
        }
        RecordDigests<?> table = table();
        assertEquals(301, table.records());
        assertEquals(300, table.accepted());
        Rejection r = table.rejections().get(0);
        assertEquals("h2 readings", r.source());
        assertTrue(r.reason().contains("day_ is null") && r.reason().contains(QUERY), r.reason());
        assertTrue(String.valueOf(r.record()).contains("C99"), String.valueOf(r.record()));
        ReconciliationReport report = Reconciliation.defaults().compare(log(), table);
        assertEquals("agree", report.status());
        assertEquals(1, report.rightRejected());
    }

    @Test
    void build_failingQueryNamesIt() {
        OnefoldException e = org.junit.jupiter.api.Assertions.assertThrows(OnefoldException.class,
                () -> JdbcDigests.query("h2", SPEC, SCHEMA, db, "select * from no_such_table", rs -> null,
                        RecordDigests.Mode.STORE).build());
        assertEquals(OnefoldException.Kind.IO, e.kind());
        assertTrue(e.getMessage().contains("no_such_table"), e.getMessage());
    }
}
