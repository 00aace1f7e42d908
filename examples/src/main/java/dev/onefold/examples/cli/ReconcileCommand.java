package dev.onefold.examples.cli;

import dev.onefold.OnefoldException;
import dev.onefold.archive.Snapshot;
import dev.onefold.avro.AvroDataset;
import dev.onefold.avro.JsonLines;
import dev.onefold.reconcile.DigestSource;
import dev.onefold.reconcile.RecordDigests;
import dev.onefold.reconcile.Reconciliation;
import dev.onefold.reconcile.ReconciliationReport;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Spliterator;
import java.util.Spliterators;
import java.util.stream.StreamSupport;

/**
 * {@code onefold reconcile}: proves that two stores hold the same records, partition by partition, and names the
 * keys that differ. A side is an archive directory (read at its latest version) or a record file. A file is
 * taken as a store's content (an export, another system's dump: every record counts, one per key expected), or,
 * with {@code --deliveries left|right|both}, as raw deliveries folded under the spec first (duplicates, old
 * versions and tombstones as the archive would see them). Returns 1 when the sides disagree. Stateless; the
 * public {@link #archiveSource} and {@link #fileSource} build the sides for programs.
 */
public final class ReconcileCommand {
    private ReconcileCommand() {}

    static int run(CommandLine cl, PrintStream out) {
        Path left = cl.requiredPath("left");
        Path right = cl.requiredPath("right");
        String deliveries = cl.optional("deliveries");
        if (deliveries != null && !List.of("left", "right", "both").contains(deliveries)) {
            throw CommandLine.usage("reconcile", "--deliveries must be left, right or both, got '" + deliveries + "'");
        }
        boolean anyFile = !Files.isDirectory(left) || !Files.isDirectory(right);
        AvroDataset dataset = null;
        if (anyFile || cl.has("schema")) {
            dataset = DatasetFiles.read(cl.requiredPath("schema"), cl.optionalPath("spec"));
        }
        DigestSource l = source(left, dataset, "left".equals(deliveries) || "both".equals(deliveries));
        DigestSource r = source(right, dataset, "right".equals(deliveries) || "both".equals(deliveries));
        ReconciliationReport report = Reconciliation.defaults().compare(l, r);
        RunReport.writeJson(cl.optionalPath("report"), new JsonText.Raw(report.toJson()));
        out.print(report.summary());
        return report.agrees() ? 0 : 1;
    }

    private static DigestSource source(Path side, AvroDataset dataset, boolean deliveries) {
        if (Files.isDirectory(side)) {
            if (deliveries) {
                throw CommandLine.usage("reconcile", "--deliveries applies to files; " + side + " is an archive directory");
            }
            return archiveSource(ArchiveDirectory.open(side));
        }
        InputFiles.checkReadable(List.of(side));
        return fileSource(side, dataset, deliveries ? RecordDigests.Mode.DELIVERIES : RecordDigests.Mode.STORE);
    }

    /**
     * The latest version of an archive as a reconciliation side. Its digests come from the manifest, so no chunk
     * is read unless the sides differ (or a partition was last written under an older schema version); the
     * drill-down then reads only the chunks of the partitions that differ.
     */
    public static DigestSource archiveSource(ArchiveDirectory archive) {
        Snapshot<InputRecord> snapshot = archive.archive().snapshot();
        return snapshot.digestSource("archive " + archive.directory() + " version " + snapshot.version());
    }

    /**
     * A record file as a reconciliation side; records that cannot be read are counted as the side's rejections.
     *
     * @throws OnefoldException (INVALID_SPEC) when the dataset's spec does not fit
     */
    public static DigestSource fileSource(Path file, AvroDataset dataset, RecordDigests.Mode mode) {
        JsonLines lines = JsonLines.of(dataset.schema());
        return RecordDigests.builder(file.toString(), dataset.spec(), InputRecord.access(dataset.access().schema()), () -> {
            InputFiles in = new InputFiles(List.of(file), lines::parseRow, dataset.access(), Progress.hidden());
            return StreamSupport.stream(Spliterators.spliteratorUnknownSize(in, Spliterator.ORDERED | Spliterator.NONNULL),
                    false).onClose(in::close);
        }, mode).build();
    }
}
