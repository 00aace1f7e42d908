package dev.onefold.archive;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.internal.archive.ChunkRef;
import dev.onefold.internal.archive.Manifest;
import dev.onefold.internal.archive.ManifestFormat;
import dev.onefold.internal.archive.MemoryStorage;
import dev.onefold.internal.archive.PartitionEntry;
import dev.onefold.record.Row;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

/** Promise 6: damaged files fail loudly naming the file; never a silent wrong read. */
class ArchiveCorruptionTest {
    private final DatasetSpec spec = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false);
    private final MemoryStorage memory = new MemoryStorage();
    private final Archive<Row> archive;
    private final List<Row> expected;
    private final ChunkRef chunk;

    ArchiveCorruptionTest() {
        archive = ArchiveFixtures.builder(spec, memory).open();
        archive.apply(ArchiveFixtures.randomEvents(new Random(3), 60, 40, 2));
        expected = ArchiveFixtures.rows(archive);
        chunk = archive.engine.committer().latest().partitions().get(0).chunks().get(0);
    }

    private Archive<Row> reopen() {
        return ArchiveFixtures.builder(spec, memory).open();
    }

    private void assertReadFailsNaming(String file, String problem) {
        Archive<Row> a = reopen();
        OnefoldException e = assertThrows(OnefoldException.class, () -> ArchiveFixtures.rows(a));
        assertEquals(OnefoldException.Kind.CORRUPT, e.kind(), e.getMessage());
        assertTrue(e.getMessage().contains(file) && e.getMessage().contains(problem), e.getMessage());
        VerifyReport v = a.verify();
        assertFalse(v.ok());
        assertTrue(v.problems().stream().anyMatch(p -> p.file().equals(file) && p.message().contains(problem)),
                v.problems().toString());
    }

    // --- chunks

    @Test
    void read_everyFlippedChunkByteIsDetected() {
        byte[] good = memory.read(chunk.name());
        for (int i = 0; i < good.length; i++) {
            byte[] bad = good.clone();
            bad[i] ^= 0x10;
            memory.write(chunk.name(), bad);
            Archive<Row> a = reopen();
            int at = i;
            OnefoldException e = assertThrows(OnefoldException.class, () -> ArchiveFixtures.rows(a), "byte " + at);
            assertEquals(OnefoldException.Kind.CORRUPT, e.kind());
            assertTrue(e.getMessage().contains(chunk.name()), e.getMessage());
        }
        memory.write(chunk.name(), good);
        assertEquals(expected, ArchiveFixtures.rows(reopen()));
    }

    @Test
    void read_flippedDataByteNamesChecksumMismatch() {
        byte[] bad = memory.read(chunk.name());
        bad[(int) chunk.indexOffset() - 3] ^= 1;
        memory.write(chunk.name(), bad);
        assertReadFailsNaming(chunk.name(), "CHECKSUM_MISMATCH");
    }

    @Test
    void read_truncatedChunkNamesSize() {
        byte[] good = memory.read(chunk.name());
        memory.write(chunk.name(), Arrays.copyOf(good, good.length / 2));
        assertReadFailsNaming(chunk.name(), "file size");
    }

    @Test
    void read_missingChunkNamesMissing() {
        memory.delete(chunk.name());
        assertReadFailsNaming(chunk.name(), "MISSING");
    }

    // --- manifests

    @Test
    void read_manifestGarbageNamesManifest() {
        String name = Manifest.fileName(1);
        memory.delete(name);
        memory.createIfAbsent(name, "this is not a manifest at all".getBytes(java.nio.charset.StandardCharsets.UTF_8));
        OnefoldException e = assertThrows(OnefoldException.class, () -> reopen().snapshot());
        assertEquals(OnefoldException.Kind.CORRUPT, e.kind());
        assertTrue(e.getMessage().startsWith(name + ": BAD_MAGIC"), e.getMessage());
        VerifyReport v = reopen().verify();
        assertEquals(name, v.problems().get(0).file());
    }

    @Test
    void read_everyFlippedManifestByteIsDetected() {
        String name = Manifest.fileName(1);
        byte[] good = memory.read(name);
        for (int i = 0; i < good.length; i++) {
            byte[] bad = good.clone();
            bad[i] ^= 0x01;
            memory.delete(name);
            memory.createIfAbsent(name, bad);
            OnefoldException e = assertThrows(OnefoldException.class, () -> reopen().snapshot());
            assertTrue(e.getMessage().startsWith(name), e.getMessage());
        }
    }

    @Test
    void read_manifestPointingToMissingFileNamesIt() {
        Manifest m = archive.engine.committer().latest();
        PartitionEntry p = m.partitions().get(0);
        List<ChunkRef> chunks = new ArrayList<>(p.chunks());
        ChunkRef ghost = new ChunkRef(ManifestFormat.chunkDirectory(p.name()) + "ghost.chunk", chunk.writerId(), 1, 0,
                100, 40, 20, chunk.maxOrder(), chunk.maxOrder());
        chunks.add(ghost);
        List<PartitionEntry> parts = new ArrayList<>(m.partitions());
        parts.set(0, new PartitionEntry(p.values(), p.name(), chunks, p.digest(), p.entries() + 1, p.tombstones(),
                p.bytes() + 100));
        memory.createIfAbsent(Manifest.fileName(2), ManifestFormat.write(new Manifest(2, "forged", 0, m.specHash(), parts)));
        assertReadFailsNaming(ghost.name(), "MISSING");
    }

    @Test
    void open_archiveOfAnotherSpecIsRefused() {
        DatasetSpec other = ArchiveFixtures.spec(ArchiveFixtures.Policy.FIELD_WISE, false);
        OnefoldException e = assertThrows(OnefoldException.class,
                () -> ArchiveFixtures.builder(other, memory).open().snapshot());
        assertEquals(OnefoldException.Kind.USAGE, e.kind());
        assertTrue(e.getMessage().contains(Manifest.fileName(1)), e.getMessage());
    }
}
