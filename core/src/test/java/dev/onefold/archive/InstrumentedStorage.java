package dev.onefold.archive;

import dev.onefold.OnefoldException;
import dev.onefold.spi.Storage;
import java.util.ArrayList;
import java.util.Collection;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicLong;

/**
 * A storage wrapper for tests: counts bytes read and written per object name, and can fail the n-th mutating
 * call (write, sync, create, delete), either before the call reaches the storage or after it took effect (an
 * ambiguous failure, as when a reply is lost).
 */
final class InstrumentedStorage implements Storage {
    enum When { BEFORE, AFTER }

    private final Storage inner;
    final Map<String, AtomicLong> bytesRead = new ConcurrentHashMap<>();
    final Map<String, AtomicLong> bytesWritten = new ConcurrentHashMap<>();
    final List<String> mutations = java.util.Collections.synchronizedList(new ArrayList<>());
    private final AtomicInteger countdown = new AtomicInteger(-1);
    private volatile When when = When.BEFORE;

    InstrumentedStorage(Storage inner) {
        this.inner = inner;
    }

    /** Fails the {@code n}-th mutating call from now (0 = the next one). */
    void failAt(int n, When when) {
        this.when = when;
        countdown.set(n);
    }

    void resetCounters() {
        bytesRead.clear();
        bytesWritten.clear();
        mutations.clear();
    }

    private void mutation(String what, Runnable op) {
        mutations.add(what);
        boolean fail = countdown.getAndDecrement() == 0;
        if (fail && when == When.BEFORE) {
            throw new OnefoldException(OnefoldException.Kind.IO, "injected failure before " + what);
        }
        op.run();
        if (fail) {
            throw new OnefoldException(OnefoldException.Kind.IO, "injected failure after " + what);
        }
    }

    @Override
    public void write(String name, byte[] data) {
        mutation("write " + name, () -> inner.write(name, data));
        bytesWritten.computeIfAbsent(name, k -> new AtomicLong()).addAndGet(data.length);
    }

    @Override
    public void sync(Collection<String> names) {
        mutation("sync " + names.size(), () -> inner.sync(names));
    }

    @Override
    public boolean createIfAbsent(String name, byte[] data) {
        boolean[] created = new boolean[1];
        mutation("create " + name, () -> created[0] = inner.createIfAbsent(name, data));
        bytesWritten.computeIfAbsent(name, k -> new AtomicLong()).addAndGet(data.length);
        return created[0];
    }

    @Override
    public byte[] read(String name) {
        byte[] b = inner.read(name);
        bytesRead.computeIfAbsent(name, k -> new AtomicLong()).addAndGet(b.length);
        return b;
    }

    @Override
    public byte[] read(String name, long offset, int length) {
        byte[] b = inner.read(name, offset, length);
        bytesRead.computeIfAbsent(name, k -> new AtomicLong()).addAndGet(b.length);
        return b;
    }

    @Override
    public long size(String name) {
        return inner.size(name);
    }

    @Override
    public long modifiedMillis(String name) {
        return inner.modifiedMillis(name);
    }

    @Override
    public List<String> list(String prefix) {
        return inner.list(prefix);
    }

    @Override
    public void delete(String name) {
        mutation("delete " + name, () -> inner.delete(name));
    }
}
