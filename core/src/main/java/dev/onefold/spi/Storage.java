package dev.onefold.spi;

import dev.onefold.internal.archive.LocalStorage;
import dev.onefold.internal.archive.MemoryStorage;
import java.nio.file.Path;
import java.util.Collection;
import java.util.List;

/**
 * Where an archive keeps its files: a flat namespace of immutable objects named by slash-separated paths
 * (for example {@code chunks/=2024-02-29T13/3f2a....chunk}). The archive only ever writes a name once, so the
 * interface needs no update-in-place; its single atomic primitive is {@link #createIfAbsent}, which an object
 * store with conditional create can offer as well as a local file system.
 *
 * <p>Let s be a storage. Then after {@code s.write(n, b)} returns, {@code s.read(n)} equals b; after
 * {@code s.sync(names)} returns, those objects survive a crash; {@code s.createIfAbsent(n, b)} returns true for
 * exactly one of any number of concurrent callers with the same n, and the object is durable when it returns.
 * {@link #list} returns names in ascending (unsigned UTF-8) order.
 *
 * <p>Names passed in are produced by the archive: ASCII letters, digits and {@code - _ . = , % ~ # /}, never
 * starting with {@code /} and never containing {@code ..} as a path step. Implementations must be thread-safe.
 * Costs are those of the backing store; every call is one round trip.
 */
public interface Storage {

    /**
     * Writes an object, replacing a half-written one left by a crash. Visible to reads at once; durable only after
     * {@link #sync}.
     *
     * @throws dev.onefold.OnefoldException IO naming the object
     */
    void write(String name, byte[] data);

    /** Makes the named objects written earlier durable (file contents and directory entries on local disk). */
    void sync(Collection<String> names);

    /**
     * Creates an object only if no object of that name exists, atomically and durably.
     *
     * @return false when the name already existed (nothing was written)
     */
    boolean createIfAbsent(String name, byte[] data);

    /**
     * Reads a whole object.
     *
     * @throws dev.onefold.OnefoldException IO naming the object when it cannot be read or does not exist
     */
    byte[] read(String name);

    /** Reads {@code length} bytes from {@code offset}; fails like {@link #read(String)} and when out of range. */
    byte[] read(String name, long offset, int length);

    /** The size of an object in bytes, or -1 when it does not exist. */
    long size(String name);

    /** The last modification time of an object in epoch milliseconds, or -1 when it does not exist. */
    long modifiedMillis(String name);

    /** Names starting with {@code prefix}, ascending. */
    List<String> list(String prefix);

    /** Deletes an object; deleting a missing object is not an error. Durable when it returns. */
    void delete(String name);

    /** Files under a local directory (created if needed), fsynced for durability. The default. */
    static Storage local(Path root) {
        return new LocalStorage(root);
    }

    /** Objects held in this process's memory, for tests and short-lived pipelines. */
    static Storage inMemory() {
        return new MemoryStorage();
    }
}
