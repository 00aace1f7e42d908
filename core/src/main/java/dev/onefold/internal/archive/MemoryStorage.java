package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import dev.onefold.spi.Storage;
import java.time.Clock;
import java.util.Arrays;
import java.util.Collection;
import java.util.List;
import java.util.TreeMap;

/**
 * {@link Storage} in this process's memory. It models durability like a disk: a {@link #write} is visible at
 * once but stays pending until {@link #sync}; {@link #dropUnsynced()} simulates a crash by forgetting every
 * pending write, so tests can prove the archive syncs before it publishes. Creates and deletes are durable at
 * once.
 *
 * <p>Thread-safe: every method is synchronized. Names are stored in ascending string order, which for the
 * archive's ASCII names is the unsigned UTF-8 order {@link Storage#list} promises.
 */
public final class MemoryStorage implements Storage {
    private record StoredObject(byte[] data, long modified, boolean durable) {}

    private final TreeMap<String, StoredObject> objects = new TreeMap<>();
    private final Clock clock;

    public MemoryStorage() {
        this(Clock.systemUTC());
    }

    /** A storage whose modification times come from {@code clock}. */
    public MemoryStorage(Clock clock) {
        this.clock = clock;
    }

    @Override
    public synchronized void write(String name, byte[] data) {
        objects.put(StorageNames.check(name), new StoredObject(data.clone(), clock.millis(), false));
    }

    @Override
    public synchronized void sync(Collection<String> names) {
        for (String n : names) {
            StoredObject o = objects.get(n);
            if (o != null) {
                objects.put(n, new StoredObject(o.data, o.modified, true));
            }
        }
    }

    @Override
    public synchronized boolean createIfAbsent(String name, byte[] data) {
        if (objects.containsKey(StorageNames.check(name))) {
            return false;
        }
        objects.put(name, new StoredObject(data.clone(), clock.millis(), true));
        return true;
    }

    private StoredObject get(String name) {
        StoredObject o = objects.get(name);
        if (o == null) {
            throw new OnefoldException(OnefoldException.Kind.IO, "object " + name + " does not exist");
        }
        return o;
    }

    @Override
    public synchronized byte[] read(String name) {
        return get(name).data.clone();
    }

    @Override
    public synchronized byte[] read(String name, long offset, int length) {
        byte[] d = get(name).data;
        if (offset < 0 || length < 0 || offset + length > d.length) {
            throw new OnefoldException(OnefoldException.Kind.IO, "cannot read bytes " + offset + ".." + (offset + length)
                    + " of " + name + ": it has " + d.length + " bytes");
        }
        return Arrays.copyOfRange(d, (int) offset, (int) offset + length);
    }

    @Override
    public synchronized long size(String name) {
        StoredObject o = objects.get(name);
        return o == null ? -1 : o.data.length;
    }

    @Override
    public synchronized long modifiedMillis(String name) {
        StoredObject o = objects.get(name);
        return o == null ? -1 : o.modified;
    }

    @Override
    public synchronized List<String> list(String prefix) {
        return List.copyOf(objects.subMap(prefix, true, prefix + Character.MAX_VALUE, false).keySet());
    }

    @Override
    public synchronized void delete(String name) {
        objects.remove(name);
    }

    /** Simulates a crash: forgets every write not yet synced. */
    public synchronized void dropUnsynced() {
        objects.values().removeIf(o -> !o.durable);
    }

    @Override
    public String toString() {
        return "in-memory storage";
    }
}
