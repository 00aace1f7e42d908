package dev.onefold.examples.cli;

import dev.onefold.BatchEngine;
import dev.onefold.BatchReport;
import dev.onefold.OnefoldException;
import dev.onefold.archive.PartitionInfo;
import dev.onefold.archive.Snapshot;
import dev.onefold.avro.AvroDataset;
import java.io.PrintStream;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;

/**
 * {@code onefold export}: writes the visible records of one archive version (the latest by default), or of one
 * partition of it, to a record file in the spec's order.
 *
 * <p>Order across partitions: a snapshot reads partition by partition, which is the spec's order only when the
 * partitions follow it (a time bucket of the leading order field). Otherwise the records go through the batch
 * engine once more, which sorts them with bounded memory; since a snapshot holds one record per key (or the
 * siblings of a key), folding them again changes nothing, which the command checks by counting. Stateless.
 */
final class ExportCommand {
    private ExportCommand() {}

    static int run(CommandLine cl, PrintStream out) {
        Path dir = cl.requiredPath("archive");
        Path outFile = cl.requiredPath("out");
        FileFormat.of(outFile);
        long version = cl.number("version", -1);
        String partition = cl.optional("partition");
        ArchiveDirectory archive = ArchiveDirectory.open(dir);
        Snapshot<InputRecord> snapshot = version < 0 ? archive.archive().snapshot() : archive.archive().snapshot(version);
        AvroDataset dataset = archive.dataset();
        long written;
        try (OutputFile output = OutputFile.create(outFile, dataset.schema(), DedupeCommand.compression(cl))) {
            if (partition != null) {
                try (Stream<InputRecord> rows = snapshot.rows(find(dir, snapshot, partition).values())) {
                    rows.forEach(r -> output.write(r.row()));
                }
            } else if (snapshot.globallyOrdered()) {
                try (Stream<InputRecord> rows = snapshot.rows()) {
                    rows.forEach(r -> output.write(r.row()));
                }
            } else {
                sortAcrossPartitions(dataset, snapshot, output);
            }
            output.commit();
            written = output.count();
        }
        out.printf("export: wrote %,d records of archive %s version %d%s to %s%n", written, dir, snapshot.version(),
                partition == null ? "" : " partition " + partition, outFile);
        return 0;
    }

    private static void sortAcrossPartitions(AvroDataset dataset, Snapshot<InputRecord> snapshot, OutputFile output) {
        long expected = snapshot.partitions().stream().mapToLong(p -> p.digest().records()).sum();
        BatchEngine<InputRecord> engine = BatchEngine.builder(dataset.spec(), InputRecord.access(dataset.access().schema()))
                .build();
        List<String> refused = new ArrayList<>();
        BatchReport r;
        try (Stream<InputRecord> rows = snapshot.rows()) {
            r = engine.dedupe(rows.iterator(), "snapshot", s -> output.write(s.row()), x -> refused.add(x.reason()));
        }
        if (!refused.isEmpty() || r.out() != expected) {
            throw new IllegalStateException("sorting snapshot " + snapshot.version() + " across partitions gave " + r.out()
                    + " records for " + expected + " stored (refused: " + refused + ")");
        }
    }

    private static PartitionInfo find(Path dir, Snapshot<InputRecord> snapshot, String partition) {
        List<String> names = new ArrayList<>();
        for (PartitionInfo p : snapshot.partitions()) {
            String name = String.join("/", p.values().stream().map(v -> v == null ? "null" : v).toList());
            if (name.equals(partition)) {
                return p;
            }
            names.add(name);
        }
        throw OnefoldException.usage(dir + " version " + snapshot.version() + " has no partition '" + partition + "' (it has "
                + (names.isEmpty() ? "none" : names.size() <= 10 ? String.join(", ", names)
                : String.join(", ", names.subList(0, 10)) + ", ... " + names.size() + " in all") + ")");
    }
}
