package dev.onefold.internal.archive;

/**
 * What a manifest records about one chunk file: its storage name, the payload codec writer id its states were
 * written with, entry and tombstone counts, size, where its key-hash index section starts and how long it is
 * (so the index can be read without the records), and its first and last order bytes. Immutable.
 */
public record ChunkRef(String name, String writerId, long entries, long tombstones, long bytes, long indexOffset,
        int indexLength, byte[] minOrder, byte[] maxOrder) {}
