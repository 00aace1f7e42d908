package dev.onefold;

import java.util.List;

/**
 * The outcome of deduplicating one batch held in memory: the survivors in order, the rejected records with
 * their reasons, and the report. Immutable.
 */
public record BatchResult<R>(List<R> survivors, List<Rejection> rejections, BatchReport report) {
    public BatchResult {
        survivors = List.copyOf(survivors);
        rejections = List.copyOf(rejections);
    }
}
