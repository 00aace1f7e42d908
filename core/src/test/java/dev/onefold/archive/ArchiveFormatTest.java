package dev.onefold.archive;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.internal.archive.ChunkEntry;
import dev.onefold.internal.archive.ChunkFormat;
import dev.onefold.internal.archive.ChunkRef;
import dev.onefold.internal.archive.Manifest;
import dev.onefold.internal.archive.ManifestFormat;
import dev.onefold.internal.archive.PartitionEntry;
import dev.onefold.internal.archive.Sections;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.reconcile.Digest;
import java.io.IOException;
import java.io.InputStream;
import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HexFormat;
import java.util.Iterator;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.roaringbitmap.RoaringBitmap;

/**
 * The on-disk formats: golden files of each format version (frozen under src/test/resources/archive, read on
 * every build; regenerate only for a new format version with -Donefold.writeGolden=true), and the published
 * check values of their building blocks.
 */
class ArchiveFormatTest {
    private static final String CHUNK_V1 = "archive/chunk_v1.bin";
    private static final String MANIFEST_V1 = "archive/manifest_v1.bin";

    private static List<ChunkEntry> goldenEntries() {
        List<ChunkEntry> out = new ArrayList<>();
        for (int i = 0; i < 10; i++) {
            byte[] key = ("key-" + i).getBytes(StandardCharsets.UTF_8);
            byte[] order = new byte[key.length + 1];
            order[0] = (byte) (i * 7);
            System.arraycopy(key, 0, order, 1, key.length);
            byte[] state = ("state of " + i).getBytes(StandardCharsets.UTF_8);
            out.add(new ChunkEntry(key, order, state, i % 4 == 3 ? 1_700_000_000_000L + i : -1));
        }
        return out;
    }

    private static byte[] goldenChunk(ChunkRef[] ref) {
        ChunkFormat.Builder b = new ChunkFormat.Builder();
        goldenEntries().forEach(b::add);
        ByteWriter out = new ByteWriter();
        ref[0] = b.finish("chunks/_all/golden.chunk", "row-golden", out);
        return out.toByteArray();
    }

    private static Manifest goldenManifest(ChunkRef chunk) {
        Digest d = new Digest(8, 8, 0x0123456789abcdefL, Arrays.asList(new BigDecimal("42.5"), null));
        PartitionEntry p = new PartitionEntry(List.of(), "_all", List.of(chunk), d, chunk.entries(), chunk.tombstones(),
                chunk.bytes());
        return new Manifest(7, "golden-commit", 1_709_164_800_000L, 0x5eedL, List.of(p));
    }

    private static byte[] resource(String name) throws IOException {
        if (Boolean.getBoolean("onefold.writeGolden")) {
            return null;
        }
        try (InputStream in = ArchiveFormatTest.class.getClassLoader().getResourceAsStream(name)) {
            assertTrue(in != null, "golden file " + name + " is missing");
            return in.readAllBytes();
        }
    }

    private static void writeGolden(String name, byte[] bytes) throws IOException {
        Path p = Path.of("src/test/resources", name);
        Files.createDirectories(p.getParent());
        Files.write(p, bytes);
    }

    // --- golden files

    @Test
    void chunkV1_goldenFileReadsAndRebuildsByteForByte() throws IOException {
        ChunkRef[] ref = new ChunkRef[1];
        byte[] built = goldenChunk(ref);
        byte[] golden = resource(CHUNK_V1);
        if (golden == null) {
            writeGolden(CHUNK_V1, built);
            return;
        }
        assertArrayEquals(golden, built);
        ChunkFormat.Reader r = new ChunkFormat.Reader("chunk_v1.bin", golden);
        assertEquals("row-golden", r.writerId());
        assertEquals(10, r.entries());
        assertEquals(2, r.tombstones());
        List<ChunkEntry> read = new ArrayList<>();
        Iterator<ChunkEntry> it = r.iterator();
        it.forEachRemaining(read::add);
        List<ChunkEntry> expected = goldenEntries();
        for (int i = 0; i < expected.size(); i++) {
            assertArrayEquals(expected.get(i).key(), read.get(i).key());
            assertArrayEquals(expected.get(i).order(), read.get(i).order());
            assertArrayEquals(expected.get(i).state(), read.get(i).state());
            assertEquals(expected.get(i).deletedSince(), read.get(i).deletedSince());
            assertTrue(r.index().contains(ChunkFormat.keyHash(expected.get(i).key())));
        }
    }

    @Test
    void manifestV1_goldenFileReadsAndRebuildsByteForByte() throws IOException {
        ChunkRef[] ref = new ChunkRef[1];
        goldenChunk(ref);
        byte[] built = ManifestFormat.write(goldenManifest(ref[0]));
        byte[] golden = resource(MANIFEST_V1);
        if (golden == null) {
            writeGolden(MANIFEST_V1, built);
            return;
        }
        assertArrayEquals(golden, built);
        Manifest m = ManifestFormat.read("manifest_v1.bin", golden, 7);
        assertEquals(7, m.version());
        assertEquals("golden-commit", m.commitId());
        assertEquals(0x5eedL, m.specHash());
        PartitionEntry p = m.partitions().get(0);
        assertEquals(goldenManifest(ref[0]).partitions().get(0).digest(), p.digest());
        assertEquals("chunks/_all/golden.chunk", p.chunks().get(0).name());
        assertArrayEquals(ref[0].maxOrder(), p.maxOrder());
    }

    // --- building blocks against published values

    @Test
    void crc32c_matchesRfc3720AndCatalogue() {
        byte[] zeros = new byte[32];
        byte[] ones = new byte[32];
        Arrays.fill(ones, (byte) 0xFF);
        byte[] up = new byte[32];
        byte[] down = new byte[32];
        for (int i = 0; i < 32; i++) {
            up[i] = (byte) i;
            down[i] = (byte) (31 - i);
        }
        // RFC 3720 appendix B.4 (as transcribed in google/crc32c's unit tests; REFERENCES.md section 4)
        assertEquals(0x8a9136aa, Sections.crc32c(zeros, 0, 32));
        assertEquals(0x62a8ab43, Sections.crc32c(ones, 0, 32));
        assertEquals(0x46dd794e, Sections.crc32c(up, 0, 32));
        assertEquals(0x113fdb5c, Sections.crc32c(down, 0, 32));
        // RevEng catalogue CRC-32/ISCSI check value (REFERENCES.md section 4)
        byte[] check = "123456789".getBytes(StandardCharsets.US_ASCII);
        assertEquals(0xe3069283, Sections.crc32c(check, 0, check.length));
    }

    @Test
    void keyHashIndex_roundTripsRoaringPortableFormat() {
        // The content of RoaringFormatSpec's test files (REFERENCES.md section 8): multiples of 1000 below
        // 100000, 3k for k in [100000, 200000), and all of [700000, 800000).
        RoaringBitmap b = new RoaringBitmap();
        for (int v = 0; v < 100_000; v += 1000) {
            b.add(v);
        }
        for (int k = 100_000; k < 200_000; k++) {
            b.add(3 * k);
        }
        for (int v = 700_000; v < 800_000; v++) {
            b.add(v); // one by one, so no run containers exist before runOptimize
        }
        assertEquals(200_100, b.getLongCardinality());
        assertEquals(72_616, b.serializedSizeInBytes(), "size of testdata/bitmapwithoutruns.bin");
        ByteBuffer plain = ByteBuffer.allocate(b.serializedSizeInBytes());
        b.serialize(plain);
        assertEquals("3a3000000b000000", HexFormat.of().formatHex(plain.array(), 0, 8), "cookie 12346, 11 containers");
        b.runOptimize();
        assertEquals(48_056, b.serializedSizeInBytes(), "size of testdata/bitmapwithruns.bin");
        ByteBuffer runs = ByteBuffer.allocate(b.serializedSizeInBytes());
        b.serialize(runs);
        assertEquals("3b300a000007", HexFormat.of().formatHex(runs.array(), 0, 6), "cookie 12347, runs in containers 8-10");

        ByteWriter section = new ByteWriter();
        Sections.write(section, runs.array(), runs.array().length);
        RoaringBitmap back = ChunkFormat.readIndex("index", section.toByteArray());
        assertEquals(b, back);
        for (int v : new int[] {0, 99_000, 300_000, 599_997, 700_000, 799_999}) {
            assertTrue(back.contains(v), "contains " + v);
        }
        assertFalse(back.contains(100_000));
        assertFalse(back.contains(800_000));
    }
}
