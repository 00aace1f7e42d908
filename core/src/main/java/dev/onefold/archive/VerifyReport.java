package dev.onefold.archive;

import java.util.List;

/**
 * The outcome of {@link Archive#verify()}: the version checked and every problem found, each naming its file.
 * Immutable.
 */
public record VerifyReport(long version, List<Problem> problems) {
    public VerifyReport {
        problems = List.copyOf(problems);
    }

    /** One problem: the file it is in and what is wrong. */
    public record Problem(String file, String message) {}

    public boolean ok() {
        return problems.isEmpty();
    }
}
