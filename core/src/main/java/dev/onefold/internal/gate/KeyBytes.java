package dev.onefold.internal.gate;

import java.util.Arrays;

/** Key bytes with content equality, for hash maps and the cache. Immutable (the array is never changed). */
public final class KeyBytes {
    private final byte[] bytes;
    private final int hash;

    public KeyBytes(byte[] bytes) {
        this.bytes = bytes;
        this.hash = Arrays.hashCode(bytes);
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
