package dev.onefold.examples.batchjob;

import dev.onefold.OnefoldException;
import dev.onefold.avro.AvroDataset;
import dev.onefold.avro.AvroRecordAccess;
import dev.onefold.examples.cli.ApplyCommand;
import dev.onefold.examples.cli.ArchiveDirectory;
import dev.onefold.examples.cli.ReconcileCommand;
import dev.onefold.examples.cli.RunReport;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.reconcile.JdbcDigests;
import dev.onefold.reconcile.RecordDigests;
import dev.onefold.reconcile.Reconciliation;
import dev.onefold.reconcile.ReconciliationReport;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.SQLException;
import java.util.List;
import java.util.stream.Stream;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/**
 * A nightly batch job to copy and adapt: it takes one day's Avro container files from an inbox directory
 * ({@code INBOX/2031-05-04/*.avro}, as a log-to-file connector drops them), applies them as one batch to an
 * archive, prints what the apply did, then reconciles the archive with a second store, here a database table
 * that another pipeline keeps, and exits with status 1 when the two disagree (so the scheduler flags the run and
 * the report names the keys to look at), 2 when the job could not run, 0 when all is well.
 *
 * <pre>
 * java -cp onefold.jar dev.onefold.examples.batchjob.DailyArchiveJob \
 *     SCHEMA.avsc INBOX DAY ARCHIVE_DIR JDBC_URL TABLE
 * </pre>
 *
 * <p>Running it again for the same day is safe: applying the same records again changes nothing. The archive is
 * kept the way the {@code onefold} tool keeps archives ({@link ArchiveDirectory}), so {@code onefold verify} and
 * {@code onefold export} work on it too. The table must have one column per schema field, named like the field,
 * holding the plain Avro value (timestamps as epoch numbers); adapt {@link #rowOf} for other layouts.
 *
 * <p>Not thread-safe; one run per archive at a time is the usual schedule (concurrent runs are safe, they retry).
 */
public final class DailyArchiveJob {
    private DailyArchiveJob() {}

    /** Where the job reads, writes and compares. */
    public record Settings(Path schema, Path inbox, String day, Path archive, String jdbcUrl, String table) {}

    public static void main(String[] args) {
        if (args.length != 6) {
            System.err.println("usage: DailyArchiveJob SCHEMA.avsc INBOX DAY ARCHIVE_DIR JDBC_URL TABLE");
            System.exit(2);
        }
        Settings s = new Settings(Path.of(args[0]), Path.of(args[1]), args[2], Path.of(args[3]), args[4], args[5]);
        int status;
        try {
            status = run(s, System.out);
        } catch (OnefoldException e) {
            System.err.println("daily job " + s.day() + ": " + e.getMessage());
            status = 2;
        }
        System.exit(status);
    }

    /**
     * Runs the job once.
     *
     * @return 0 when the archive and the table agree after the apply, 1 when they do not
     * @throws OnefoldException when a file, the archive or the database cannot be read or written
     */
    public static int run(Settings s, PrintStream out) {
        AvroDataset dataset = AvroDataset.read(s.schema(), null);
        List<Path> files = dayFiles(s.inbox().resolve(s.day()));
        ArchiveDirectory archive = ArchiveDirectory.forApply(s.archive(), dataset);

        RunReport applied = ApplyCommand.apply(archive, dataset, files, s.archive().resolve("rejects-" + s.day() + ".jsonl"));
        out.printf("day %s: applied %d file(s) to %s%n", s.day(), files.size(), s.archive());
        applied.print(out, "  ");

        try (Connection db = DriverManager.getConnection(s.jdbcUrl())) {
            // repeatable reads: the query runs again for the drill-down and must see the same rows
            db.setTransactionIsolation(Connection.TRANSACTION_REPEATABLE_READ);
            db.setAutoCommit(false);
            AvroRecordAccess access = dataset.access();
            DigestSource table = JdbcDigests.query("table " + s.table(), dataset.spec(), access.schema(), db,
                    "SELECT * FROM " + s.table(), rs -> access.toRow(rowOf(rs, dataset.schema())),
                    RecordDigests.Mode.STORE).build();
            ReconciliationReport r = Reconciliation.defaults().compare(ReconcileCommand.archiveSource(archive), table);
            db.commit();
            out.print(r.summary());
            return r.agrees() ? 0 : 1;
        } catch (SQLException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "database " + s.jdbcUrl() + ": " + e.getMessage(), e);
        }
    }

    /** The day's container files, in name order; a day without files is an error (the upstream export failed). */
    static List<Path> dayFiles(Path dayDir) {
        try (Stream<Path> s = Files.list(dayDir)) {
            List<Path> files = s.filter(p -> p.getFileName().toString().endsWith(".avro")).sorted().toList();
            if (files.isEmpty()) {
                throw OnefoldException.usage(dayDir + ": no .avro files for this day");
            }
            return files;
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, dayDir + ": cannot list the day's files: " + e.getMessage(), e);
        }
    }

    /** One table row as a record of the schema: each field from the column of the same name. */
    static GenericRecord rowOf(java.sql.ResultSet rs, Schema schema) throws SQLException {
        GenericRecord r = new GenericData.Record(schema);
        for (Schema.Field f : schema.getFields()) {
            r.put(f.pos(), rs.getObject(f.name()));
        }
        return r;
    }
}
