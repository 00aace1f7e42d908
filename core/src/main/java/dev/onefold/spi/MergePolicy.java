package dev.onefold.spi;

import dev.onefold.record.Row;
import java.util.Set;

/**
 * A user-defined merge policy: joins two versions of one key into one. The built-in policies (last-writer,
 * vector-clock, field-wise) are chosen in the {@link dev.onefold.DatasetSpec}; this interface is for the
 * rest.
 *
 * <p>A policy declares which laws its {@link #merge} satisfies. Only a policy with all three
 * ({@link Law#COMMUTATIVE}, {@link Law#ASSOCIATIVE}, {@link Law#IDEMPOTENT}) gets onefold's convergence
 * promise: results independent of delivery order, batching and repetition. For a policy missing a law, the
 * engine still gives a deterministic result for one batch by folding a key's versions in ascending order of
 * their canonical bytes, but results across batches may depend on how records were batched; the engine's
 * report says so ({@code lawsMissing}).
 *
 * <p>Implementations must be stateless and thread-safe. Cost: one call per pair of versions merged.
 */
public interface MergePolicy {

    /** An algebraic law of {@link #merge}. */
    enum Law {
        /** merge(a, b) equals merge(b, a). */
        COMMUTATIVE,
        /** merge(merge(a, b), c) equals merge(a, merge(b, c)). */
        ASSOCIATIVE,
        /** merge(a, a) equals a. */
        IDEMPOTENT
    }

    /** A short name for reports and the JSON form of a spec. */
    String name();

    /** The laws {@link #merge} satisfies; onefold's property tests can check the claim. */
    Set<Law> laws();

    /** Joins two versions of the same key; both rows have the dataset's schema, and so must the result. */
    Row merge(Row a, Row b);

    /** Whether a merged row means the key is deleted (hidden from output, kept in the state). */
    default boolean isDeleted(Row merged) {
        return false;
    }
}
