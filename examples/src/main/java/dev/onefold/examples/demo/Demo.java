package dev.onefold.examples.demo;

import dev.onefold.OnefoldException;
import dev.onefold.archive.VerifyReport;
import dev.onefold.avro.AvroDataset;
import dev.onefold.avro.ContainerFiles;
import dev.onefold.avro.JsonLines;
import dev.onefold.examples.cli.ApplyCommand;
import dev.onefold.examples.cli.ArchiveDirectory;
import dev.onefold.examples.cli.OnefoldTool;
import dev.onefold.examples.cli.ReconcileCommand;
import dev.onefold.examples.cli.RunReport;
import dev.onefold.reconcile.RecordDigests;
import dev.onefold.reconcile.Reconciliation;
import dev.onefold.reconcile.ReconciliationReport;
import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.stream.Stream;
import org.apache.avro.Schema;
import org.apache.avro.SchemaFormatter;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/**
 * The README's main-job demo ({@code java -jar onefold.jar demo [--dir DIR]}): the whole job on generated data,
 * in a directory the user can look at afterwards. It writes the scenario's inputs as files ({@code .jsonl},
 * {@code .avro}, the {@code .avsc} schemas and a spec file, see {@link ReeferFleet}), applies them batch by batch
 * to three archives (one per merge policy) and says after each step what happened, verifies the archives,
 * reconciles each against a copy worked out independently ({@link ExpectedState}), shows a reconciliation
 * catching a store that missed an update, exports the readings, and ends with the files to open and the
 * commands to try.
 *
 * <p>It checks its own results (rejections equal the broken lines it wrote, a replay changes nothing, a late
 * batch rewrites only the partitions it touches, verification passes, every archive agrees with its expected
 * copy, the stale copy disagrees on exactly the key it missed) and {@link #run} returns false, the command exit
 * status 1, when any check fails. Runs in a few seconds. Not thread-safe: one run per directory at a time.
 */
public final class Demo {
    private static final String MARKER = ".onefold-demo";
    private static final List<String> OWNED = List.of("inputs", "archive", "rejects", "reports", "expected", "export",
            "readings.avsc", "status.avsc", "status.spec.json", "summaries.avsc");

    private final Path dir;
    private final PrintStream out;
    private final List<String> failures = new ArrayList<>();
    private int step;

    private Demo(Path dir, PrintStream out) {
        this.dir = dir;
        this.out = out;
    }

    public static void main(String[] args) {
        boolean ok = run(Path.of(args.length > 0 ? args[0] : "onefold-demo"), System.out);
        System.exit(ok ? 0 : 1);
    }

    /**
     * Runs the demo in {@code dir} (created if needed; the files of an earlier demo run there are replaced).
     *
     * @return whether every check passed
     * @throws OnefoldException (USAGE) when {@code dir} holds files that are not from an earlier demo run
     */
    public static boolean run(Path dir, PrintStream out) {
        return new Demo(dir, out).run();
    }

    private boolean run() {
        long started = System.nanoTime();
        prepare();
        ReeferFleet fleet = new ReeferFleet();
        out.println("onefold demo: the Kittiwake Line's refrigerated containers (a fictional fleet), in " + dir);
        out.printf("  %d containers report every 15 minutes for %d days through gateways %s;%n", ReeferFleet.CONTAINERS,
                ReeferFleet.DAYS, String.join(", ", ReeferFleet.GATEWAYS));
        out.printf("  offices %s edit their status; gateways send daily summaries.%n%n", String.join(" and ",
                ReeferFleet.OFFICES));

        Path readingsSchema = writeText("readings.avsc", SchemaFormatter.format("json/pretty", ReeferFleet.READING));
        Path statusSchema = writeText("status.avsc", SchemaFormatter.format("json/pretty", ReeferFleet.STATUS));
        Path statusSpec = writeText("status.spec.json", ReeferFleet.STATUS_SPEC);
        Path summariesSchema = writeText("summaries.avsc", SchemaFormatter.format("json/pretty", ReeferFleet.SUMMARY));

        out.println("== readings: last writer wins by seq, partitioned by day, retracted readings are tombstones");
        AvroDataset readings = AvroDataset.read(readingsSchema, null);
        ArchiveDirectory readingsArchive = applyAll("readings", readings, readingsSchema, null, fleet.readings);
        finish("readings", readings, readingsSchema, null, readingsArchive, ExpectedState.readings(fleet.readings));
        staleCopy(readings, readingsSchema, readingsArchive, fleet);

        out.println("== statuses: vector clocks; edits made at both offices at once are kept side by side");
        AvroDataset statuses = AvroDataset.read(statusSchema, statusSpec);
        ArchiveDirectory statusArchive = applyAll("status", statuses, statusSchema, statusSpec, fleet.statuses);
        finish("status", statuses, statusSchema, statusSpec, statusArchive, ExpectedState.statuses(fleet.statuses));

        out.println("== daily summaries: merged field by field (max, min, union of alarms, latest note)");
        AvroDataset summaries = AvroDataset.read(summariesSchema, null);
        ArchiveDirectory summaryArchive = applyAll("summaries", summaries, summariesSchema, null, fleet.summaries);
        finish("summaries", summaries, summariesSchema, null, summaryArchive, ExpectedState.summaries(fleet.summaries));

        exportReadings();
        nextSteps();
        double seconds = (System.nanoTime() - started) / 1e9;
        if (failures.isEmpty()) {
            out.printf("%nall demo checks passed (%.1f s)%n", seconds);
            return true;
        }
        out.printf("%n%d demo check(s) FAILED:%n", failures.size());
        failures.forEach(f -> out.println("  " + f));
        return false;
    }

    private void check(boolean ok, String what) {
        out.println("    check: " + what + (ok ? ": ok" : ": FAILED"));
        if (!ok) {
            failures.add(what);
        }
    }

    private ArchiveDirectory applyAll(String name, AvroDataset dataset, Path schema, Path spec, List<ReeferFleet.Batch> batches) {
        Path archiveDir = dir.resolve("archive").resolve(name);
        ArchiveDirectory archive = ArchiveDirectory.forApply(archiveDir, dataset);
        long previousVersion = 0;
        for (ReeferFleet.Batch batch : batches) {
            Path input = writeBatch(batch, dataset.schema());
            String stem = batch.file().substring(0, batch.file().lastIndexOf('.'));
            Path rejects = dir.resolve("rejects").resolve(stem + ".jsonl");
            Path report = dir.resolve("reports").resolve(stem + ".json");
            out.printf("step %d: apply %s (%s)%n", ++step, dir.relativize(input), batch.story());
            out.printf("    same as: onefold apply --schema %s%s --archive %s --in %s --rejects %s --report %s%n", schema,
                    spec == null ? "" : " --spec " + spec, archiveDir, input, rejects, report);
            RunReport r = ApplyCommand.apply(archive, dataset, List.of(input), rejects);
            r.writeTo(report);
            r.print(out, "    ");
            check(r.batch().rejected() == batch.brokenLines().size(), batch.brokenLines().size()
                    + " broken line(s) written, " + r.batch().rejected() + " rejected");
            if (batch.file().contains("replay")) {
                check(r.archive().partitionsTouched() == 0 && r.archive().version() == previousVersion,
                        "a replayed batch rewrites nothing and publishes no version");
            }
            if (batch.file().contains("late")) {
                long days = batch.deliveries().stream().map(d -> ReeferFleet.dayOf((long) d.get("recorded_at"))).distinct().count();
                check(r.archive().partitionsTouched() == days && r.archive().partitionsUntouched() > 0,
                        "only the " + days + " days the late batch holds are rewritten; the others are left untouched");
            }
            previousVersion = r.archive().version();
            out.println();
        }
        return archive;
    }

    private void finish(String name, AvroDataset dataset, Path schema, Path spec, ArchiveDirectory archive,
            List<GenericRecord> expected) {
        VerifyReport v = archive.archive().verify();
        out.printf("step %d: verify %s%n", ++step, archive.directory());
        v.problems().forEach(p -> out.println("    problem: " + p.file() + ": " + p.message()));
        check(v.ok(), "every manifest, chunk checksum, order, index and digest of version " + v.version());

        Path copy = writeRecords(dir.resolve("expected").resolve(name + ".jsonl"), dataset.schema(), expected);
        out.printf("step %d: reconcile %s with %s, a copy worked out without onefold (plain Java maps)%n", ++step,
                archive.directory(), copy);
        out.printf("    same as: onefold reconcile --schema %s%s --left %s --right %s%n", schema,
                spec == null ? "" : " --spec " + spec, archive.directory(), copy);
        ReconciliationReport r = Reconciliation.defaults().compare(ReconcileCommand.archiveSource(archive),
                ReconcileCommand.fileSource(copy, dataset, RecordDigests.Mode.STORE));
        out.print(r.summary().indent(4));
        check(r.agrees() && r.leftTotal().records() == expected.size(), "the archive holds exactly the expected "
                + expected.size() + " records");
        out.println();
    }

    /** A copy of the readings that missed one recalibration, as a store fed by a lossy consumer might. */
    private void staleCopy(AvroDataset dataset, Path schema, ArchiveDirectory archive, ReeferFleet fleet) {
        List<GenericRecord> current = ExpectedState.readings(fleet.readings);
        int at = -1;
        for (int i = 0; i < current.size() && at < 0; i++) {
            at = (long) current.get(i).get("seq") == 2 ? i : -1;
        }
        GenericRecord fixed = current.get(at);
        GenericRecord missed = new GenericData.Record((GenericData.Record) fixed, true);
        missed.put("seq", 1L);
        missed.put("celsius", Math.round(((double) fixed.get("celsius") - 0.4) * 10) / 10.0);
        List<GenericRecord> stale = new ArrayList<>(current);
        stale.set(at, missed);
        Path copy = writeRecords(dir.resolve("expected").resolve("readings-stale.jsonl"), dataset.schema(), stale);
        out.printf("step %d: reconcile with %s, a copy that missed the recalibration of %s reading %s%n", ++step, copy,
                fixed.get("container_id"), fixed.get("reading_no"));
        out.printf("    same as: onefold reconcile --schema %s --left %s --right %s%n", schema, archive.directory(), copy);
        ReconciliationReport r = Reconciliation.defaults().compare(ReconcileCommand.archiveSource(archive),
                ReconcileCommand.fileSource(copy, dataset, RecordDigests.Mode.STORE));
        out.print(r.summary().indent(4));
        long differing = r.partitions().stream().filter(p -> p.drillDown() != null)
                .mapToLong(p -> p.drillDown().contentDiffersCount()).sum();
        check(!r.agrees() && differing == 1, "reconciliation names exactly the one reading that differs");
        out.println();
    }

    private void exportReadings() {
        Path archive = dir.resolve("archive").resolve("readings");
        Path export = dir.resolve("export").resolve("readings.jsonl");
        out.printf("step %d: onefold export --archive %s --out %s%n", ++step, archive, export);
        int status = OnefoldTool.run(new String[] {"export", "--archive", archive.toString(), "--out", export.toString()},
                new PrintStream(out, true, StandardCharsets.UTF_8) {
                    @Override
                    public void println(String x) {
                        super.println("    " + x);
                    }
                }, out);
        check(status == 0 && Files.isRegularFile(export), "export succeeded");
        out.println();
    }

    private void nextSteps() {
        String jar = jarPath();
        Path a = dir.resolve("archive");
        out.println("what to look at next:");
        out.println("  " + dir.resolve("inputs") + "/          the deliveries as they arrived: duplicates, replays, late and broken lines");
        out.println("  " + dir.resolve("rejects").resolve("readings-1-day1.jsonl") + "   each rejected line with its file, line and reason");
        out.println("  " + dir.resolve("reports").resolve("readings-4-late.json") + "   the counts of one apply, as JSON");
        out.println("  " + dir.resolve("export").resolve("readings.jsonl") + "   one reading per key, in time order");
        out.println("  " + dir.resolve("expected") + "/        the independently worked-out copies");
        out.println("commands to try:");
        out.println("  java -jar " + jar + " verify --archive " + a.resolve("status"));
        out.println("  java -jar " + jar + " export --archive " + a.resolve("readings") + " --partition 2031-05-05 --out "
                + dir.resolve("export").resolve("day2.avro"));
        out.println("  java -jar " + jar + " apply --schema " + dir.resolve("readings.avsc") + " --archive " + a.resolve("readings")
                + " --in " + dir.resolve("inputs").resolve("readings-3-replay-day2.avro") + "   (a replay: nothing changes)");
        out.println("  java -jar " + jar + " reconcile --schema " + dir.resolve("readings.avsc") + " --left " + a.resolve("readings")
                + " --right " + dir.resolve("expected").resolve("readings-stale.jsonl"));
        out.println("  java -jar " + jar + " dedupe --schema " + dir.resolve("summaries.avsc") + " --in "
                + dir.resolve("inputs").resolve("summaries-1.jsonl") + " " + dir.resolve("inputs").resolve("summaries-2.jsonl")
                + " --out " + dir.resolve("export").resolve("summaries.jsonl"));
        out.println("  java -jar " + jar + " help");
    }

    private static String jarPath() {
        try {
            Path p = Path.of(Demo.class.getProtectionDomain().getCodeSource().getLocation().toURI());
            return p.toString().endsWith(".jar") ? p.toString() : "examples/target/onefold.jar";
        } catch (java.net.URISyntaxException | SecurityException e) {
            return "examples/target/onefold.jar";
        }
    }

    private void prepare() {
        try {
            if (Files.isDirectory(dir)) {
                boolean empty;
                try (Stream<Path> s = Files.list(dir)) {
                    empty = s.findAny().isEmpty();
                }
                if (!empty && !Files.exists(dir.resolve(MARKER))) {
                    throw OnefoldException.usage(dir + ": exists and holds other files; choose an empty or new --dir");
                }
                for (String owned : OWNED) {
                    deleteTree(dir.resolve(owned));
                }
            }
            Files.createDirectories(dir.resolve("inputs"));
            Files.writeString(dir.resolve(MARKER), "files written by 'onefold demo'; a new demo run replaces them\n");
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, dir + ": cannot prepare the demo directory: " + e.getMessage(), e);
        }
    }

    private static void deleteTree(Path p) throws IOException {
        if (!Files.exists(p)) {
            return;
        }
        try (Stream<Path> walk = Files.walk(p)) {
            for (Path f : walk.sorted(Comparator.reverseOrder()).toList()) {
                Files.delete(f);
            }
        } catch (UncheckedIOException e) {
            throw e.getCause();
        }
    }

    private Path writeText(String name, String text) {
        Path p = dir.resolve(name);
        try {
            Files.writeString(p, text.endsWith("\n") ? text : text + "\n", StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, p + ": cannot write: " + e.getMessage(), e);
        }
        return p;
    }

    /** Writes a batch as its file says: JSON lines with the broken lines spread through it, or an Avro file. */
    private Path writeBatch(ReeferFleet.Batch batch, Schema schema) {
        Path p = dir.resolve("inputs").resolve(batch.file());
        if (batch.file().endsWith(".jsonl")) {
            JsonLines lines = JsonLines.of(schema);
            List<String> text = new ArrayList<>(batch.deliveries().size() + batch.brokenLines().size());
            batch.deliveries().forEach(r -> text.add(lines.write(r)));
            for (int i = 0; i < batch.brokenLines().size(); i++) {
                text.add((int) ((i + 1L) * text.size() / (batch.brokenLines().size() + 1)), batch.brokenLines().get(i));
            }
            try {
                Files.write(p, text, StandardCharsets.UTF_8);
            } catch (IOException e) {
                throw new OnefoldException(OnefoldException.Kind.IO, p + ": cannot write: " + e.getMessage(), e);
            }
        } else {
            ContainerFiles.Compression c = ContainerFiles.Compression.ZSTD.isAvailable() ? ContainerFiles.Compression.ZSTD
                    : ContainerFiles.Compression.DEFLATE;
            try (ContainerFiles.Writer w = ContainerFiles.create(p, schema, c)) {
                batch.deliveries().forEach(w);
            }
        }
        return p;
    }

    private static Path writeRecords(Path p, Schema schema, List<GenericRecord> records) {
        JsonLines lines = JsonLines.of(schema);
        try {
            Files.createDirectories(p.getParent());
            Files.write(p, records.stream().map(lines::write).toList(), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, p + ": cannot write: " + e.getMessage(), e);
        }
        return p;
    }
}
