package dev.onefold.internal.archive;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.reconcile.Digest;
import java.util.ArrayList;
import java.util.List;

/**
 * What rewriting one partition produced: the partition's new manifest entry (no chunks when the partition is
 * now empty), the fingerprint of the task it answers, and what it cost. The chunk files are written and synced
 * before a result exists. Serializable to bytes for hand-over between processes. Immutable.
 */
public record RewriteResult(PartitionEntry partition, long taskFingerprint, long bytesRead, long bytesWritten,
        long tombstonesDropped) {
    static final int FORMAT = 1;

    public boolean isEmpty() {
        return partition.chunks().isEmpty();
    }

    public byte[] toBytes() {
        ByteWriter w = new ByteWriter(256);
        w.writeVarInt(FORMAT).writeLong(taskFingerprint).writeVarLong(bytesRead).writeVarLong(bytesWritten)
                .writeVarLong(tombstonesDropped);
        ManifestFormat.writeValues(w, partition.values());
        w.writeString(partition.name()).writeVarLong(partition.entries()).writeVarLong(partition.tombstones())
                .writeVarLong(partition.bytes());
        partition.digest().write(w);
        w.writeVarInt(partition.chunks().size());
        for (ChunkRef c : partition.chunks()) {
            ManifestFormat.writeChunk(w, c);
        }
        return w.toByteArray();
    }

    /**
     * Reads what {@link #toBytes()} wrote.
     *
     * @throws dev.onefold.OnefoldException CORRUPT when the bytes are damaged or of another format
     */
    public static RewriteResult fromBytes(byte[] bytes) {
        ByteReader in = new ByteReader(bytes, "partition result");
        int format = in.readVarInt();
        if (format != FORMAT) {
            throw dev.onefold.OnefoldException.corrupt("partition result: format " + format + ", expected " + FORMAT);
        }
        long fp = in.readLong();
        long read = in.readVarLong();
        long written = in.readVarLong();
        long dropped = in.readVarLong();
        List<String> values = ManifestFormat.readValues(in);
        String name = in.readString();
        long entries = in.readVarLong();
        long tombstones = in.readVarLong();
        long size = in.readVarLong();
        Digest digest = Digest.read(in);
        int n = in.readVarInt();
        List<ChunkRef> chunks = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            chunks.add(ManifestFormat.readChunk(in));
        }
        if (in.hasMore()) {
            throw dev.onefold.OnefoldException.corrupt("partition result: " + in.remaining() + " unexpected trailing bytes");
        }
        return new RewriteResult(new PartitionEntry(values, name, chunks, digest, entries, tombstones, size), fp, read,
                written, dropped);
    }
}
