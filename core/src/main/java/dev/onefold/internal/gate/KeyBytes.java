package dev.onefold.internal.gate;

import dev.onefold.internal.hash.XxHash64;
import java.util.Arrays;

/**
 * Key bytes with content equality, for hash maps and the cache. Immutable (the array is never changed).
 *
 * <p>The hash is XXH64 folded to 32 bits, not {@link Arrays#hashCode(byte[])}: encoded keys share long prefixes
 * and differ in few bytes, which the polynomial hash maps to few distinct values, so a window of a million keys
 * collided into tree bins that cost more memory per key and a tree search per lookup.
 */
public final class KeyBytes {
    private final byte[] bytes;
    private final int hash;

    public KeyBytes(byte[] bytes) {
        this.bytes = bytes;
        long h = XxHash64.hash(bytes);
        this.hash = (int) (h ^ (h >>> 32));
    }

    public byte[] bytes() {
        return bytes;
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof KeyBytes k && k.hash == hash && Arrays.equals(k.bytes, bytes);
    }

    @Override
    public int hashCode() {
        return hash;
    }
}
