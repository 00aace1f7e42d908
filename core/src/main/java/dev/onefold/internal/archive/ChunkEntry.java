package dev.onefold.internal.archive;

/**
 * One key's merge state as stored in a chunk: key bytes, the entry's order bytes (the smallest order of its
 * visible records, or its anchor's order when deleted), the state's canonical bytes under the chunk's writer
 * id, and when the key became deleted ({@code deletedSince} epoch millis, -1 while live). Immutable.
 */
public record ChunkEntry(byte[] key, byte[] order, byte[] state, long deletedSince) {
    public boolean deleted() {
        return deletedSince >= 0;
    }
}
