package dev.onefold;

/**
 * One rejected input record: where it came from, why it was refused, and the record itself as received (so
 * nothing is lost; it may be null when the input could not even be read as a record).
 *
 * @param source   what delivered it (a file name, "batch", a log partition), never null
 * @param position its position in the source (0-based record index, or a line number where the source says so)
 * @param reason   why it was rejected, naming the field where one is at fault
 * @param record   the rejected record or its raw text, possibly null
 */
public record Rejection(String source, long position, String reason, Object record) {
    public Rejection {
        java.util.Objects.requireNonNull(source, "source");
        java.util.Objects.requireNonNull(reason, "reason");
    }
}
