package dev.onefold.internal.archive;

import java.util.concurrent.atomic.AtomicLong;

/** Bytes and files an operation read and wrote, for apply reports. Thread-safe. */
public final class IoCounters {
    final AtomicLong bytesRead = new AtomicLong();
    final AtomicLong bytesWritten = new AtomicLong();
    final AtomicLong filesWritten = new AtomicLong();

    public long bytesRead() { return bytesRead.get(); }
    public long bytesWritten() { return bytesWritten.get(); }
    public long filesWritten() { return filesWritten.get(); }

    void add(IoCounters other) {
        bytesRead.addAndGet(other.bytesRead());
        bytesWritten.addAndGet(other.bytesWritten());
        filesWritten.addAndGet(other.filesWritten());
    }
}
