package dev.onefold.internal.archive;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.reconcile.Digest;
import java.util.ArrayList;
import java.util.List;

/**
 * Everything one worker needs to rewrite one partition, independent of the planner's memory: the partition,
 * the chunks it has in the base version, the keys to drop from them (they moved or were merged with the batch),
 * the batch's entries for it sorted by order (states under {@code writerId}), the apply's clock reading, the
 * tombstone horizon (-1: keep all), the chunk size target, and the partition's stored digest when the new digest
 * may be derived from it (null when the whole partition must be decoded to recompute it; see
 * {@link PartitionRewriter}). Serializable to bytes so it can cross process
 * boundaries; its {@link #fingerprint()} identifies its exact content, computed once (it hashes the whole
 * serialized task, incoming states included, and the apply loop and committer ask for it repeatedly). Immutable.
 */
public final class RewriteTask {
    static final int FORMAT = 2;
    private final List<String> values;
    private final String name;
    private final List<ChunkRef> baseChunks;
    private final List<byte[]> removedKeys;
    private final List<ChunkEntry> incoming;
    private final String writerId;
    private final long nowMillis;
    private final long horizonMillis;
    private final long chunkTargetBytes;
    private final Digest baseDigest;
    private final long fingerprint;

    public RewriteTask(List<String> values, String name, List<ChunkRef> baseChunks, List<byte[]> removedKeys,
            List<ChunkEntry> incoming, String writerId, long nowMillis, long horizonMillis, long chunkTargetBytes,
            Digest baseDigest) {
        this.values = java.util.Collections.unmodifiableList(new ArrayList<>(values));
        this.name = name;
        this.baseChunks = List.copyOf(baseChunks);
        this.removedKeys = List.copyOf(removedKeys);
        this.incoming = List.copyOf(incoming);
        this.writerId = writerId;
        this.nowMillis = nowMillis;
        this.horizonMillis = horizonMillis;
        this.chunkTargetBytes = chunkTargetBytes;
        this.baseDigest = baseDigest;
        this.fingerprint = XxHash64.hash(toBytes());
    }

    public List<String> values() { return values; }
    public String name() { return name; }
    public List<ChunkRef> baseChunks() { return baseChunks; }
    public List<byte[]> removedKeys() { return removedKeys; }
    public List<ChunkEntry> incoming() { return incoming; }
    public String writerId() { return writerId; }
    public long nowMillis() { return nowMillis; }
    public long horizonMillis() { return horizonMillis; }
    public long chunkTargetBytes() { return chunkTargetBytes; }
    public Digest baseDigest() { return baseDigest; }

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
        w.write(baseDigest == null ? 0 : 1);
        if (baseDigest != null) {
            baseDigest.write(w);
        }
        return w.toByteArray();
    }

    /** XXH64 of {@link #toBytes()}: equal fingerprints mean the same rewrite. */
    public long fingerprint() {
        return fingerprint;
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
        Digest baseDigest = in.read() == 0 ? null : Digest.read(in);
        if (in.hasMore()) {
            throw dev.onefold.OnefoldException.corrupt("partition task: " + in.remaining() + " unexpected trailing bytes");
        }
        return new RewriteTask(values, name, chunks, removed, incoming, writerId, now, horizon, target, baseDigest);
    }
}
