package dev.onefold.archive;

import dev.onefold.BatchReport;
import dev.onefold.Rejection;
import java.util.List;
import java.util.Map;

/**
 * What one apply did. {@code batch} counts the batch itself (records in, accepted, rejected, duplicates...,
 * exactly as the batch engine reports them) and {@code rejections} holds every rejected record with its reason.
 * Then the archive side: the version now current ({@code version}; unchanged when nothing changed), how many
 * partitions were rewritten, chunk files written, bytes read (key-hash indexes and chunks) and written, the
 * entries each touched partition holds afterwards (0 when it became empty), keys that moved partition, stored
 * versions the batch superseded, tombstones dropped past the horizon, and commit attempts (more than one when
 * concurrent writers won first). Immutable.
 */
public record ApplyReport(long version, BatchReport batch, List<Rejection> rejections, int partitionsTouched,
        long chunkFilesWritten, long bytesRead, long bytesWritten, Map<List<String>, Long> entriesPerTouchedPartition,
        long keysMoved, long storedSuperseded, long tombstonesDropped, int commitAttempts) {
    public ApplyReport {
        rejections = List.copyOf(rejections);
        entriesPerTouchedPartition = java.util.Collections.unmodifiableMap(new java.util.LinkedHashMap<>(entriesPerTouchedPartition));
    }
}
