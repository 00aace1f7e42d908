package dev.onefold.archive;

import java.util.List;

/** What one {@link Archive#sweep} removed: expired versions and deleted files (chunks and stale temporaries). Immutable. */
public record SweepReport(List<Long> expiredVersions, List<String> deletedFiles) {
    public SweepReport {
        expiredVersions = List.copyOf(expiredVersions);
        deletedFiles = List.copyOf(deletedFiles);
    }
}
