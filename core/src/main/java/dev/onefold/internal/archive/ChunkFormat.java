package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.hash.XxHash64;
import java.io.IOException;
import java.nio.ByteBuffer;
import java.util.Iterator;
import java.util.NoSuchElementException;
import org.roaringbitmap.RoaringBitmap;

/**
 * The chunk file, format version 1: one partition's merge states for a run of the order, immutable once
 * written. All integers big-endian; {@code varint}/{@code varlong} are unsigned LEB128; {@code blob} is a
 * varint length then bytes; sections are framed by {@link Sections} (length, CRC-32C, payload).
 *
 * <pre>
 *  offset 0          4     5
 *  +-----------------+-----+--------------------------------------------------------------+
 *  | magic "OFCK"    | 01  | header section: string writerId, varlong entries,              |
 *  |                 |     |   varlong tombstones, varint blocks, blob minOrder, blob maxOrder |
 *  +-----------------+-----+--------------------------------------------------------------+
 *  | data section 1 .. blocks: varint n, then n entries:                                     |
 *  |     blob key | blob order | varlong deletedSince+1 (0 = live) | blob state             |
 *  +------------------------------------------------------------------------------------------+
 *  | index section: RoaringBitmap portable format of the 32-bit key hashes                    |
 *  +------------------------------------------------------------------------------------------+
 *  | trailer (16 B): u64 index section offset | u32 CRC-32C of those 8 bytes | magic "OFCK" |
 *  +------------------------------------------------------------------------------------------+
 * </pre>
 * Entries are strictly ascending by order bytes (which end with the key, so no two keys tie). The key hash is
 * the low 32 bits of XXH64(key bytes, seed 0). {@link ChunkValidator} names every check. A reader verifies
 * the frame, trailer, header and index checksums on open and each block's checksum as it reaches it, so a
 * damaged chunk fails loudly naming the file and never yields wrong entries.
 *
 * <p>Stateless and thread-safe; {@link Builder} and {@link Reader} are not thread-safe.
 */
public final class ChunkFormat {
    public static final byte[] MAGIC = {'O', 'F', 'C', 'K'};
    public static final byte VERSION = 1;
    static final int PREAMBLE = 5;
    static final int TRAILER = 16;
    static final int BLOCK_BYTES = 64 << 10;
    /** Upper bound of a key's share of the key-hash index: 2 bytes of value plus a container of its own. */
    static final long INDEX_BYTES_PER_KEY = 10;

    private ChunkFormat() {}

    /** The 32-bit key hash the index holds. */
    public static int keyHash(byte[] key) {
        return (int) XxHash64.hash(key);
    }

    /** Collects entries in ascending order into blocks, then produces the file bytes. */
    public static final class Builder {
        private final ByteWriter data = new ByteWriter(1024);
        private final ByteWriter block = new ByteWriter(1024);
        private final RoaringBitmap index = new RoaringBitmap();
        private int blockEntries;
        private int blocks;
        private long indexBytesAtLastBlock;
        private long keysSinceLastBlock;
        private long entries;
        private long tombstones;
        private byte[] minOrder;
        private byte[] maxOrder;

        public void add(ChunkEntry e) {
            if (maxOrder != null && java.util.Arrays.compareUnsigned(maxOrder, e.order()) >= 0) {
                throw new IllegalStateException("chunk entries must be added in strictly ascending order");
            }
            if (minOrder == null) {
                minOrder = e.order();
            }
            maxOrder = e.order();
            block.writeBlob(e.key()).writeBlob(e.order()).writeVarLong(e.deletedSince() + 1).writeBlob(e.state());
            blockEntries++;
            entries++;
            if (e.deleted()) {
                tombstones++;
            }
            index.add(keyHash(e.key()));
            keysSinceLastBlock++;
            if (block.length() >= BLOCK_BYTES) {
                flushBlock();
            }
        }

        private void flushBlock() {
            if (blockEntries == 0) {
                return;
            }
            ByteWriter payload = new ByteWriter(block.length() + 5);
            payload.writeVarInt(blockEntries).write(block.array(), 0, block.length());
            Sections.write(data, payload.array(), payload.length());
            block.reset();
            blockEntries = 0;
            blocks++;
            // sizing the index walks all its containers (up to 65536 for hashed keys): once per block, not per key
            indexBytesAtLastBlock = index.getLongSizeInBytes();
            keysSinceLastBlock = 0;
        }

        public long entries() {
            return entries;
        }

        /**
         * Approximate size of the file so far: the index as sized at the last block, plus at most
         * {@value #INDEX_BYTES_PER_KEY} bytes for each key since (a key alone in its bitmap container). O(1).
         */
        public long approximateBytes() {
            return data.length() + block.length() + indexBytesAtLastBlock + INDEX_BYTES_PER_KEY * keysSinceLastBlock;
        }

        /** The complete file and its manifest record (the name is filled in by the caller). */
        public ChunkRef finish(String name, String writerId, ByteWriter out) {
            if (entries == 0) {
                throw new IllegalStateException("a chunk holds at least one entry");
            }
            flushBlock();
            out.write(MAGIC).write(VERSION);
            ByteWriter header = new ByteWriter(64 + minOrder.length + maxOrder.length);
            header.writeString(writerId).writeVarLong(entries).writeVarLong(tombstones).writeVarInt(blocks)
                    .writeBlob(minOrder).writeBlob(maxOrder);
            Sections.write(out, header.array(), header.length());
            out.write(data.array(), 0, data.length());
            long indexOffset = out.length();
            index.runOptimize();
            ByteBuffer ib = ByteBuffer.allocate(index.serializedSizeInBytes());
            index.serialize(ib);
            Sections.write(out, ib.array(), ib.array().length);
            int indexLength = (int) (out.length() - indexOffset);
            ByteWriter trailer = new ByteWriter(8).writeLong(indexOffset);
            out.writeLong(indexOffset).writeInt(Sections.crc32c(trailer.array(), 0, 8)).write(MAGIC);
            return new ChunkRef(name, writerId, entries, tombstones, out.length(), indexOffset, indexLength, minOrder,
                    maxOrder);
        }
    }

    /** Reads the key-hash index from its section bytes (as stored at {@link ChunkRef#indexOffset()}). */
    public static RoaringBitmap readIndex(String file, byte[] section) {
        byte[] payload = Sections.read(new ByteReader(section, file), file, "key-hash index");
        RoaringBitmap b = new RoaringBitmap();
        try {
            b.deserialize(ByteBuffer.wrap(payload));
        } catch (IOException | RuntimeException e) {
            throw ChunkValidator.problem(file, ChunkValidator.Problem.MISMATCH, "key-hash index cannot be decoded: " + e);
        }
        return b;
    }

    /** A chunk file opened for reading: frame, trailer and header checked; entries read block by block. */
    public static final class Reader {
        private final String file;
        private final byte[] bytes;
        private final String writerId;
        private final long entries;
        private final long tombstones;
        private final int blocks;
        private final byte[] minOrder;
        private final byte[] maxOrder;
        private final long indexOffset;
        private final int dataStart;

        public Reader(String file, byte[] bytes) {
            this.file = file;
            this.bytes = bytes;
            ChunkValidator.checkFrame(file, bytes);
            int t = bytes.length - TRAILER;
            ByteReader tr = new ByteReader(bytes, t, TRAILER, file);
            indexOffset = tr.readLong();
            ChunkValidator.checkTrailer(file, indexOffset, tr.readInt(), Sections.crc32c(bytes, t, 8), bytes.length);
            ByteReader in = new ByteReader(bytes, PREAMBLE, (int) indexOffset - PREAMBLE, file);
            ByteReader h = new ByteReader(Sections.read(in, file, "header"), file);
            writerId = h.readString();
            entries = h.readVarLong();
            tombstones = h.readVarLong();
            blocks = h.readVarInt();
            minOrder = h.readBlob();
            maxOrder = h.readBlob();
            dataStart = in.position();
            ByteReader index = new ByteReader(bytes, (int) indexOffset, t - (int) indexOffset, file);
            Sections.read(index, file, "key-hash index");
            if (index.hasMore()) {
                throw ChunkValidator.problem(file, ChunkValidator.Problem.BAD_TRAILER, index.remaining()
                        + " bytes between the key-hash index and the trailer");
            }
        }

        public String file() { return file; }
        public String writerId() { return writerId; }
        public long entries() { return entries; }
        public long tombstones() { return tombstones; }
        public byte[] minOrder() { return minOrder; }
        public byte[] maxOrder() { return maxOrder; }
        public long indexOffset() { return indexOffset; }

        public RoaringBitmap index() {
            int len = bytes.length - TRAILER - (int) indexOffset;
            ByteReader in = new ByteReader(bytes, (int) indexOffset, len, file);
            return readIndex(file, in.read(len));
        }

        /**
         * The entries in order, each block's checksum verified when reached, order and counts checked.
         *
         * @throws OnefoldException CORRUPT naming the file on any damage
         */
        public Iterator<ChunkEntry> iterator() {
            return new Iterator<>() {
                final ByteReader in = new ByteReader(bytes, dataStart, (int) indexOffset - dataStart, file);
                ByteReader block;
                int leftInBlock;
                int blocksRead;
                long read;
                byte[] previous;

                @Override
                public boolean hasNext() {
                    if (leftInBlock > 0) {
                        return true;
                    }
                    if (block != null && block.hasMore()) {
                        throw ChunkValidator.problem(file, ChunkValidator.Problem.MISMATCH, "block " + blocksRead
                                + " has bytes after its last entry");
                    }
                    if (!in.hasMore()) {
                        ChunkValidator.checkEqual(file, "block count", blocks, blocksRead);
                        ChunkValidator.checkEqual(file, "entry count", entries, read);
                        return false;
                    }
                    block = new ByteReader(Sections.read(in, file, "data block " + blocksRead), file);
                    blocksRead++;
                    leftInBlock = block.readVarInt();
                    if (leftInBlock == 0) {
                        throw ChunkValidator.problem(file, ChunkValidator.Problem.MISMATCH, "block " + blocksRead
                                + " is empty");
                    }
                    return true;
                }

                @Override
                public ChunkEntry next() {
                    if (!hasNext()) {
                        throw new NoSuchElementException();
                    }
                    byte[] key = block.readBlob();
                    byte[] order = block.readBlob();
                    long since = block.readVarLong() - 1;
                    ChunkEntry e = new ChunkEntry(key, order, block.readBlob(), since);
                    leftInBlock--;
                    ChunkValidator.checkAscending(file, previous, e.order(), "entry " + read);
                    if (read == 0) {
                        ChunkValidator.checkEqual(file, "first order", minOrder, e.order());
                    }
                    previous = e.order();
                    read++;
                    if (read == entries) {
                        ChunkValidator.checkEqual(file, "last order", maxOrder, e.order());
                    }
                    return e;
                }
            };
        }
    }
}
