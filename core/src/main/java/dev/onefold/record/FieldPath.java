package dev.onefold.record;

/**
 * A field path resolved against one {@link RowSchema}: the positions to follow and the type found at the end
 * (nullable when any step on the way is nullable). Reading costs one array access per step.
 *
 * <p>Immutable and thread-safe.
 */
public final class FieldPath {
    private final String path;
    private final int[] positions;
    private final FieldType type;

    FieldPath(String path, int[] positions, FieldType type) {
        this.path = path;
        this.positions = positions;
        this.type = type;
    }

    public String path() { return path; }
    public FieldType type() { return type; }

    /** The value at this path in the row, or null when it or a record on the way is null. */
    public Object read(Row row) {
        Row current = row;
        int last = positions.length - 1;
        for (int i = 0; i < last; i++) {
            current = (Row) current.get(positions[i]);
            if (current == null) {
                return null;
            }
        }
        return current.get(positions[last]);
    }

    /** Whether the path is a single top-level field. */
    public boolean isTopLevel() {
        return positions.length == 1;
    }

    /** The position of the first step. */
    public int topPosition() {
        return positions[0];
    }

    @Override
    public String toString() {
        return path;
    }
}
