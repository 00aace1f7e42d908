package dev.onefold.internal.archive;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.reconcile.Digest;
import java.util.ArrayList;
import java.util.List;

/**
 * The manifest file, format version 1: one per committed version, named
 * {@code manifests/v<20-digit version>.manifest} and created exclusively. Integers big-endian,
 * {@code varint}/{@code varlong} unsigned LEB128, {@code string}/{@code blob} a varint length then bytes.
 *
 * <pre>
 *  offset 0         4     5
 *  +----------------+-----+------------------------------------------------------------------+
 *  | magic "OFMF"   | 01  | body section (u32 length, u32 CRC-32C, payload), then end of file  |
 *  +----------------+-----+------------------------------------------------------------------+
 *  body: varlong version | string commitId | varlong createdMillis | u64 specHash | varint P
 *   P partitions, ascending by name:
 *     varint V, V values (u8 0 = null | u8 1, string) | string name
 *     varlong entries | varlong tombstones | varlong bytes | digest ({@link Digest#write}) | varint C
 *     C chunks, in order:
 *       string name | string writerId | varlong entries | varlong tombstones | varlong bytes
 *       varlong indexOffset | varint indexLength | blob minOrder | blob maxOrder
 * </pre>
 * {@link ManifestValidator} names every check. Stateless and thread-safe.
 */
public final class ManifestFormat {
    public static final byte[] MAGIC = {'O', 'F', 'M', 'F'};
    public static final byte VERSION = 1;
    public static final String PREFIX = "manifests/v";
    public static final String SUFFIX = ".manifest";
    static final int PREAMBLE = 5;

    private ManifestFormat() {}

    /** Where a partition's chunk files live. */
    public static String chunkDirectory(String partitionName) {
        return "chunks/" + partitionName + "/";
    }

    /** The version a manifest file name stands for, or -1 when the name is not a manifest's. */
    public static long versionOf(String fileName) {
        if (!fileName.startsWith(PREFIX) || !fileName.endsWith(SUFFIX)
                || fileName.length() != PREFIX.length() + 20 + SUFFIX.length()) {
            return -1;
        }
        String digits = fileName.substring(PREFIX.length(), PREFIX.length() + 20);
        for (int i = 0; i < digits.length(); i++) {
            if (!Character.isDigit(digits.charAt(i))) {
                return -1;
            }
        }
        return Long.parseLong(digits);
    }

    public static byte[] write(Manifest m) {
        ByteWriter b = new ByteWriter(256);
        b.writeVarLong(m.version()).writeString(m.commitId()).writeVarLong(m.createdMillis()).writeLong(m.specHash());
        b.writeVarInt(m.partitions().size());
        for (PartitionEntry p : m.partitions()) {
            writeValues(b, p.values());
            b.writeString(p.name()).writeVarLong(p.entries()).writeVarLong(p.tombstones()).writeVarLong(p.bytes());
            p.digest().write(b);
            b.writeVarInt(p.chunks().size());
            for (ChunkRef c : p.chunks()) {
                writeChunk(b, c);
            }
        }
        ByteWriter out = new ByteWriter(b.length() + 16);
        out.write(MAGIC).write(VERSION);
        Sections.write(out, b.array(), b.length());
        return out.toByteArray();
    }

    /** Writes one chunk record (also used to hand chunk lists between workers). */
    public static void writeChunk(ByteWriter b, ChunkRef c) {
        b.writeString(c.name()).writeString(c.writerId()).writeVarLong(c.entries()).writeVarLong(c.tombstones())
                .writeVarLong(c.bytes()).writeVarLong(c.indexOffset()).writeVarInt(c.indexLength())
                .writeBlob(c.minOrder()).writeBlob(c.maxOrder());
    }

    public static ChunkRef readChunk(ByteReader in) {
        return new ChunkRef(in.readString(), in.readString(), in.readVarLong(), in.readVarLong(), in.readVarLong(),
                in.readVarLong(), in.readVarInt(), in.readBlob(), in.readBlob());
    }

    /** Writes partition values: varint count, then per value u8 0 (null) or u8 1 and the string. */
    public static void writeValues(ByteWriter b, java.util.List<String> values) {
        b.writeVarInt(values.size());
        for (String v : values) {
            if (v == null) {
                b.write(0);
            } else {
                b.write(1).writeString(v);
            }
        }
    }

    public static List<String> readValues(ByteReader in) {
        int nv = in.readVarInt();
        List<String> values = new ArrayList<>(Math.min(nv, 64));
        for (int j = 0; j < nv; j++) {
            values.add(in.read() == 0 ? null : in.readString());
        }
        return values;
    }

    /**
     * Reads and checks a manifest.
     *
     * @param expectedVersion the version the file name stands for, or -1 to skip that check
     * @throws dev.onefold.OnefoldException CORRUPT naming the file and the {@link ManifestValidator.Problem}
     */
    public static Manifest read(String file, byte[] bytes, long expectedVersion) {
        ManifestValidator.checkPreamble(file, bytes);
        ByteReader outer = new ByteReader(bytes, PREAMBLE, bytes.length - PREAMBLE, file);
        ByteReader in = new ByteReader(Sections.read(outer, file, "manifest body"), file);
        ManifestValidator.checkEnd(file, outer.remaining());
        long version = in.readVarLong();
        ManifestValidator.checkVersion(file, expectedVersion, version);
        String commitId = in.readString();
        long created = in.readVarLong();
        long specHash = in.readLong();
        int np = in.readVarInt();
        List<PartitionEntry> parts = new ArrayList<>(Math.min(np, 1 << 16));
        String previous = null;
        for (int i = 0; i < np; i++) {
            List<String> values = readValues(in);
            String name = in.readString();
            long entries = in.readVarLong();
            long tombstones = in.readVarLong();
            long size = in.readVarLong();
            Digest digest = Digest.read(in);
            int nc = in.readVarInt();
            List<ChunkRef> chunks = new ArrayList<>(Math.min(nc, 1 << 16));
            for (int j = 0; j < nc; j++) {
                chunks.add(readChunk(in));
            }
            PartitionEntry p = new PartitionEntry(values, name, chunks, digest, entries, tombstones, size);
            ManifestValidator.checkPartition(file, previous, p);
            previous = name;
            parts.add(p);
        }
        ManifestValidator.checkEnd(file, in.remaining());
        return new Manifest(version, commitId, created, specHash, parts);
    }
}
