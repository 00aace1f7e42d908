package dev.onefold.archive;

import static dev.onefold.archive.ArchiveFixtures.DAY0;
import static dev.onefold.archive.ArchiveFixtures.HOUR;
import static dev.onefold.archive.ArchiveFixtures.event;
import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.internal.archive.ChunkRef;
import dev.onefold.internal.archive.MemoryStorage;
import dev.onefold.internal.archive.PartitionEntry;
import dev.onefold.record.Row;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.stream.Collectors;
import org.junit.jupiter.api.Test;

/** Promise 3: an apply reads and writes only the files of the partitions it touches. */
class ArchiveIncrementalTest {
    private static final int HOURS = 20;

    private static List<Row> history() {
        List<Row> rows = new ArrayList<>();
        for (int h = 0; h < HOURS; h++) {
            for (int i = 0; i < 200; i++) {
                rows.add(event("h" + h + "-" + i, 1, DAY0 + h * HOUR + i, (long) i, false));
            }
        }
        return rows;
    }

    /** A batch touching hours 3, 11 and 17: updates of stored keys and new keys. */
    private static List<Row> batch() {
        List<Row> rows = new ArrayList<>();
        for (int h : new int[] {3, 11, 17}) {
            for (int i = 0; i < 50; i++) {
                rows.add(event("h" + h + "-" + (i * 4), 2, DAY0 + h * HOUR + i * 4, 7L, false));
                rows.add(event("new" + h + "-" + i, 1, DAY0 + h * HOUR + 500 + i, 1L, false));
            }
        }
        return rows;
    }

    private static Map<String, byte[]> files(MemoryStorage m) {
        Map<String, byte[]> out = new HashMap<>();
        for (String n : m.list("chunks/")) {
            out.put(n, m.read(n));
        }
        return out;
    }

    @Test
    void apply_stablePartitionsTouchOnlyTheirOwnFiles() {
        MemoryStorage memory = new MemoryStorage();
        InstrumentedStorage io = new InstrumentedStorage(memory);
        Archive<Row> a = ArchiveFixtures.builder(ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, true), io).open();
        a.apply(history());
        List<PartitionEntry> before = a.engine.committer().latest().partitions();
        Map<String, byte[]> filesBefore = files(memory);
        io.resetCounters();

        ApplyReport r = a.apply(batch());

        Set<String> touched = Set.of("=2024-02-29T03", "=2024-02-29T11", "=2024-02-29T17");
        assertEquals(3, r.partitionsTouched());
        for (String name : io.bytesRead.keySet()) {
            assertTrue(name.startsWith("manifests/") || touched.contains(name.split("/")[1]), "read " + name);
        }
        for (String name : io.bytesWritten.keySet()) {
            assertTrue(name.startsWith("manifests/") || touched.contains(name.split("/")[1]), "wrote " + name);
        }
        Map<String, PartitionEntry> after = a.engine.committer().latest().byName();
        for (PartitionEntry p : before) {
            if (!touched.contains(p.name())) {
                assertTrue(p.sameChunks(after.get(p.name())), "untouched partition " + p.name() + " kept its chunks");
                for (ChunkRef c : p.chunks()) {
                    assertArrayEquals(filesBefore.get(c.name()), memory.read(c.name()), c.name());
                }
            }
        }
        assertEquals(Map.of(List.of("2024-02-29T03"), 250L, List.of("2024-02-29T11"), 250L, List.of("2024-02-29T17"), 250L),
                r.entriesPerTouchedPartition());
    }

    @Test
    void apply_movablePartitionsReadOnlyIndexesOfUntouchedChunks() {
        MemoryStorage memory = new MemoryStorage();
        InstrumentedStorage io = new InstrumentedStorage(memory);
        Archive<Row> writer = ArchiveFixtures.builder(ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false), io)
                .open();
        writer.apply(history());
        // a fresh archive object has a cold index cache: it must read every untouched chunk's index, nothing more
        Archive<Row> cold = ArchiveFixtures.builder(ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false), io)
                .open();
        Map<String, ChunkRef> refs = cold.engine.committer().latest().partitions().stream()
                .flatMap(p -> p.chunks().stream()).collect(Collectors.toMap(ChunkRef::name, c -> c));
        io.resetCounters();
        cold.apply(batch());
        Set<String> touched = Set.of("=2024-02-29T03", "=2024-02-29T11", "=2024-02-29T17");
        for (ChunkRef c : refs.values()) {
            if (!touched.contains(c.name().split("/")[1])) {
                assertEquals(c.indexLength(), io.bytesRead.get(c.name()).get(), "index only of " + c.name());
            }
        }
        // warm cache: a second batch reads no untouched file at all
        io.resetCounters();
        List<Row> again = new ArrayList<>();
        batch().forEach(x -> again.add(x.with("seq", 3L)));
        cold.apply(again);
        for (String name : io.bytesRead.keySet()) {
            assertTrue(name.startsWith("manifests/") || touched.contains(name.split("/")[1]), "read " + name);
        }
    }
}
