package dev.onefold.internal.merge;

import dev.onefold.record.FieldPath;
import dev.onefold.record.Row;

/** Reads a dataset's tombstone flag; a missing tombstone field or a null value means "not deleted". */
final class Tombstones {
    private Tombstones() {}

    static boolean isSet(FieldPath tombstone, Row row) {
        return tombstone != null && Boolean.TRUE.equals(tombstone.read(row));
    }
}
