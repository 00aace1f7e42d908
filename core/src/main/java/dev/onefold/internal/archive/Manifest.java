package dev.onefold.internal.archive;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * One committed version of an archive: its number, the id of the commit that made it, when it was made, the
 * hash of the dataset spec it was written under, and its partitions sorted by name. Immutable.
 */
public record Manifest(long version, String commitId, long createdMillis, long specHash, List<PartitionEntry> partitions) {
    public Manifest {
        partitions = List.copyOf(partitions);
    }

    /** The empty archive before its first commit. */
    public static Manifest empty(long specHash) {
        return new Manifest(0, "", 0, specHash, List.of());
    }

    /** Partitions by name, in name order. */
    public Map<String, PartitionEntry> byName() {
        Map<String, PartitionEntry> m = new LinkedHashMap<>();
        for (PartitionEntry p : partitions) {
            m.put(p.name(), p);
        }
        return Collections.unmodifiableMap(m);
    }

    /** The storage name of version {@code v}. */
    public static String fileName(long v) {
        return String.format("%s%020d%s", ManifestFormat.PREFIX, v, ManifestFormat.SUFFIX);
    }
}
