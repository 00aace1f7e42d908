package dev.onefold.internal.archive;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.hash.XxHash64;
import java.util.ArrayList;
import java.util.List;

/**
 * Everything one worker needs to rewrite one partition, independent of the planner's memory: the partition,
 * the chunks it has in the base version, the keys to drop from them (they moved or were merged with the batch),
 * the batch's entries for it sorted by order (states under {@code writerId}), the apply's clock reading, the
 * tombstone horizon (-1: keep all) and the chunk size target. Serializable to bytes so it can cross process
 * boundaries; its {@link #fingerprint()} identifies its exact content. Immutable.
 */
public record RewriteTask(List<String> values, String name, List<ChunkRef> baseChunks, List<byte[]> removedKeys,
        List<ChunkEntry> incoming, String writerId, long nowMillis, long horizonMillis, long chunkTargetBytes) {
    static final int FORMAT = 1;

    public RewriteTask {
        values = java.util.Collections.unmodifiableList(new ArrayList<>(values));
        baseChunks = List.copyOf(baseChunks);
        removedKeys = List.copyOf(removedKeys);
        incoming = List.copyOf(incoming);
    }

    public byte[] toBytes() {
        ByteWriter w = new ByteWriter(256);
        w.writeVarInt(FORMAT);
        ManifestFormat.writeValues(w, values);
        w.writeString(name).writeString(writerId).writeVarLong(nowMillis).writeZigZag(horizonMillis)
                .writeVarLong(chunkTargetBytes);
        w.writeVarInt(baseChunks.size());
        for (ChunkRef c : baseChunks) {
            ManifestFormat.writeChunk(w, c);
        }
        w.writeVarInt(removedKeys.size());
        for (byte[] k : removedKeys) {
            w.writeBlob(k);
        }
        w.writeVarInt(incoming.size());
        for (ChunkEntry e : incoming) {
            w.writeBlob(e.key()).writeBlob(e.order()).writeVarLong(e.deletedSince() + 1).writeBlob(e.state());
        }
        return w.toByteArray();
    }

    /** XXH64 of {@link #toBytes()}: equal fingerprints mean the same rewrite. */
    public long fingerprint() {
        return XxHash64.hash(toBytes());
    }

    /**
     * Reads what {@link #toBytes()} wrote.
     *
     * @throws dev.onefold.OnefoldException CORRUPT when the bytes are damaged or of another format
     */
    public static RewriteTask fromBytes(byte[] bytes) {
        ByteReader in = new ByteReader(bytes, "partition task");
        int format = in.readVarInt();
        if (format != FORMAT) {
            throw dev.onefold.OnefoldException.corrupt("partition task: format " + format + ", expected " + FORMAT);
        }
        List<String> values = ManifestFormat.readValues(in);
        String name = in.readString();
        String writerId = in.readString();
        long now = in.readVarLong();
        long horizon = in.readZigZag();
        long target = in.readVarLong();
        int n = in.readVarInt();
        List<ChunkRef> chunks = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            chunks.add(ManifestFormat.readChunk(in));
        }
        n = in.readVarInt();
        List<byte[]> removed = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            removed.add(in.readBlob());
        }
        n = in.readVarInt();
        List<ChunkEntry> incoming = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            byte[] key = in.readBlob();
            byte[] order = in.readBlob();
            long since = in.readVarLong() - 1;
            incoming.add(new ChunkEntry(key, order, in.readBlob(), since));
        }
        if (in.hasMore()) {
            throw dev.onefold.OnefoldException.corrupt("partition task: " + in.remaining() + " unexpected trailing bytes");
        }
        return new RewriteTask(values, name, chunks, removed, incoming, writerId, now, horizon, target);
    }
}
