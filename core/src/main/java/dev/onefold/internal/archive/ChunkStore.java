package dev.onefold.internal.archive;

import com.github.benmanes.caffeine.cache.Cache;
import com.github.benmanes.caffeine.cache.Caffeine;
import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.spi.Storage;
import java.util.Iterator;
import java.util.List;
import java.util.NoSuchElementException;
import java.util.UUID;
import org.roaringbitmap.RoaringBitmap;

/**
 * Reads and writes chunk files through a {@link Storage}: whole chunks checked against their manifest record,
 * key-hash indexes read alone (a ranged read of the index section) and cached by chunk name, which is safe
 * because chunk files are immutable. Thread-safe. The index cache's size is set by its creator.
 */
public final class ChunkStore {
    private final Storage storage;
    private final Cache<String, RoaringBitmap> indexes;

    /** A store whose index cache holds at most {@code indexCacheBytes} of bitmaps. */
    public ChunkStore(Storage storage, long indexCacheBytes) {
        this.storage = storage;
        this.indexes = Caffeine.newBuilder()
                .maximumWeight(indexCacheBytes)
                .weigher((String k, RoaringBitmap v) -> 64 + k.length() + (int) Math.min(Integer.MAX_VALUE, v.getLongSizeInBytes()))
                .build();
    }

    public Storage storage() {
        return storage;
    }

    /** A new unique chunk name inside a partition's directory. */
    static String newChunkName(String partitionName) {
        return ManifestFormat.chunkDirectory(partitionName) + UUID.randomUUID() + ".chunk";
    }

    /**
     * Reads a whole chunk and checks it against its manifest record.
     *
     * @throws OnefoldException CORRUPT naming the file when it is missing, has the wrong size or is damaged
     */
    public ChunkFormat.Reader open(ChunkRef ref, IoCounters io) {
        byte[] bytes = readReferenced(ref.name(), -1, 0);
        io.bytesRead.addAndGet(bytes.length);
        ChunkValidator.checkEqual(ref.name(), "file size", ref.bytes(), bytes.length);
        ChunkFormat.Reader r = new ChunkFormat.Reader(ref.name(), bytes);
        ChunkValidator.checkEqual(ref.name(), "entry count", ref.entries(), r.entries());
        ChunkValidator.checkEqual(ref.name(), "index offset", ref.indexOffset(), r.indexOffset());
        if (!ref.writerId().equals(r.writerId())) {
            throw ChunkValidator.problem(ref.name(), ChunkValidator.Problem.MISMATCH, "writer id " + r.writerId()
                    + " differs from the manifest's " + ref.writerId());
        }
        return r;
    }

    private byte[] readReferenced(String name, long offset, int length) {
        try {
            return offset < 0 ? storage.read(name) : storage.read(name, offset, length);
        } catch (OnefoldException e) {
            if (e.kind() == OnefoldException.Kind.IO && storage.size(name) < 0) {
                throw new OnefoldException(OnefoldException.Kind.CORRUPT, name + ": MISSING: the manifest lists this chunk "
                        + "file but it does not exist", e);
            }
            throw e;
        }
    }

    /** The chunk's key-hash index, from the cache or by reading only its index section. */
    public RoaringBitmap index(ChunkRef ref, IoCounters io) {
        RoaringBitmap cached = indexes.getIfPresent(ref.name());
        if (cached != null) {
            return cached;
        }
        byte[] section = readReferenced(ref.name(), ref.indexOffset(), ref.indexLength());
        io.bytesRead.addAndGet(section.length);
        RoaringBitmap b = ChunkFormat.readIndex(ref.name(), section);
        indexes.put(ref.name(), b);
        return b;
    }

    /** Writes a finished chunk under a new unique name in the partition's directory (not yet synced). */
    public ChunkRef write(String partitionName, String writerId, ChunkFormat.Builder builder, IoCounters io) {
        String name = newChunkName(partitionName);
        ByteWriter out = new ByteWriter((int) Math.min(Integer.MAX_VALUE - 16, builder.expectedFileBytes() + 256));
        ChunkRef ref = builder.finish(name, writerId, out);
        storage.write(name, out.toByteArray());
        io.bytesWritten.addAndGet(out.length());
        io.filesWritten.incrementAndGet();
        return ref;
    }

    /**
     * The entries of a partition's chunks, chunk after chunk, each chunk read when reached; checks that order
     * keeps ascending across chunk boundaries.
     */
    public Iterator<Located> entries(List<ChunkRef> chunks, IoCounters io) {
        return new Iterator<>() {
            int next;
            ChunkFormat.Reader reader;
            Iterator<ChunkEntry> current;
            byte[] last;

            @Override
            public boolean hasNext() {
                while (current == null || !current.hasNext()) {
                    if (next >= chunks.size()) {
                        return false;
                    }
                    reader = open(chunks.get(next++), io);
                    current = reader.iterator();
                }
                return true;
            }

            @Override
            public Located next() {
                if (!hasNext()) {
                    throw new NoSuchElementException();
                }
                ChunkEntry e = current.next();
                ChunkValidator.checkAscending(reader.file(), last, e.order(), "its first entry (after the previous chunk)");
                last = e.order();
                return new Located(e, reader.writerId(), reader.file());
            }
        };
    }

    /** An entry with the writer id its state was written under and the file it came from. */
    public record Located(ChunkEntry entry, String writerId, String file) {}
}
