package dev.onefold.avro.internal;

import java.time.Instant;

/** Instants as whole milliseconds or microseconds since 1970-01-01T00:00Z. Stateless and thread-safe. */
final class EpochUnits {
    private EpochUnits() {}

    /**
     * The instant in units of {@code 1/perSecond} seconds, dropping nothing: callers check that the instant has
     * no finer part.
     *
     * @throws ArithmeticException when the result does not fit a long
     */
    static long of(Instant t, long perSecond) {
        long sec = t.getEpochSecond();
        long fraction = t.getNano() / (1_000_000_000L / perSecond);
        if (sec < 0 && fraction > 0) {
            // borrow one second so the product cannot overflow before the fraction is added (Long.MIN_VALUE micros)
            return Math.addExact(Math.multiplyExact(sec + 1, perSecond), fraction - perSecond);
        }
        return Math.addExact(Math.multiplyExact(sec, perSecond), fraction);
    }
}
