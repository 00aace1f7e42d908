package dev.onefold;

/**
 * The one exception type onefold throws. Its {@link #kind()} says what went wrong in a way a program can act
 * on; its message says it in a way a person can: it names the file, record, field or value and the reason.
 *
 * <p>Instances are immutable and safe to share between threads.
 */
public final class OnefoldException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    /** What kind of problem occurred. */
    public enum Kind {
        /** The dataset spec is invalid or does not fit the schema. */
        INVALID_SPEC,
        /** A schema is invalid or an evolution step is not compatible. */
        INVALID_SCHEMA,
        /** One record is invalid; batch operations turn this into a rejection instead of throwing. */
        INVALID_RECORD,
        /** A file's bytes are not what they claim to be (checksum, magic, truncation, format version). */
        CORRUPT,
        /** Another writer committed first and retries were exhausted. */
        CONCURRENT_COMMIT,
        /** Reading or writing storage failed. */
        IO,
        /** A caller used the API wrongly (bad argument, wrong state). */
        USAGE
    }

    private final Kind kind;

    public OnefoldException(Kind kind, String message) {
        super(message);
        this.kind = kind;
    }

    public OnefoldException(Kind kind, String message, Throwable cause) {
        super(message, cause);
        this.kind = kind;
    }

    public Kind kind() {
        return kind;
    }

    public static OnefoldException spec(String message) {
        return new OnefoldException(Kind.INVALID_SPEC, message);
    }

    public static OnefoldException record(String message) {
        return new OnefoldException(Kind.INVALID_RECORD, message);
    }

    public static OnefoldException corrupt(String message) {
        return new OnefoldException(Kind.CORRUPT, message);
    }

    public static OnefoldException usage(String message) {
        return new OnefoldException(Kind.USAGE, message);
    }
}
