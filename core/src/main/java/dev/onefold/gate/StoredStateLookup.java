package dev.onefold.gate;

/**
 * Where an exact-mode {@link StreamGate} finds the merge state of a key that has left its window: the store its
 * sink writes to (normally the archive).
 *
 * <p>Contract: {@code storedState(key)} returns the canonical merge-state bytes stored for {@code key} (the same
 * bytes {@link Decision#stateBytes()} carries for an emit of that key), or null when the key was never stored.
 * Every state the sink has acknowledged to the gate must be visible to this lookup: acknowledge only once the
 * emitted state is durably stored. States emitted but not yet acknowledged stay in the gate's memory, so the
 * lookup may lag behind them.
 *
 * <p>Implementations must be safe to call from the thread that calls {@link StreamGate#offer}; the gate calls
 * it at most once per key that misses its window. Cost: one point read of the store.
 */
@FunctionalInterface
public interface StoredStateLookup {

    /** The stored merge-state bytes of a key, or null when the key is not stored. */
    byte[] storedState(byte[] key);
}
