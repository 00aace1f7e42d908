package dev.onefold.examples.cli;

import java.io.PrintStream;

/**
 * Progress of a long run (records read, records per second, the current step) on one status line of stderr,
 * redrawn at most twice a second, and only when stderr is a terminal: scripts and logs get nothing extra.
 *
 * <p>Counting is for the one thread that reads input; {@link #step} may be called from that thread only. Cost:
 * one counter increment per record and a clock read every 4096 records.
 */
final class Progress {
    private static final long REDRAW_NANOS = 500_000_000L;

    private final PrintStream err;
    private final boolean shown;
    private final String afterReading;
    private final long started = System.nanoTime();
    private long records;
    private long lastDrawn;
    private String step = "reading";
    private boolean drawn;

    private Progress(PrintStream err, boolean shown, String afterReading) {
        this.err = err;
        this.shown = shown;
        this.afterReading = afterReading;
    }

    /**
     * Progress on {@code err}, shown when the process has a terminal ({@code System.console() != null}).
     *
     * @param afterReading the step that follows once the input is read, for example "merging and sorting"
     */
    static Progress onTerminal(PrintStream err, String afterReading) {
        return new Progress(err, System.console() != null, afterReading);
    }

    static Progress hidden() {
        return new Progress(System.err, false, "");
    }

    /** The input is read; shows the step that follows. */
    void inputDone() {
        step(afterReading);
    }

    void recordRead() {
        records++;
        if (shown && (records & 4095) == 0) {
            long now = System.nanoTime();
            if (now - lastDrawn >= REDRAW_NANOS) {
                lastDrawn = now;
                draw(now);
            }
        }
    }

    /** Names the step now running (for example "rewriting partitions") and redraws. */
    void step(String name) {
        step = name;
        if (shown) {
            draw(System.nanoTime());
        }
    }

    private void draw(long now) {
        double seconds = Math.max(1e-3, (now - started) / 1e9);
        err.printf("\r%s: %,d records read, %,.0f records/s   ", step, records, records / seconds);
        err.flush();
        drawn = true;
    }

    /** Clears the status line so the next output starts on a fresh line. */
    void done() {
        if (drawn) {
            err.print("\r" + " ".repeat(78) + "\r");
            err.flush();
            drawn = false;
        }
    }
}
