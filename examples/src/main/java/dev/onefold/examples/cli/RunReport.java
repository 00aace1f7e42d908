package dev.onefold.examples.cli;

import dev.onefold.BatchReport;
import dev.onefold.OnefoldException;
import dev.onefold.archive.ApplyReport;
import dev.onefold.archive.PartitionInfo;
import dev.onefold.archive.Snapshot;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * What a {@code dedupe} or {@code apply} run did, as the JSON written by {@code --report} and as the few lines
 * printed for people. The JSON holds the batch's counts under the names of {@link BatchReport#toMap()}
 * ({@code in, accepted, rejected, duplicates, superseded, conflicts, keys, keys_with_siblings, tombstones, out,
 * spilled_runs}), then {@code rejected_reasons} (count per reason, file and line removed) and, for {@code apply},
 * the archive side: {@code version, partitions_touched, partitions_untouched, chunks_written, bytes_read,
 * bytes_written, keys_moved, stored_superseded, tombstones_dropped, archive_partitions, archive_records}.
 *
 * <p>Immutable. Cost: linear in the number of partitions.
 */
public record RunReport(BatchReport batch, Map<String, Long> rejectedReasons, ArchiveSide archive) {

    /** The archive side of an apply: what was rewritten and what the archive holds afterwards. */
    public record ArchiveSide(long version, int partitionsTouched, long partitionsUntouched, long chunksWritten,
            long bytesRead, long bytesWritten, long keysMoved, long storedSuperseded, long tombstonesDropped,
            long archivePartitions, long archiveRecords) {

        static ArchiveSide of(ApplyReport r, Snapshot<?> after) {
            Set<List<String>> touched = new HashSet<>(r.entriesPerTouchedPartition().keySet());
            long untouched = 0;
            long records = 0;
            for (PartitionInfo p : after.partitions()) {
                untouched += touched.contains(p.values()) ? 0 : 1;
                records += p.digest().records();
            }
            return new ArchiveSide(r.version(), r.partitionsTouched(), untouched, r.chunkFilesWritten(), r.bytesRead(),
                    r.bytesWritten(), r.keysMoved(), r.storedSuperseded(), r.tombstonesDropped(), after.partitions().size(),
                    records);
        }
    }

    public RunReport {
        rejectedReasons = java.util.Collections.unmodifiableMap(new LinkedHashMap<>(rejectedReasons));
    }

    /** The report as an insertion-ordered map (see the class comment for the names). */
    public Map<String, Object> toMap() {
        Map<String, Object> m = new LinkedHashMap<>(batch.toMap());
        m.put("rejected_reasons", rejectedReasons);
        if (archive != null) {
            m.put("version", archive.version);
            m.put("partitions_touched", (long) archive.partitionsTouched);
            m.put("partitions_untouched", archive.partitionsUntouched);
            m.put("chunks_written", archive.chunksWritten);
            m.put("bytes_read", archive.bytesRead);
            m.put("bytes_written", archive.bytesWritten);
            m.put("keys_moved", archive.keysMoved);
            m.put("stored_superseded", archive.storedSuperseded);
            m.put("tombstones_dropped", archive.tombstonesDropped);
            m.put("archive_partitions", archive.archivePartitions);
            m.put("archive_records", archive.archiveRecords);
        }
        return m;
    }

    /** Writes the JSON report to {@code file} (one line), or nothing when it is null. */
    public void writeTo(Path file) {
        writeJson(file, toMap());
    }

    static void writeJson(Path file, Object json) {
        if (file == null) {
            return;
        }
        try {
            Path dir = file.toAbsolutePath().getParent();
            Files.createDirectories(dir);
            Files.writeString(file, JsonText.write(json) + "\n", StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, file + ": cannot write report: " + e.getMessage(), e);
        }
    }

    /** Prints the counts for people, indented by {@code indent}. */
    public void print(PrintStream out, String indent) {
        out.printf("%srecords: %,d in, %,d accepted, %,d rejected; %,d duplicates dropped, %,d superseded by newer "
                + "versions, %,d conflicts (same version, different content)%n", indent, batch.in(), batch.accepted(),
                batch.rejected(), batch.duplicates(), batch.superseded(), batch.conflicts());
        out.printf("%skeys: %,d in the batch, %,d with concurrent versions kept as siblings, %,d deleted; %,d records out%n",
                indent, batch.keys(), batch.keysWithSiblings(), batch.tombstonedKeys(), batch.out());
        if (archive != null) {
            out.printf("%sarchive: %s; %,d partitions rewritten (%,d chunk files written), %,d left untouched; now %,d "
                    + "records in %,d partitions%n", indent,
                    archive.partitionsTouched == 0 ? "nothing changed, still version " + archive.version
                            : "committed version " + archive.version, archive.partitionsTouched, archive.chunksWritten,
                    archive.partitionsUntouched, archive.archiveRecords, archive.archivePartitions);
        }
        rejectedReasons.forEach((reason, n) -> out.printf("%srejected %,d x %s%n", indent, n, reason));
    }
}
