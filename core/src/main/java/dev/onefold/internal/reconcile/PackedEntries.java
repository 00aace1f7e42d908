package dev.onefold.internal.reconcile;

import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.reconcile.DigestSource;

/**
 * The (key bytes, key hash) entries of one partition packed into one growing byte array, so a source can hand
 * them out again without holding an object per key.
 * <pre>
 *  per entry: varint key length | key bytes | key hash (8 bytes, big-endian)
 * </pre>
 * Memory: about key length + 9 bytes per entry (plus up to 2x while growing). Not thread-safe.
 */
public final class PackedEntries {
    private final ByteWriter bytes = new ByteWriter(256);
    private long size;

    public void add(byte[] key, long keyHash) {
        bytes.writeBlob(key);
        bytes.writeLong(keyHash);
        size++;
    }

    public long size() {
        return size;
    }

    /** Passes every entry in the order added. */
    public void forEach(DigestSource.EntryConsumer consumer) {
        ByteReader in = new ByteReader(bytes.array(), 0, bytes.length(), "packed entries");
        while (in.hasMore()) {
            byte[] key = in.readBlob();
            consumer.accept(key, in.readLong());
        }
    }
}
