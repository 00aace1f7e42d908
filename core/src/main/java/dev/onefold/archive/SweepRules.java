package dev.onefold.archive;

import dev.onefold.OnefoldException;
import java.time.Duration;
import java.util.Objects;

/**
 * What {@link Archive#sweep(SweepRules)} keeps: the newest {@code keepVersions} versions (at least 1; the
 * latest is always kept), also any version younger than {@code keepNewerThan}, and any unreferenced file
 * younger than {@code orphanGrace} (a writer may be about to commit it). Immutable.
 */
public record SweepRules(int keepVersions, Duration keepNewerThan, Duration orphanGrace) {
    public SweepRules {
        if (keepVersions < 1) {
            throw OnefoldException.usage("keepVersions must be at least 1, got " + keepVersions);
        }
        Objects.requireNonNull(keepNewerThan, "keepNewerThan");
        Objects.requireNonNull(orphanGrace, "orphanGrace");
        if (keepNewerThan.isNegative() || orphanGrace.isNegative()) {
            throw OnefoldException.usage("durations must not be negative");
        }
    }

    /** Keep the 2 newest versions and files younger than one hour. */
    public static SweepRules defaults() {
        return new SweepRules(2, Duration.ZERO, Duration.ofHours(1));
    }
}
