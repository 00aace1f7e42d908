package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.ResultSet;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.Collections;
import java.util.HashSet;
import java.util.List;
import java.util.Random;
import java.util.Set;
import net.jqwik.api.ForAll;
import net.jqwik.api.Property;
import net.jqwik.api.constraints.IntRange;

/**
 * Oracle: last-writer deduplication and ordering must equal what an embedded SQL engine computes with a window
 * function. Reference engine: H2 Database Engine (com.h2database:h2 from Maven Central), query
 * {@code row_number() over (partition by key order by version desc) = 1}, then ordered by the spec's order.
 */
class SqlOracleTest {
    static final RowSchema SCHEMA = RowSchema.builder("reading")
            .field("container_id", FieldType.string())
            .field("reading_no", FieldType.int32())
            .field("seq", FieldType.int64())
            .field("recorded_at", FieldType.timestampMillis())
            .field("priority", FieldType.int32())
            .field("temp", FieldType.float64())
            .build();

    static final DatasetSpec SPEC = DatasetSpec.fromJson("""
            {"key": ["container_id", "reading_no"], "order": ["recorded_at", "-priority"],
             "merge": {"policy": "last-writer", "version": "seq"}}""", "oracle spec");

    @Property(tries = 60)
    void dedupe_lastWriterEqualsSqlWindowFunction(@ForAll long seed, @ForAll @IntRange(min = 1, max = 400) int n)
            throws SQLException {
        Random rnd = new Random(seed);
        List<Row> rows = new ArrayList<>();
        Set<String> keyVersions = new HashSet<>();
        while (rows.size() < n) {
            String c = "C" + rnd.nextInt(8);
            int no = rnd.nextInt(6);
            long seq = rnd.nextInt(20);
            // versions are unique per key here: SQL has no notion of our canonical content tie-break
            if (!keyVersions.add(c + "/" + no + "/" + seq)) {
                continue;
            }
            rows.add(Row.of(SCHEMA, c, no, seq, 1_709_164_800_000L + rnd.nextInt(5) * 60_000L, rnd.nextInt(3),
                    Math.round(rnd.nextGaussian() * 100) / 10.0));
        }
        List<Row> delivered = new ArrayList<>(rows);
        delivered.addAll(rows.subList(0, rows.size() / 3));
        Collections.shuffle(delivered, rnd);

        List<Row> ours = BatchEngine.forRows(SPEC, SCHEMA).dedupe(delivered).survivors();
        assertEquals(sql(delivered), ours);
    }

    private static List<Row> sql(List<Row> delivered) throws SQLException {
        try (Connection c = DriverManager.getConnection("jdbc:h2:mem:")) {
            try (Statement s = c.createStatement()) {
                s.execute("create table r (container_id varchar, reading_no int, seq bigint, recorded_at bigint, "
                        + "priority int, temp double)");
            }
            try (PreparedStatement p = c.prepareStatement("insert into r values (?, ?, ?, ?, ?, ?)")) {
                for (Row r : delivered) {
                    p.setString(1, (String) r.get("container_id"));
                    p.setInt(2, (Integer) r.get("reading_no"));
                    p.setLong(3, (Long) r.get("seq"));
                    p.setLong(4, (Long) r.get("recorded_at"));
                    p.setInt(5, (Integer) r.get("priority"));
                    p.setDouble(6, (Double) r.get("temp"));
                    p.addBatch();
                }
                p.executeBatch();
            }
            List<Row> out = new ArrayList<>();
            // binary collation of container_id matches onefold's UTF-8 byte order for these ASCII keys
            try (Statement s = c.createStatement();
                    ResultSet rs = s.executeQuery("select container_id, reading_no, seq, recorded_at, priority, temp from ("
                            + " select r.*, row_number() over (partition by container_id, reading_no order by seq desc) rn"
                            + " from r) where rn = 1 order by recorded_at, priority desc, container_id, reading_no")) {
                while (rs.next()) {
                    out.add(Row.of(SCHEMA, rs.getString(1), rs.getInt(2), rs.getLong(3), rs.getLong(4), rs.getInt(5),
                            rs.getDouble(6)));
                }
            }
            return out;
        }
    }
}
