package dev.onefold.examples.batchjob;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.OnefoldException;
import dev.onefold.avro.ContainerFiles;
import dev.onefold.examples.cli.Deliveries;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.PreparedStatement;
import java.sql.SQLException;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The batch job against a second store that computes the same result its own way: the day's deliveries are
 * loaded into an H2 table and reduced with a SQL window function (ROW_NUMBER() OVER (PARTITION BY key ORDER BY
 * version DESC), the SQL:2003 way to keep the latest row per key, as core's SqlOracleTest does).
 */
class DailyArchiveJobTest {
    private static final String DAY = "2030-03-17";

    @TempDir
    Path dir;
    private Connection db;
    private String url;
    private DailyArchiveJob.Settings settings;

    @BeforeEach
    void setUp() throws Exception {
        url = "jdbc:h2:mem:job" + System.nanoTime() + ";DB_CLOSE_DELAY=-1";
        db = DriverManager.getConnection(url);
        Path schema = Deliveries.writeText(dir.resolve("event.avsc"), Deliveries.SCHEMA_TEXT);
        Files.createDirectories(dir.resolve("inbox").resolve(DAY));
        settings = new DailyArchiveJob.Settings(schema, dir.resolve("inbox"), DAY, dir.resolve("archive"), url, "events");
    }

    @AfterEach
    void tearDown() throws SQLException {
        db.close();
    }

    /** Writes the day's deliveries as three container files and loads the reduced table the SQL way. */
    private List<GenericRecord> deliverDay(long seed) throws SQLException {
        List<GenericRecord> all = Deliveries.generate(seed, 0, 900);
        int third = all.size() / 3;
        for (int i = 0; i < 3; i++) {
            Deliveries.writeAvro(dir.resolve("inbox").resolve(DAY).resolve("part-" + i + ".avro"),
                    all.subList(i * third, i == 2 ? all.size() : (i + 1) * third), ContainerFiles.Compression.SNAPPY);
        }
        try (Statement s = db.createStatement()) {
            s.execute("CREATE TABLE deliveries (id VARCHAR, n INT, ver BIGINT, at BIGINT, \"value\" DOUBLE, deleted BOOLEAN)");
            try (PreparedStatement p = db.prepareStatement("INSERT INTO deliveries VALUES (?, ?, ?, ?, ?, ?)")) {
                for (GenericRecord r : all) {
                    p.setString(1, r.get("id").toString());
                    p.setInt(2, (int) r.get("n"));
                    p.setLong(3, (long) r.get("ver"));
                    p.setLong(4, (long) r.get("at"));
                    p.setDouble(5, (double) r.get("value"));
                    p.setBoolean(6, (boolean) r.get("deleted"));
                    p.addBatch();
                }
                p.executeBatch();
            }
            s.execute("CREATE TABLE events AS SELECT id, n, ver, at, \"value\", deleted FROM (SELECT d.*, ROW_NUMBER() "
                    + "OVER (PARTITION BY id, n ORDER BY ver DESC) AS rn FROM deliveries d) WHERE rn = 1 AND NOT deleted");
        }
        return all;
    }

    private int runJob(StringBuilder printed) {
        ByteArrayOutputStream bytes = new ByteArrayOutputStream();
        int status = DailyArchiveJob.run(settings, new PrintStream(bytes, true, StandardCharsets.UTF_8));
        printed.append(bytes.toString(StandardCharsets.UTF_8));
        return status;
    }

    @Test
    void run_archiveAgreesWithTheSqlReducedTable_andAgainAfterARerun() throws SQLException {
        List<GenericRecord> all = deliverDay(11);
        StringBuilder first = new StringBuilder();
        assertEquals(0, runJob(first), first::toString);
        assertTrue(first.toString().contains("records: " + String.format("%,d", all.size()) + " in"), first::toString);
        assertTrue(first.toString().contains("agree"), first::toString);

        StringBuilder rerun = new StringBuilder();
        assertEquals(0, runJob(rerun), rerun::toString);
        assertTrue(rerun.toString().contains("nothing changed"), "running the same day again changes nothing: " + rerun);
    }

    @Test
    void run_tableMissedAnUpdate_exitsOneNamingTheKey() throws SQLException {
        deliverDay(12);
        List<Object> key = new ArrayList<>();
        try (Statement s = db.createStatement()) {
            var rs = s.executeQuery("SELECT id, n FROM events ORDER BY id, n LIMIT 1 OFFSET 40");
            rs.next();
            key.add(rs.getString(1));
            key.add(rs.getInt(2));
            s.execute("UPDATE events SET \"value\" = \"value\" - 1 WHERE id = '" + key.get(0) + "' AND n = " + key.get(1));
        }
        StringBuilder printed = new StringBuilder();
        assertEquals(1, runJob(printed), printed::toString);
        assertTrue(printed.toString().contains("{\"id\":\"" + key.get(0) + "\",\"n\":" + key.get(1) + "}"), printed::toString);
    }

    @Test
    void run_dayWithoutFiles_failsNamingTheDirectory() {
        OnefoldException e = assertThrows(OnefoldException.class, () -> runJob(new StringBuilder()));
        assertTrue(e.getMessage().contains(DAY) && e.getMessage().contains("no .avro files"), e.getMessage());
    }
}
