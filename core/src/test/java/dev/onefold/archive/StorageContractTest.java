package dev.onefold.archive;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.internal.archive.PartitionNames;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.stream.Stream;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

/** The storage contract, run over every implementation (STYLE.md habit 15), and partition-name safety. */
class StorageContractTest {
    @TempDir
    Path dir;

    private Storage storage(String kind) {
        return kind.equals("local") ? Storage.local(dir) : Storage.inMemory();
    }

    private static byte[] bytes(String s) {
        return s.getBytes(StandardCharsets.UTF_8);
    }

    // --- contract

    @ParameterizedTest
    @ValueSource(strings = {"local", "memory"})
    void writeReadListDelete_behaveAsPromised(String kind) {
        Storage s = storage(kind);
        s.write("chunks/b/2.chunk", bytes("two"));
        s.write("chunks/a/1.chunk", bytes("one!"));
        s.sync(List.of("chunks/b/2.chunk", "chunks/a/1.chunk"));
        assertArrayEquals(bytes("one!"), s.read("chunks/a/1.chunk"));
        assertArrayEquals(bytes("ne"), s.read("chunks/a/1.chunk", 1, 2));
        assertEquals(4, s.size("chunks/a/1.chunk"));
        assertEquals(-1, s.size("chunks/a/none"));
        assertEquals(List.of("chunks/a/1.chunk", "chunks/b/2.chunk"), s.list("chunks/"));
        assertEquals(List.of("chunks/b/2.chunk"), s.list("chunks/b"));
        assertEquals(OnefoldException.Kind.IO, assertThrows(OnefoldException.class, () -> s.read("chunks/a/none")).kind());
        assertThrows(OnefoldException.class, () -> s.read("chunks/a/1.chunk", 3, 5));
        s.delete("chunks/a/1.chunk");
        s.delete("chunks/a/1.chunk");
        assertEquals(List.of("chunks/b/2.chunk"), s.list("chunks/"));
    }

    @ParameterizedTest
    @ValueSource(strings = {"local", "memory"})
    void createIfAbsent_exactlyOneOfRacingCallersWins(String kind) throws Exception {
        Storage s = storage(kind);
        ExecutorService pool = Executors.newFixedThreadPool(4);
        try {
            List<Future<Boolean>> f = new ArrayList<>();
            for (int i = 0; i < 8; i++) {
                byte[] b = bytes("writer " + i);
                f.add(pool.submit(() -> s.createIfAbsent("manifests/v1.manifest", b)));
            }
            int wins = 0;
            for (Future<Boolean> x : f) {
                wins += x.get() ? 1 : 0;
            }
            assertEquals(1, wins);
        } finally {
            pool.shutdownNow();
        }
        assertTrue(new String(s.read("manifests/v1.manifest"), StandardCharsets.UTF_8).startsWith("writer "));
        assertEquals(List.of("manifests/v1.manifest"), s.list("manifests/"));
    }

    @ParameterizedTest
    @ValueSource(strings = {"local", "memory"})
    void write_refusesNamesThatLeaveTheRoot(String kind) {
        Storage s = storage(kind);
        for (String bad : new String[] {"../x", "/abs", "a//b", "a/./b", "a\\b", "a/../../b", ""}) {
            assertEquals(OnefoldException.Kind.USAGE,
                    assertThrows(OnefoldException.class, () -> s.write(bad, new byte[1]), bad).kind());
        }
    }

    // --- partition names

    private static final List<String> HOSTILE = Arrays.asList("../", "/", "\\", "\0", "", "..", ".", "a,b", "=x", "~",
            "%41", "Zürich", "東京", "x".repeat(500), "x".repeat(499) + "y", null, "2024-02-29T13");

    @Test
    void encode_hostileValuesAreSafeDistinctAndRoundTrip() {
        Set<String> names = new HashSet<>();
        for (String v : HOSTILE) {
            String n = PartitionNames.encode(Arrays.asList(v));
            assertTrue(n.matches("[A-Za-z0-9_=,%~#-]{1,120}"), n);
            assertTrue(names.add(n), "collision for " + v);
            if (n.indexOf('#') < 0) {
                assertEquals(Arrays.asList(v), PartitionNames.decode(n).orElseThrow());
            }
        }
        assertEquals("=2024-02-29T13", PartitionNames.encode(List.of("2024-02-29T13")));
        assertFalse(PartitionNames.encode(Arrays.asList("a", "b")).equals(PartitionNames.encode(List.of("a,b"))));
    }

    @Test
    void apply_hostilePartitionValuesStayInsideTheArchiveDirectory() throws Exception {
        RowSchema schema = RowSchema.builder("tagged").field("id", FieldType.int64()).field("tag", FieldType.string().nullable())
                .field("seq", FieldType.int64()).build();
        DatasetSpec spec = DatasetSpec.fromJson("{\"key\": [\"id\"], \"order\": [\"id\"], \"partition\": {\"fields\": "
                + "[\"tag\"]}, \"merge\": {\"policy\": \"last-writer\", \"version\": \"seq\"}}", "spec");
        Path root = dir.resolve("archive");
        Archive<Row> a = Archive.builder(spec, RecordAccess.rows(schema)).directory(root).open();
        List<Row> rows = new ArrayList<>();
        for (int i = 0; i < HOSTILE.size(); i++) {
            rows.add(Row.of(schema, (long) i, HOSTILE.get(i), 1L));
        }
        a.apply(rows);
        Set<List<String>> values = new HashSet<>();
        a.snapshot().partitions().forEach(p -> values.add(p.values()));
        Set<List<String>> expected = new HashSet<>();
        HOSTILE.forEach(v -> expected.add(Arrays.asList(v)));
        assertEquals(expected, values);
        for (int i = 0; i < HOSTILE.size(); i++) {
            try (Stream<Row> s = a.snapshot().rows(Arrays.asList(HOSTILE.get(i)))) {
                assertEquals(List.of(rows.get(i)), s.toList());
            }
        }
        try (Stream<Path> files = Files.walk(dir)) {
            files.forEach(f -> assertTrue(f.normalize().startsWith(dir), f.toString()));
        }
        assertTrue(a.verify().ok(), () -> a.verify().problems().toString());
    }
}
