package dev.onefold.testkit;

/**
 * Thrown by {@link SinkCheck} when a sink ends a schedule in a state other than the one onefold computes (or
 * throws while being fed). An {@link AssertionError}, so JUnit 5 and jqwik report it as a failed test; the
 * message is the full {@link Divergence#report()}, and {@link #divergence()} gives the parts to assert on.
 * Immutable once thrown.
 */
public final class SinkDivergedError extends AssertionError {
    private static final long serialVersionUID = 1L;

    private final transient Divergence<?> divergence;

    public SinkDivergedError(Divergence<?> divergence) {
        super(divergence.report(), divergence.error());
        this.divergence = divergence;
    }

    /** What went wrong: the smallest failing schedule found, the differing keys, the sink's exception if any. */
    public Divergence<?> divergence() {
        return divergence;
    }
}
