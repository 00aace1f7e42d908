package dev.onefold.internal.engine;

import dev.onefold.OnefoldException;

/** The one check every builder applies to a memory budget. Stateless. */
public final class MemoryBudget {
    private MemoryBudget() {}

    /**
     * @return {@code bytes} when it is a usable budget
     * @throws OnefoldException (USAGE) naming the value otherwise
     */
    public static long check(long bytes) {
        if (bytes < 1024) {
            throw OnefoldException.usage("memory budget must be at least 1024 bytes, got " + bytes);
        }
        return bytes;
    }
}
