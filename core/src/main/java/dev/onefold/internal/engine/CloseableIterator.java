package dev.onefold.internal.engine;

import java.util.Iterator;

/** An iterator over resources (spill files, chunk files) that must be released. */
public interface CloseableIterator<T> extends Iterator<T>, AutoCloseable {
    @Override
    void close();
}
